/**
 * Inter-annotator agreement end to end: rows written as CSV → `loadCells` (audit sums in the scan) →
 * `rollupSlices` → `agreementOf`. Reference values: statsmodels 0.13.5 (Debian 0.13.5+dfsg) with
 * numpy 1.24.2 under /usr/bin/python3; the calls and their printed output are quoted beside each test.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { loadCells, type Loaded } from '../../src/cells/load.js';
import { type LoadOptions } from '../../src/cells/plan.js';
import { rollupSlices } from '../../src/slices/rollup.js';
import { agreementOf } from '../../src/triage/agreement.js';
import { csvText } from '../helpers/audit-fixture.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';
import { expectClose } from '../stats/expect-close.js';
import { recordsOf } from '../helpers/cell-records.js';

const LIBRARY = 1e-12; // same formula as statsmodels: agreement to rounding

let duck: Duck;
let dir: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 2 });
  dir = makeTempDir('floorgap-kappa-');
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

function options(path: string, annotators: string[]): LoadOptions {
  return {
    source: { files: [path], perSplit: {} },
    roles: {},
    where: null,
    by: null,
    sliceCols: null,
    bins: 5,
    maxCells: 100_000,
    floor: null,
    floorTable: null,
    annotators,
  };
}

/** Rows id, split, station, label, pred, then the annotator labels; splits and stations alternate. */
function rowsOf(labelSets: readonly (readonly string[])[]): string[][] {
  return labelSets.map((labels, i) => {
    const truth = labels.find((l) => l !== '') ?? 'x';
    return [String(i + 1), i % 2 === 0 ? 'train' : 'dev', i % 3 === 0 ? 'S1' : 'S2', truth, truth, ...labels];
  });
}

describe("Cohen's kappa: two annotators, the 2×2 table [[20, 5], [10, 15]]", () => {
  // fixture (hand-built): rater_a's label is the table's row, rater_b's its column
  //   20 rows both 'x'; 5 rows A = 'x', B = 'y'; 10 rows A = 'y', B = 'x'; 15 rows both 'y'
  // plus 3 rows that are not panel rows (one label or none), which must not enter the table
  const labelSets = [
    ...Array.from({ length: 20 }, () => ['x', 'x']),
    ...Array.from({ length: 5 }, () => ['x', 'y']),
    ...Array.from({ length: 10 }, () => ['y', 'x']),
    ...Array.from({ length: 15 }, () => ['y', 'y']),
    ['x', ''],
    ['', 'y'],
    ['', ''],
  ];
  let loaded: Loaded;

  beforeAll(async () => {
    const path = join(dir, 'cohen.csv');
    writeFileSync(path, csvText(['id', 'split', 'station', 'label', 'pred', 'rater_a', 'rater_b'], rowsOf(labelSets)));
    loaded = await loadCells(duck, options(path, ['rater_a', 'rater_b']));
  });

  it('the overall audit realises the table (hand-counted: 35 agreeing rows of 50, marginals A 25/25, B 30/20)', () => {
    const [overall] = rollupSlices(loaded.table, []);
    expect(loaded.classes).toEqual(['x', 'y']);
    const a = overall.audit!;
    expect(a.audited).toBe(52); // 50 panel rows + 2 rows with one label
    expect(a.panelRows).toBe(50);
    expect(a.agreeSum).toBe(35); // trace 20 + 15
    expect(a.classCounts).toEqual([
      [25, 25, 0], // rater_a: row sums of the table (+ "other")
      [30, 20, 0], // rater_b: column sums
    ]);
  });

  it('kappa 0.4', () => {
    // /usr/bin/python3:
    //   >>> from statsmodels.stats.inter_rater import cohens_kappa
    //   >>> cohens_kappa(np.array([[20, 5], [10, 15]])).kappa
    //   0.3999999999999999
    // hand arithmetic: p_o = 35/50 = 0.7, p_e = (25·30 + 25·20)/50² = 0.5, κ = 0.2/0.5 = 0.4
    const agreement = agreementOf(rollupSlices(loaded.table, [])[0].audit);
    expect(agreement).not.toBeNull();
    expect(agreement!.method).toBe('cohen');
    expect(agreement!.audited).toBe(50);
    expectClose(agreement!.kappa, 0.3999999999999999, LIBRARY);
  });

  it('the station slices partition the 50 panel rows (audit sums are additive)', () => {
    const stations = rollupSlices(loaded.table, ['station']);
    expect(stations).toHaveLength(2);
    const panel = stations.reduce((s, x) => s + x.audit!.panelRows, 0);
    expect(panel).toBe(50);
  });
});

describe("Fleiss' kappa: three annotators, 10 items × 3 categories, 3 labels per item", () => {
  // fixture (hand-built): items × categories (x, y, z) counts, each row of the table one CSV row whose
  // three annotator labels realise the counts (in the order x…, y…, z…, rotated by the row number)
  const TABLE = [
    [3, 0, 0],
    [0, 3, 0],
    [2, 1, 0],
    [1, 1, 1],
    [0, 2, 1],
    [0, 0, 3],
    [2, 0, 1],
    [1, 2, 0],
    [3, 0, 0],
    [0, 1, 2],
  ];
  const CATS = ['x', 'y', 'z'];
  const labelSets = TABLE.map((counts, i) => {
    const labels = counts.flatMap((n, c) => Array.from({ length: n }, () => CATS[c]));
    const r = i % 3;
    return [...labels.slice(r), ...labels.slice(0, r)];
  });
  // one more row with a single label: audited, but not an item of the table
  labelSets.push(['', 'z', '']);
  let loaded: Loaded;

  beforeAll(async () => {
    const path = join(dir, 'fleiss.csv');
    writeFileSync(path, csvText(['id', 'split', 'station', 'label', 'pred', 'ann1', 'ann2', 'ann3'], rowsOf(labelSets)));
    loaded = await loadCells(duck, options(path, ['ann1', 'ann2', 'ann3']));
  });

  it('the overall audit holds the table’s sufficient statistics (hand-counted)', () => {
    const a = rollupSlices(loaded.table, [])[0].audit!;
    expect(a.audited).toBe(11);
    expect(a.panelRows).toBe(10);
    // Σ P_i: four unanimous items (1 each), five 2-1 items (1/3 each), one 1-1-1 item (0) → 4 + 5/3
    expectClose(a.agreeSum, 17 / 3, 1e-14);
    // category totals over the three annotators: column sums of the table 12, 10, 8 (+ "other" 0)
    const totals = [0, 1, 2, 3].map((c) => a.classCounts.reduce((s, row) => s + row[c], 0));
    expect(totals).toEqual([12, 10, 8, 0]);
  });

  it('kappa equals statsmodels fleiss_kappa on the items × categories table', () => {
    // /usr/bin/python3:
    //   >>> from statsmodels.stats.inter_rater import fleiss_kappa
    //   >>> t = np.array([[3,0,0],[0,3,0],[2,1,0],[1,1,1],[0,2,1],[0,0,3],[2,0,1],[1,2,0],[3,0,0],[0,1,2]])
    //   >>> fleiss_kappa(t)
    //   0.3412162162162161
    //   >>> fleiss_kappa(t, method='fleiss')
    //   0.3412162162162161
    // hand arithmetic: P̄ = 17/30, P_e = (12² + 10² + 8²)/30² = 308/900, κ = (510 − 308)/(900 − 308) = 202/592
    const agreement = agreementOf(rollupSlices(loaded.table, [])[0].audit);
    expect(agreement!.method).toBe('fleiss');
    expect(agreement!.audited).toBe(10);
    expectClose(agreement!.kappa, 0.3412162162162161, LIBRARY);
    expectClose(agreement!.kappa, 202 / 592, LIBRARY);
  });
});
