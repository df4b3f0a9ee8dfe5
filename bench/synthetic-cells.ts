/**
 * Synthetic cells for the benchmark (bench/run.ts) and the regroup profile (bench/profile-regroup.ts):
 * cell tables built with `cellTable` from seeded draws, no files. Our own invented shapes.
 */
import { auditFieldCount, cellTable, SUM_COLUMNS, type CellTable, type SumColumn } from '../src/cells/cell-table.js';
import { SPLITS } from '../src/core/split.js';
import { Random } from '../src/demo/random.js';

/** The slice columns of the synthetic cells: the bench table's names and sizes (bench/bench-table.ts), `sharpness` as 5 bins. */
export const SYNTHETIC_COLUMNS = ['station', 'package', 'board', 'nozzle', 'line', 'operator', 'sharpness'];
const SYNTHETIC_SIZES = [6, 6, 48, 6, 5, 20, 5];
/** Floors of the synthetic floor entries 0 … 4 (entry −1, the default floor: 0.02) and the rows behind each. */
const SYNTHETIC_FLOORS = [0.12, 0.04, 0.03, 0.05, 0.02];
const SYNTHETIC_FLOOR_N = [400, 300, 300, 250, 350];

export type Shape = 'cross' | 'audit' | 'sets';
export const SHAPE_NAMES: Record<Shape, string> = { cross: 'cross', audit: 'cross + audit', sets: 'grouping sets' };
/** What each shape is, for the legend under the table. */
export const SHAPE_LEGEND: Record<Shape, string> = {
  cross: 'the 7 columns in a full cross, no audit, one floor entry, no runs',
  audit: "the full cross with the demo's audit shape: 3 annotators and 5 classes + \"other\" (`auditFieldCount(3, 6)` = 28 sums), 10 % of the cells holding audited rows, floor entries −1…4 (floorN > 0 for entries ≥ 0), 4 runs",
  sets: 'grouping sets of every column and every pair (28 sets), no audit, no runs',
};

/**
 * `n` synthetic cells (no files), built with `cellTable` from seeded draws: codes drawn uniformly per
 * column, split uniform, 1–40 rows of weight 1 a cell, errors up to 20 % of them.
 * - cross: every cell groups every column; floor entry −1 everywhere; no runs, no audit.
 * - audit: the demo's audit shape, `auditFieldCount(3, 6)` fields; 10 % of the cells hold audited rows
 *   (1 to all of their rows, each labelled by all 3 annotators); the floor entry follows `package`
 *   (code 0: −1, codes 1–5: entries 0–4, with floorN > 0); 4 runs.
 * - sets: cell i groups set i mod 28 of the 7 single columns and 21 pairs; the other columns are −1.
 */
export function syntheticCells(n: number, shape: Shape): CellTable {
  const rng = new Random(12345 + n + shape.length);
  const m = SYNTHETIC_COLUMNS.length;
  const sets: number[][] = [...Array.from({ length: m }, (_, k) => [k]), ...Array.from({ length: m }, (_, a) => Array.from({ length: m - a - 1 }, (_, d) => [a, a + d + 1])).flat()];
  const codes = SYNTHETIC_COLUMNS.map(() => new Int32Array(n));
  const split = new Int32Array(n);
  const run = new Int32Array(n).fill(-1);
  const floorEntry = new Int32Array(n).fill(-1);
  const floorN = new Float64Array(n);
  const rows = new Float64Array(n);
  const errors = new Float64Array(n);
  const floorSum = new Float64Array(n);
  const audit = shape === 'audit' ? { annotators: 3, classes: 6 } : null;
  const fields = audit ? Array.from({ length: auditFieldCount(audit.annotators, audit.classes) }, () => new Float64Array(n)) : [];
  for (let i = 0; i < n; i++) {
    const set = shape === 'sets' ? sets[i % sets.length] : null;
    for (let k = 0; k < m; k++) codes[k][i] = set && !set.includes(k) ? -1 : rng.int(SYNTHETIC_SIZES[k]);
    split[i] = rng.int(SPLITS.length);
    const r = 1 + rng.int(40);
    rows[i] = r;
    errors[i] = Math.floor(r * rng.uniform() * 0.2);
    floorSum[i] = r * 0.02;
    if (shape !== 'audit') continue;
    run[i] = rng.int(4);
    const entry = codes[1][i] - 1;
    floorEntry[i] = entry;
    if (entry >= 0) {
      floorN[i] = SYNTHETIC_FLOOR_N[entry];
      floorSum[i] = r * SYNTHETIC_FLOORS[entry];
    }
    if (!rng.chance(0.1)) continue;
    // audited rows, each with 3 labels: audited, panel rows, panel errors, agreement, then per annotator rows, errors, class counts
    const a = 1 + rng.int(r);
    fields[0][i] = a;
    fields[1][i] = a;
    fields[2][i] = Math.floor(a * rng.uniform() * 0.15);
    fields[3][i] = a * (0.7 + 0.3 * rng.uniform());
    for (let j = 0; j < audit!.annotators; j++) {
      const base = 4 + j * (2 + audit!.classes);
      fields[base][i] = a;
      fields[base + 1][i] = Math.floor(a * rng.uniform() * 0.2);
      let left = a;
      for (let c = 0; c < audit!.classes - 1; c++) {
        const k = rng.int(left + 1);
        fields[base + 2 + c][i] = k;
        left -= k;
      }
      fields[base + 2 + audit!.classes - 1][i] = left;
    }
  }
  const sums = Object.fromEntries(SUM_COLUMNS.map((s) => [s, s === 'errors' ? errors : s === 'floorSum' ? floorSum : s.startsWith('cost') ? new Float64Array(n) : rows])) as Record<SumColumn, Float64Array>;
  return cellTable({
    columns: SYNTHETIC_COLUMNS,
    dicts: SYNTHETIC_SIZES.map((s, k) => Array.from({ length: s }, (_, v) => `${SYNTHETIC_COLUMNS[k]}-${v}`)),
    codes,
    split,
    runs: audit ? ['r1', 'r2', 'r3', 'r4'] : [],
    run,
    sums,
    floorEntry,
    floorN,
    audit: audit ? { ...audit, fields } : null,
  });
}
