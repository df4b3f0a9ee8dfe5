/**
 * The lattice of candidate slices: column sets of 1 to `depth` candidate columns, parents of a slice,
 * the headroom bound that lets the search skip a slice and everything beneath it, and cell masks for
 * rows a conjunction selects (the rest of a folded slice, overlaps).
 */
import { cellColumns, type CellTable } from '../cells/cell-table.js';
import { SPLITS } from '../core/split.js';
import type { SliceStats } from '../slices/rollup.js';

/**
 * Every set of 1 to `depth` columns, smallest first, each in the order of `columns`.
 * @example
 * columnSets(['a', 'b', 'c'], 2); // => [['a'], ['b'], ['c'], ['a', 'b'], ['a', 'c'], ['b', 'c']]
 */
export function columnSets(columns: readonly string[], depth: number): string[][] {
  const out: string[][] = [];
  const grow = (start: number, chosen: string[], size: number) => {
    if (chosen.length === size) {
      out.push([...chosen]);
      return;
    }
    for (let i = start; i < columns.length; i++) grow(i + 1, [...chosen, columns[i]], size);
  };
  for (let size = 1; size <= Math.min(depth, columns.length); size++) grow(0, [], size);
  return out;
}

/**
 * The parents of a slice: its conditions with one left out, in the order of the left-out condition;
 * a one-condition slice has one parent, all rows ({}).
 * @example
 * parentKeys({ station: 'S2', lighting: 'dome' }); // => [{ lighting: 'dome' }, { station: 'S2' }]
 */
export function parentKeys(key: Readonly<Record<string, string>>): Record<string, string>[] {
  const entries = Object.entries(key);
  if (entries.length <= 1) return [{}];
  return entries.map((_, i) => Object.fromEntries(entries.filter((__, j) => j !== i)));
}

/**
 * The largest part headroom any slice within `stats` can have (docs/method.md, "The search bound"):
 * headroom_f(C) = share(C) · gap_f(C), and share(C) ≤ share(P); avoidable bias = train − floor ≤ 1 and
 * variance = train_dev − train ≤ 1, so both are at most share(P); mismatch = dev − train_dev ≤ dev(C),
 * and variance without train_dev = dev − train ≤ dev(C), so share(C) · dev(C) = C's weighted dev errors
 * / all dev weight ≤ P's. The bound is the largest of these.
 * @example
 * headroomBound(stats, 20000, true); // => the slice's dev weight / 20000
 */
export function headroomBound(stats: SliceStats, devTotal: number, trainDev: boolean): number {
  if (!(devTotal > 0)) return 0;
  const dev = stats.splits.dev;
  const share = (dev?.weight ?? 0) / devTotal;
  const devErrors = (dev?.errors ?? 0) / devTotal;
  // bias is bounded by share whether or not the data has train_dev rows
  return Math.max(share, trainDev ? share : devErrors, devErrors);
}

/** A conjunction as (column index, code) pairs; null when a value is not in the cells. */
function codesOf(cells: CellTable, key: Readonly<Record<string, string>>): [number, number][] | null {
  const out: [number, number][] = [];
  for (const [name, value] of Object.entries(key)) {
    const c = cells.columns.indexOf(name);
    const code = c < 0 ? -1 : cells.dicts[c].indexOf(value);
    if (code < 0) return null;
    out.push([c, code]);
  }
  return out;
}

/**
 * The cells that serve the columns `set` (every cell of a full cross; else the cells of that grouping
 * set) of run `run`, as a mask over the cell table; null when the cells hold no such set.
 */
function servingMask(cells: CellTable, set: readonly string[], run: string | null): Uint8Array | null {
  const n = cells.size;
  const mask = new Uint8Array(n).fill(1);
  const cols = cellColumns(cells);
  if (run !== null) {
    const code = cells.runs.indexOf(run);
    for (let i = 0; i < n; i++) if (cols.run[i] !== code) mask[i] = 0;
  }
  if (!cells.cross) {
    const want = set.map((s) => cells.columns.indexOf(s)).sort((a, b) => a - b).join(',');
    const id = cells.sets.findIndex((s) => s.join(',') === want);
    if (id < 0) return null;
    const gset = cells.table.column('gset') as unknown as Int32Array;
    for (let i = 0; i < n; i++) if (gset[i] !== id) mask[i] = 0;
  }
  return mask;
}

function matches(codes: readonly Int32Array[], i: number, conj: readonly [number, number][]): boolean {
  for (const [c, code] of conj) if (codes[c][i] !== code) return false;
  return true;
}

/**
 * The rows of slice `key` outside every slice of `within` (each within it), rolled up by `rollup`
 * from cells that serve all their columns; null when no cells do (grouping sets without one set that
 * holds them all).
 */
export function outsideCells(cells: CellTable, key: Readonly<Record<string, string>>, within: readonly Readonly<Record<string, string>>[], run: string | null): CellTable | null {
  const columns = [...new Set([...Object.keys(key), ...within.flatMap((w) => Object.keys(w))])];
  const mask = servingMask(cells, columns, run);
  const conj = codesOf(cells, key);
  if (!mask || !conj) return null;
  const inner = within.map((w) => codesOf(cells, w)).filter((w): w is [number, number][] => w !== null);
  const { codes } = cellColumns(cells);
  for (let i = 0; i < cells.size; i++) {
    if (!mask[i]) continue;
    if (!matches(codes, i, conj) || inner.some((w) => matches(codes, i, w))) mask[i] = 0;
  }
  const table = cells.table.assign({ fg_in: mask }).filter((d: { fg_in: number }) => d.fg_in === 1).reify();
  return { ...cells, table, size: table.numRows(), cross: true };
}

/**
 * The dev weight of the rows both conjunctions select, as a share of `a`'s dev weight: 0 when they
 * name different values of one column, null when the cells hold no grouping set with all their columns.
 * @example
 * overlapShare(cells, { station: 'S2' }, { lighting: 'dome' }, null); // => the share of S2's dev weight under dome light
 */
export function overlapShare(cells: CellTable, a: Readonly<Record<string, string>>, b: Readonly<Record<string, string>>, run: string | null): number | null {
  for (const [k, v] of Object.entries(b)) if (k in a && a[k] !== v) return 0;
  const both = { ...a, ...b };
  const mask = servingMask(cells, Object.keys(both), run);
  const ca = codesOf(cells, a);
  const cb = codesOf(cells, both);
  if (!mask || !ca || !cb) return null;
  const { codes, split, sums } = cellColumns(cells);
  const DEV = SPLITS.indexOf('dev');
  let wa = 0;
  let wb = 0;
  for (let i = 0; i < cells.size; i++) {
    if (!mask[i] || split[i] !== DEV || !matches(codes, i, ca)) continue;
    wa += sums.weight[i];
    if (matches(codes, i, cb)) wb += sums.weight[i];
  }
  return wa > 0 ? wb / wa : null;
}
