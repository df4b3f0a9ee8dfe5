/**
 * Annotator audit sums in the cell scan (`loadCells` with `annotators`) and their rollup into slices.
 *
 * Part 1: a tiny hand-written fixture; every expected number is hand-counted from its rows (the
 * counting is written out in the comments). Part 2: a seeded generated fixture cross-checked against
 * an independent plain loop (test/helpers/audit-fixture.ts, which shares no code with src/).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { loadCells, type Loaded } from '../../src/cells/load.js';
import { MAX_CLASSES } from '../../src/cells/plan-scan.js';
import { type LoadOptions } from '../../src/cells/plan.js';
import { rollupSlices } from '../../src/slices/rollup.js';
import type { AuditSums } from '../../src/core/cell.js';
import type { CellRecord as Cell } from '../helpers/cell-records.js';
import { addInto, csvText, distinctValues, expectAudits, generateAuditTable, zeroAudit, type ExpectedAudit } from '../helpers/audit-fixture.js';
import { parseCsv, records, toCsv, type TextRow } from '../helpers/engine-fixture.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';
import { recordsOf } from '../helpers/cell-records.js';

let duck: Duck;
let dir: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 2 });
  dir = makeTempDir('floorgap-audit-');
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

function options(over: Partial<LoadOptions> & Pick<LoadOptions, 'source'>): LoadOptions {
  return { roles: {}, where: null, by: null, sliceCols: null, bins: 5, maxCells: 100_000, floor: null, floorTable: null, ...over };
}

const ANNOTATORS = ['ann1', 'ann2', 'ann3'];

/** Relative closeness to 1e-12 (exact for zero): panel errors and agreement are sums of fractions. */
function expectNear(actual: number, expected: number, what: string): void {
  const ok = expected === 0 ? actual === 0 : Math.abs(actual - expected) <= 1e-12 * Math.abs(expected);
  if (!ok) expect.fail(`${what}: got ${actual}, expected ${expected}`);
}

/** Asserts audit sums: counts exactly, fractional sums to 1e-12 relative. */
function expectAudit(actual: AuditSums | null, expected: ExpectedAudit, what: string): void {
  expect(actual, `${what}: audit`).not.toBeNull();
  const a = actual!;
  expect(a.audited, `${what} audited`).toBe(expected.audited);
  expect(a.panelRows, `${what} panelRows`).toBe(expected.panelRows);
  expectNear(a.panelErrors, expected.panelErrors, `${what} panelErrors`);
  expectNear(a.agreeSum, expected.agreeSum, `${what} agreeSum`);
  expect(a.annRows, `${what} annRows`).toEqual(expected.annRows);
  expect(a.annErrors, `${what} annErrors`).toEqual(expected.annErrors);
  expect(a.classCounts, `${what} classCounts`).toEqual(expected.classCounts);
}

describe('audit sums: hand-written fixture', () => {
  // fixture (hand-written). Classes a, b, c; label and pred are the row's true and predicted class.
  //   row 1  train S1  label a            labels (a, a, a)         all right
  //   row 2  train S1  label a            labels (a, a, b)         majority a = label → panel error 0
  //   row 3  dev   S1  label a            labels (b, b, a)         majority b ≠ label → panel error 1
  //   row 4  dev   S1  label a            labels (a, b, –)         2 labels tied; b wrong → 1/2
  //   row 5  train S2  label a            labels (a, b, c)         3 distinct labels; b, c wrong → 2/3
  //   row 6  train S2  label b            labels (–, b, –)         1 label: audited, not a panel row
  //   row 7  dev   S2  label c            labels (–, –, –)         not audited
  //   row 8  train S2  label 'c '         labels (' c', 'c ', ' c ') spaces trimmed: all equal c, all right
  //   row 9  dev   S2  label b            labels (zzz, b, b)       majority b; zzz is outside the class list
  // rows 10–56: station S3, no annotator labels, each with its own label f00 … f46 (47 classes), so that
  // the label and annotator columns hold 3 + 47 + 1 = 51 distinct values; the class list keeps the 50
  // most frequent (ties by value), and the one-off 'zzz' (last of the count-1 values) falls into "other".
  const header = ['id', 'split', 'station', 'label', 'pred', 'ann1', 'ann2', 'ann3'];
  const hand: string[][] = [
    ['1', 'train', 'S1', 'a', 'a', 'a', 'a', 'a'],
    ['2', 'train', 'S1', 'a', 'b', 'a', 'a', 'b'],
    ['3', 'dev', 'S1', 'a', 'a', 'b', 'b', 'a'],
    ['4', 'dev', 'S1', 'a', 'a', 'a', 'b', ''],
    ['5', 'train', 'S2', 'a', 'c', 'a', 'b', 'c'],
    ['6', 'train', 'S2', 'b', 'b', '', 'b', ''],
    ['7', 'dev', 'S2', 'c', 'c', '', '', ''],
    ['8', 'train', 'S2', 'c ', 'c', ' c', 'c ', ' c '],
    ['9', 'dev', 'S2', 'b', 'b', 'zzz', 'b', 'b'],
  ];
  const FILLERS = 47;
  const fillers = Array.from({ length: FILLERS }, (_, i) => {
    const f = `f${String(i).padStart(2, '0')}`;
    return [String(10 + i), i % 2 === 0 ? 'train' : 'dev', 'S3', f, f, '', '', ''];
  });
  // the class list: a, b, c, f00 … f46 (hand-derived above); "other" is index 50
  const CLASSES = ['a', 'b', 'c', ...fillers.map((r) => r[3])];
  const OTHER = CLASSES.length;

  /** A hand-counted audit: counts and class counts given sparsely per annotator ({ a: 2 }, { other: 1 }). */
  function counted(
    audited: number,
    panelRows: number,
    panelErrors: number,
    agreeSum: number,
    annRows: number[],
    annErrors: number[],
    classes: Record<string, number>[],
  ): ExpectedAudit {
    const out = zeroAudit(3, CLASSES.length);
    Object.assign(out, { audited, panelRows, panelErrors, agreeSum, annRows, annErrors });
    classes.forEach((m, j) => {
      for (const [cls, n] of Object.entries(m)) out.classCounts[j][cls === 'other' ? OTHER : CLASSES.indexOf(cls)] = n;
    });
    return out;
  }

  // per cell, hand-counted from the rows above (P_i = Σ_c n_c(n_c − 1) / (n(n − 1)): (a,a,a) → 6/6 = 1;
  // (a,a,b) and (b,b,a) → 2/6 = 1/3; (a,b) → 0/2 = 0; (a,b,c) → 0; (c,c,c) → 1; (zzz,b,b) → 1/3)
  const CELLS: Record<string, ExpectedAudit> = {
    // rows 1, 2: two panel rows, errors 0 + 0; agreement 1 + 1/3; ann3 wrong on row 2;
    // class counts: ann1 a,a; ann2 a,a; ann3 a,b
    'train|S1': counted(2, 2, 0, 4 / 3, [2, 2, 2], [0, 0, 1], [{ a: 2 }, { a: 2 }, { a: 1, b: 1 }]),
    // rows 3, 4: errors 1 + 1/2; agreement 1/3 + 0; ann3 gave no label on row 4;
    // ann1 wrong on row 3, ann2 wrong on rows 3 and 4; class counts: ann1 b,a; ann2 b,b; ann3 a
    'dev|S1': counted(2, 2, 1.5, 1 / 3, [2, 2, 1], [1, 2, 0], [{ a: 1, b: 1 }, { b: 2 }, { a: 1 }]),
    // rows 5, 6, 8: audited 3 (row 6 has one label), panel rows 5 and 8: errors 2/3 + 0, agreement 0 + 1;
    // ann2 labelled rows 5, 6, 8; ann2 (b) and ann3 (c) wrong on row 5; class counts on rows 5 and 8 only:
    // ann1 a,c; ann2 b,c; ann3 c,c
    'train|S2': counted(3, 2, 2 / 3, 1, [2, 3, 2], [0, 1, 1], [{ a: 1, c: 1 }, { b: 1, c: 1 }, { c: 2 }]),
    // rows 7, 9: row 7 unaudited; row 9: error 0, agreement 1/3, ann1's zzz is wrong and counted as other
    'dev|S2': counted(1, 1, 0, 1 / 3, [1, 1, 1], [1, 0, 0], [{ other: 1 }, { b: 1 }, { b: 1 }]),
    // fillers: no labels at all
    'train|S3': counted(0, 0, 0, 0, [0, 0, 0], [0, 0, 0], [{}, {}, {}]),
    'dev|S3': counted(0, 0, 0, 0, [0, 0, 0], [0, 0, 0], [{}, {}, {}]),
  };
  // per station, every split: the two cells of the station added (hand arithmetic)
  const STATIONS: Record<string, ExpectedAudit> = {
    // S1: 4 audited / 4 panel; errors 0 + 1.5; agreement 4/3 + 1/3 = 5/3
    S1: counted(4, 4, 1.5, 5 / 3, [4, 4, 3], [1, 2, 1], [{ a: 3, b: 1 }, { a: 2, b: 2 }, { a: 2, b: 1 }]),
    // S2: 4 audited / 3 panel; errors 2/3 + 0; agreement 1 + 1/3 = 4/3
    S2: counted(4, 3, 2 / 3, 4 / 3, [3, 4, 3], [1, 1, 1], [{ a: 1, c: 1, other: 1 }, { b: 2, c: 1 }, { b: 1, c: 2 }]),
    S3: counted(0, 0, 0, 0, [0, 0, 0], [0, 0, 0], [{}, {}, {}]),
  };

  let loaded: Loaded;

  beforeAll(async () => {
    const path = join(dir, 'hand.csv');
    writeFileSync(path, csvText(header, [...hand, ...fillers]));
    loaded = await loadCells(duck, options({ source: { files: [path], perSplit: {} }, annotators: ANNOTATORS }));
  });

  it('keeps the 50 most frequent classes; the annotator columns are not slice columns', () => {
    expect(MAX_CLASSES).toBe(50);
    expect(loaded.classes).toEqual(CLASSES);
    expect(loaded.annotators).toEqual(ANNOTATORS);
    expect(loaded.columns.map((c) => c.name)).toEqual(['station']);
    expect(loaded.grouping).toEqual({ kind: 'cross' });
  });

  it('every cell carries the hand-counted audit sums', () => {
    expect(recordsOf(loaded.table).map((c) => `${c.split}|${c.key.station}`).sort()).toEqual(Object.keys(CELLS).sort());
    for (const c of recordsOf(loaded.table)) {
      const id = `${c.split}|${c.key.station}`;
      expectAudit(c.audit, CELLS[id], id);
      expect(c.audit!.classCounts.every((row) => row.length === CLASSES.length + 1), `${id} class count length`).toBe(true);
    }
  });

  it('row counts of the cells are untouched by the audit (hand-counted: S1 2 + 2, S2 3 + 2, S3 24 + 23)', () => {
    const rows = Object.fromEntries(recordsOf(loaded.table).map((c) => [`${c.split}|${c.key.station}`, c.rows]));
    expect(rows).toEqual({ 'train|S1': 2, 'dev|S1': 2, 'train|S2': 3, 'dev|S2': 2, 'train|S3': 24, 'dev|S3': 23 });
    // errors: row 2 (a→b), row 5 (a→c); row 8 is not an error after trimming
    expect(recordsOf(loaded.table).reduce((s, c) => s + c.errors, 0)).toBe(2);
  });

  it('rollupSlices by station adds the audit sums over the splits', () => {
    const slices = rollupSlices(loaded.table, ['station']);
    expect(slices.map((s) => s.key.station).sort()).toEqual(['S1', 'S2', 'S3']);
    for (const s of slices) expectAudit(s.audit, STATIONS[s.key.station], `station=${s.key.station}`);
  });

  it('the overall slice holds every audited row (hand arithmetic: S1 + S2 + S3)', () => {
    const [overall] = rollupSlices(loaded.table, []);
    const expected = addInto(addInto(addInto(zeroAudit(3, CLASSES.length), STATIONS.S1), STATIONS.S2), STATIONS.S3);
    // 8 audited rows (all but row 7 and the fillers), 7 panel rows (all but 6 and 7), errors 13/6, agreement 3
    expect(expected.audited).toBe(8);
    expect(expected.panelRows).toBe(7);
    expectNear(expected.panelErrors, 13 / 6, 'hand sum');
    expectNear(expected.agreeSum, 3, 'hand sum');
    expectAudit(overall.audit, expected, 'overall');
  });

  it('without annotators the cells carry no audit', async () => {
    const path = join(dir, 'hand.csv');
    const plain = await loadCells(duck, options({ source: { files: [path], perSplit: {} } }));
    expect(recordsOf(plain.table).every((c) => c.audit === null)).toBe(true);
    expect(plain.classes).toEqual([]);
    // without annotators the annotator columns are ordinary columns (ann1 … ann3 have 2–50 values)
    expect(plain.columns.map((c) => c.name)).toEqual(['station', 'ann1', 'ann2', 'ann3']);
    expect(rollupSlices(plain.table, []).every((s) => s.audit === null)).toBe(true);
  });
});

describe('audit sums: generated fixture against a plain loop', () => {
  const table = generateAuditTable({ rows: 400, seed: 11 });
  let rows: TextRow[];
  let cross: Loaded;
  let sets: Loaded;
  let classes: string[];

  /** A cell's identity: split and the trimmed key values ('(missing)' for empty). */
  const keyOfRow = (by: readonly string[]) => (row: TextRow, split: string) =>
    JSON.stringify([split, ...by.map((b) => (row[b].trim() === '' ? '(missing)' : row[b].trim()))]);
  const keyOfCell = (by: readonly string[]) => (c: Cell) => JSON.stringify([c.split, ...by.map((b) => c.key[b])]);

  beforeAll(async () => {
    const path = join(dir, 'generated.csv');
    writeFileSync(path, toCsv(table));
    rows = records(parseCsv(readFileSync(path, 'utf8')));
    const base = { source: { files: [path], perSplit: {} }, annotators: ANNOTATORS };
    cross = await loadCells(duck, options(base));
    sets = await loadCells(duck, options({ ...base, maxCells: 1 }));
    classes = distinctValues(rows, ['label', ...ANNOTATORS]);
  });

  it('the fixture covers 0, 1, 2 and 3 labels per row, unlabelled rows and ties', () => {
    const count = (r: TextRow) => ANNOTATORS.filter((a) => r[a].trim() !== '').length;
    // about 0.35³ ≈ 4 % of rows have no label, the rest 1–3
    for (const n of [0, 1, 2, 3]) expect(rows.filter((r) => count(r) === n).length, `rows with ${n} labels`).toBeGreaterThan(5);
    expect(rows.some((r) => r.label.trim() === '')).toBe(true);
    // a 2-label tie and a 3-distinct-label row exist
    expect(rows.some((r) => count(r) === 2 && new Set(ANNOTATORS.map((a) => r[a].trim()).filter((v) => v !== '')).size === 2)).toBe(true);
    expect(rows.some((r) => count(r) === 3 && new Set(ANNOTATORS.map((a) => r[a].trim())).size === 3)).toBe(true);
  });

  it('the class list is every distinct label (fewer than 50), sorted', () => {
    expect(classes).toEqual(['bridge', 'ok', 'open', 'short']);
    expect(cross.classes).toEqual(classes);
  });

  it('full cross: every cell matches the plain loop', () => {
    expect(cross.grouping.kind).toBe('cross');
    const by = cross.columns.map((c) => c.name);
    expect(by).toEqual(['station', 'shift']);
    const expected = expectAudits(rows, ANNOTATORS, classes, keyOfRow(by));
    const seen = new Set<string>();
    for (const c of recordsOf(cross.table)) {
      const id = keyOfCell(by)(c);
      seen.add(id);
      const e = expected.get(id);
      if (!e) expect.fail(`unexpected cell ${id}`);
      expectAudit(c.audit, e, id);
    }
    expect([...expected.keys()].filter((k) => !seen.has(k))).toEqual([]);
    // the fixture is not trivial: most cells have panel rows
    expect(recordsOf(cross.table).filter((c) => (c.audit?.panelRows ?? 0) > 0).length).toBeGreaterThan(20);
  });

  for (const by of [['station'], ['shift'], ['station', 'shift'], []] as const) {
    it(`rollupSlices by [${by.join(', ')}] (full cross and grouping sets) matches the plain loop`, () => {
      const expected = new Map<string, ExpectedAudit>();
      for (const [id, a] of expectAudits(rows, ANNOTATORS, classes, keyOfRow(by))) {
        const slice = JSON.stringify((JSON.parse(id) as string[]).slice(1));
        expected.set(slice, addInto(expected.get(slice) ?? zeroAudit(3, classes.length), a));
      }
      for (const loaded of [cross, sets]) {
        const slices = rollupSlices(loaded.table, by);
        expect(slices.map((s) => JSON.stringify(by.map((b) => s.key[b]))).sort()).toEqual([...expected.keys()].sort());
        for (const s of slices) {
          const id = JSON.stringify(by.map((b) => s.key[b]));
          expectAudit(s.audit, expected.get(id)!, `${loaded.grouping.kind} ${id}`);
        }
      }
    });
  }

  it('grouping sets: each set of cells sums to the same overall audit', () => {
    expect(sets.grouping.kind).toBe('sets');
    const expected = [...expectAudits(rows, ANNOTATORS, classes, () => 'all').values()][0];
    if (sets.grouping.kind !== 'sets') return;
    for (const set of sets.grouping.sets) {
      const mine = recordsOf(sets.table).filter((c) => Object.keys(c.key).filter((k) => c.key[k] !== null).join('+') === set.join('+'));
      const sum = mine.reduce((acc, c) => addInto(acc, { ...c.audit!, annRows: [...c.audit!.annRows], annErrors: [...c.audit!.annErrors], classCounts: c.audit!.classCounts.map((r) => [...r]) }), zeroAudit(3, classes.length));
      expectAudit(sum, expected, `set ${set.join('+')}`);
    }
  });
});

describe('audit sums with an error column: rows without a true class are not audited', () => {
  // fixture (hand-written): a 0/1 error column and a label column; row 2 has an error but no label, so
  // the scan keeps it as a row, but its annotator labels cannot be compared with a true class.
  //   row 1  train S1  label a   labels (a, b)   tie, b wrong → panel error 1/2; agreement 0
  //   row 2  train S1  label –   labels (b, b)   left out of the audit
  //   row 3  dev   S2  label b   labels (b, b)   right; agreement 1
  //   row 4  dev   S2  label a   labels (a, a)   right; agreement 1
  // classes: a, b (the values of the label and annotator columns); "other" is index 2
  const text = 'id,split,station,label,error,ann1,ann2\n1,train,S1,a,0,a,b\n2,train,S1,,1,b,b\n3,dev,S2,b,0,b,b\n4,dev,S2,a,1,a,a\n';
  let loaded: Loaded;

  beforeAll(async () => {
    const path = join(dir, 'error-column.csv');
    writeFileSync(path, text);
    loaded = await loadCells(duck, options({ source: { files: [path], perSplit: {} }, annotators: ['ann1', 'ann2'] }));
  });

  it('keeps the unlabelled row as a row (error column mode)', () => {
    expect(loaded.roles).toMatchObject({ label: 'label', pred: null, error: 'error' });
    const train = recordsOf(loaded.table).find((c) => c.split === 'train')!;
    expect([train.rows, train.errors]).toEqual([2, 1]);
  });

  it('hand-counted audit sums: row 2 counts nowhere (not audited, no annotator error, no class count)', () => {
    expect(loaded.classes).toEqual(['a', 'b']);
    const byCell = Object.fromEntries(recordsOf(loaded.table).map((c) => [`${c.split}|${c.key.station}`, c.audit]));
    expect(byCell['train|S1']).toEqual({ audited: 1, panelRows: 1, panelErrors: 0.5, agreeSum: 0, annRows: [1, 1], annErrors: [0, 1], classCounts: [[1, 0, 0], [0, 1, 0]] });
    expect(byCell['dev|S2']).toEqual({ audited: 2, panelRows: 2, panelErrors: 0, agreeSum: 2, annRows: [2, 2], annErrors: [0, 0], classCounts: [[1, 1, 0], [1, 1, 0]] });
  });
});
