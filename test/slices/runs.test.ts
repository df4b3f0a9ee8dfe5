/**
 * Tables of several training runs: a column named `run` is detected as the run role, cells carry the
 * run, `rollupSlices(cells, by, run)` counts only that run's rows, and the run column never becomes a
 * slice column. Every expected number is hand-counted from the hand-written fixture below.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { loadCells, type Loaded } from '../../src/cells/load.js';
import { type LoadOptions } from '../../src/cells/plan.js';
import { runsOf } from '../../src/cells/cell-table.js';
import { rollupSlices, type SliceStats } from '../../src/slices/rollup.js';
import { csvText } from '../helpers/audit-fixture.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';
import { recordsOf } from '../helpers/cell-records.js';

let duck: Duck;
let dir: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 2 });
  dir = makeTempDir('floorgap-runs-');
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

// fixture (hand-written): two runs; row 8 writes its run with spaces (trimmed to r2)
const ROWS: string[][] = [
  ['1', 'train', 'r1', 'S1', 'a', 'a'],
  ['2', 'train', 'r1', 'S1', 'a', 'b'], // error
  ['3', 'train', 'r1', 'S2', 'b', 'b'],
  ['4', 'dev', 'r1', 'S1', 'a', 'a'],
  ['5', 'dev', 'r1', 'S2', 'b', 'a'], // error
  ['6', 'dev', 'r1', 'S2', 'b', 'b'],
  ['7', 'train', 'r2', 'S1', 'a', 'b'], // error
  ['8', 'train', ' r2 ', 'S2', 'b', 'a'], // error
  ['9', 'dev', 'r2', 'S1', 'a', 'a'],
  ['10', 'dev', 'r2', 'S2', 'b', 'b'],
];

/** [rows, errors] of each split of a slice. */
function counts(s: SliceStats): Record<string, [number, number]> {
  return Object.fromEntries(Object.entries(s.splits).map(([split, sums]) => [split, [sums.rows, sums.errors]]));
}

describe('runs: a `run` column', () => {
  let cross: Loaded;
  let sets: Loaded;

  beforeAll(async () => {
    const path = join(dir, 'runs.csv');
    writeFileSync(path, csvText(['id', 'split', 'run', 'station', 'label', 'pred'], ROWS));
    const o: LoadOptions = { source: { files: [path], perSplit: {} }, roles: {}, where: null, by: null, sliceCols: null, bins: 5, maxCells: 100_000, floor: null, floorTable: null };
    cross = await loadCells(duck, o);
    sets = await loadCells(duck, { ...o, maxCells: 1 });
  });

  it('is detected as the run role and is never a slice column', () => {
    for (const loaded of [cross, sets]) {
      expect(loaded.roles.run).toBe('run');
      expect(loaded.runs).toEqual(['r1', 'r2']);
      expect(loaded.columns.map((c) => c.name)).toEqual(['station']);
      expect(loaded.overviewColumns).toEqual(['station']);
      expect(recordsOf(loaded.table).every((c) => !('run' in c.key))).toBe(true);
      expect(new Set(recordsOf(loaded.table).map((c) => c.run))).toEqual(new Set(['r1', 'r2']));
      expect(runsOf(loaded.table)).toEqual(['r1', 'r2']);
    }
  });

  it("rollupSlices(cells, [], 'r1') counts only r1 rows (hand-counted: rows 1–6)", () => {
    for (const loaded of [cross, sets]) {
      const [r1] = rollupSlices(loaded.table, [], 'r1');
      // train rows 1, 2, 3 (error: 2); dev rows 4, 5, 6 (error: 5)
      expect(counts(r1)).toEqual({ train: [3, 1], dev: [3, 1] });
      expect(Object.keys(r1.key)).toEqual([]);
    }
  });

  it("rollupSlices(cells, [], 'r2') counts only r2 rows, the spaced ' r2 ' included (rows 7–10)", () => {
    const [r2] = rollupSlices(cross.table, [], 'r2');
    expect(counts(r2)).toEqual({ train: [2, 2], dev: [2, 0] });
  });

  it('by station within a run (hand-counted)', () => {
    for (const loaded of [cross, sets]) {
      const r1 = Object.fromEntries(rollupSlices(loaded.table, ['station'], 'r1').map((s) => [s.key.station, counts(s)]));
      // S1: train rows 1, 2 (error 2), dev row 4; S2: train row 3, dev rows 5 (error), 6
      expect(r1).toEqual({ S1: { train: [2, 1], dev: [1, 0] }, S2: { train: [1, 0], dev: [2, 1] } });
      const r2 = Object.fromEntries(rollupSlices(loaded.table, ['station'], 'r2').map((s) => [s.key.station, counts(s)]));
      // S1: train row 7 (error), dev row 9; S2: train row 8 (error), dev row 10
      expect(r2).toEqual({ S1: { train: [1, 1], dev: [1, 0] }, S2: { train: [1, 1], dev: [1, 0] } });
    }
  });

  it('without a run, rollupSlices adds every run; an unknown run gives no slices', () => {
    const [all] = rollupSlices(cross.table, []);
    expect(counts(all)).toEqual({ train: [5, 3], dev: [5, 1] });
    expect(rollupSlices(cross.table, [], 'r3')).toEqual([]);
  });
});
