/**
 * Cost tables in the cell scan: `loadCells` with `costTable` (key columns + label_cost) gives each cell
 * Σ w·cost and Σ w over the rows an entry matched (the most specific entry, as for floor tables); rows
 * no entry matches have costWeight 0 and cost --label-cost at triage. Every expected number is
 * hand-counted from the hand-written fixture below (the counting is written out in the comments).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { loadCells, type Loaded } from '../../src/cells/load.js';
import { type LoadOptions } from '../../src/cells/plan.js';
import { rollupSlices } from '../../src/slices/rollup.js';
import { buildReport } from '../../src/triage/report.js';
import { CONTEXT, options as triageOptions } from '../helpers/cells.js';
import { csvText } from '../helpers/audit-fixture.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';
import { expectClose } from '../stats/expect-close.js';
import { recordsOf } from '../helpers/cell-records.js';

const EXACT = 1e-12; // hand arithmetic on invented numbers

let duck: Duck;
let dir: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 2 });
  dir = makeTempDir('floorgap-cost-');
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

// fixture (hand-written): cost table, one entry per line (the header is line 1)
//   line 2  station S1            cost 2
//   line 3  station S1, night     cost 5   (more specific: wins for S1 · night)
//   line 4  station S2            cost 0.5
//   line 5  station S9            cost 7   (matches no row)
const COSTS = 'station,shift,label_cost\nS1,,2\nS1,night,5\nS2,,0.5\nS9,,7\n';

// fixture (hand-written): rows with weights; the comment beside each row names the entry it takes
const ROWS: string[][] = [
  ['1', 'train', 'S1', 'day', 'a', 'a', '1'], //   line 2: cost 2
  ['2', 'train', 'S1', 'day', 'a', 'b', '2'], //   line 2: cost 2
  ['3', 'train', 'S1', 'night', 'a', 'a', '1'], // line 3: cost 5
  ['4', 'dev', 'S1', 'night', 'b', 'b', '0.5'], // line 3: cost 5
  ['5', 'train', 'S2', 'day', 'b', 'b', '1'], //   line 4: cost 0.5
  ['6', 'train', 'S2', 'night', 'a', 'b', '3'], // line 4: cost 0.5
  ['7', 'dev', 'S2', 'day', 'a', 'a', '1'], //     line 4: cost 0.5
  ['8', 'train', 'S3', 'day', 'b', 'b', '1'], //   no entry
  ['9', 'dev', 'S3', 'night', 'a', 'a', '2'], //   no entry
  ['10', 'dev', 'S1', 'day', 'b', 'a', '1'], //    line 2: cost 2
];

// per cell (split | station | shift): [Σ w·cost, Σ w over matched rows, Σ w], hand-counted from ROWS
const CELLS: Record<string, [number, number, number]> = {
  'train|S1|day': [1 * 2 + 2 * 2, 3, 3], //   rows 1, 2
  'train|S1|night': [1 * 5, 1, 1], //         row 3
  'dev|S1|night': [0.5 * 5, 0.5, 0.5], //     row 4
  'dev|S1|day': [1 * 2, 1, 1], //             row 10
  'train|S2|day': [1 * 0.5, 1, 1], //         row 5
  'train|S2|night': [3 * 0.5, 3, 3], //       row 6
  'dev|S2|day': [1 * 0.5, 1, 1], //           row 7
  'train|S3|day': [0, 0, 1], //               row 8: no entry matches
  'dev|S3|night': [0, 0, 2], //               row 9: no entry matches
};

describe('cost table: per-cell Σ w·cost and Σ w over matched rows', () => {
  let loaded: Loaded;
  let costPath: string;

  beforeAll(async () => {
    const path = join(dir, 'rows.csv');
    costPath = join(dir, 'costs.csv');
    writeFileSync(path, csvText(['id', 'split', 'station', 'shift', 'label', 'pred', 'weight'], ROWS));
    writeFileSync(costPath, COSTS);
    const o: LoadOptions = {
      source: { files: [path], perSplit: {} },
      roles: {},
      where: null,
      by: null,
      sliceCols: null,
      bins: 5,
      maxCells: 100_000,
      floor: 0.01,
      floorTable: null,
      costTable: costPath,
    };
    loaded = await loadCells(duck, o);
  });

  it('reads the cost table; its entries do not touch the floors', () => {
    expect(loaded.costTable?.keyColumns).toEqual(['station', 'shift']);
    expect(loaded.costTable?.entries.map((e) => [e.line, e.floor])).toEqual([
      [2, 2],
      [3, 5],
      [4, 0.5],
      [5, 7],
    ]);
    expect(loaded.floorTable).toBeNull();
    expect(recordsOf(loaded.table).every((c) => c.floorEntry === -1 && c.floorN === null)).toBe(true);
  });

  it('every cell: costSum and costWeight hand-counted; unmatched rows have costWeight 0', () => {
    const got = Object.fromEntries(recordsOf(loaded.table).map((c) => [`${c.split}|${c.key.station}|${c.key.shift}`, [c.costSum, c.costWeight, c.weight]]));
    expect(Object.keys(got).sort()).toEqual(Object.keys(CELLS).sort());
    for (const [id, [sum, weight, all]] of Object.entries(CELLS)) {
      expectClose(got[id][0], sum, EXACT);
      expectClose(got[id][1], weight, EXACT);
      expectClose(got[id][2], all, EXACT);
    }
  });

  it('rollupSlices by station adds them per split (hand arithmetic from the cells)', () => {
    const slices = Object.fromEntries(rollupSlices(loaded.table, ['station']).map((s) => [s.key.station, s.splits]));
    // S1 train: 6 + 5 = 11 over weight 3 + 1 = 4; S1 dev: 2.5 + 2 = 4.5 over 0.5 + 1 = 1.5
    expect([slices.S1.train!.costSum, slices.S1.train!.costWeight, slices.S1.train!.weight]).toEqual([11, 4, 4]);
    expect([slices.S1.dev!.costSum, slices.S1.dev!.costWeight]).toEqual([4.5, 1.5]);
    // S2 train: 0.5 + 1.5 = 2 over 1 + 3 = 4
    expect([slices.S2.train!.costSum, slices.S2.train!.costWeight]).toEqual([2, 4]);
    // S3: nothing matched
    expect([slices.S3.train!.costSum, slices.S3.train!.costWeight, slices.S3.train!.weight]).toEqual([0, 0, 1]);
    expect([slices.S3.dev!.costSum, slices.S3.dev!.costWeight, slices.S3.dev!.weight]).toEqual([0, 0, 2]);
  });

  it('warns about the entry that matches no row', () => {
    expect(loaded.warnings).toContain(`${costPath}: line 5 (station=S9) matches no row`);
  });

  it('triage: the mean train cost mixes table costs with --label-cost for unmatched rows', () => {
    const report = buildReport(loaded.table, ['station'], [], CONTEXT, triageOptions({ labelCost: 1.5 }));
    const cost = Object.fromEntries(report.slices.map((s) => [s.key.station, s.cost]));
    // (Σ w·cost + (Σ w − Σ w matched) · 1.5) / Σ w over train rows:
    // S1 (11 + 0)/4 = 2.75; S2 (2 + 0)/4 = 0.5; S3 (0 + 1 · 1.5)/1 = 1.5
    expectClose(cost.S1, 2.75, EXACT);
    expectClose(cost.S2, 0.5, EXACT);
    expectClose(cost.S3, 1.5, EXACT);
    // overall: (13 + 1 · 1.5) / 9
    expectClose(report.overall.cost, 14.5 / 9, EXACT);
  });
});
