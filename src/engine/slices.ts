import { op, table } from 'arquero';
import type { Cell, Split } from './types.js';
import { SPLITS } from './types.js';

/** Sums of one split of one slice. */
export interface SplitSums {
  readonly rows: number;
  readonly weight: number;
  readonly weightSq: number;
  readonly errors: number;
  readonly floorSum: number;
}

/** Train weight that took one floor entry, for the floor's effective sample size. */
export interface FloorPart {
  readonly entry: number;
  readonly weight: number;
  readonly floorSum: number;
  readonly n: number | null;
}

/** The sufficient statistics of one slice, rolled up from cells. */
export interface SliceStats {
  readonly key: Readonly<Record<string, string>>;
  readonly splits: Readonly<Partial<Record<Split, SplitSums>>>;
  /** per floor entry, over the slice's train rows */
  readonly floorParts: readonly FloorPart[];
  /** per floor entry, over the slice's dev rows (for the floor's source when train has none) */
  readonly devFloorParts: readonly FloorPart[];
}

/** Picks the cells that can serve a grouping: in grouping-sets mode, those of the set equal to `by`. */
export function cellsFor(cells: readonly Cell[], by: readonly string[]): Cell[] {
  if (cells.length === 0) return [];
  const allKeys = Object.keys(cells[0].key);
  const isCross = cells.every((c) => allKeys.every((k) => c.key[k] !== null));
  if (isCross) return cells as Cell[];
  const want = [...by].sort().join('\u0000');
  const grouped = (c: Cell) => allKeys.filter((k) => c.key[k] !== null).sort().join('\u0000');
  const exact = cells.filter((c) => grouped(c) === want);
  if (exact.length > 0 || by.length > 0) return exact;
  // the overall slice: any one-column set covers every row once
  const first = grouped(cells[0]);
  return cells.filter((c) => grouped(c) === first);
}

/**
 * Rolls cells up into slices keyed by the `by` columns (an arquero groupby/rollup over the cell table).
 * `by` = [] gives the overall slice.
 * @example
 * rollupSlices(cells, ['station']); // => [{ key: { station: 'S1' }, splits: { train: {...}, dev: {...} }, ... }, ...]
 */
export function rollupSlices(cells: readonly Cell[], by: readonly string[]): SliceStats[] {
  const use = cellsFor(cells, by);
  const cols: Record<string, unknown[]> = {};
  by.forEach((b, i) => (cols[`k${i}`] = use.map((c) => c.key[b])));
  cols.split = use.map((c) => c.split);
  cols.entry = use.map((c) => c.floorEntry);
  cols.floorN = use.map((c) => c.floorN);
  cols.rows = use.map((c) => c.rows);
  cols.weight = use.map((c) => c.weight);
  cols.weightSq = use.map((c) => c.weightSq);
  cols.errors = use.map((c) => c.errors);
  cols.floorSum = use.map((c) => c.floorSum);
  const keyCols = by.map((_, i) => `k${i}`);
  const rolled = table(cols)
    .groupby(...keyCols, 'split', 'entry')
    .rollup({
      floorN: op.any('floorN'),
      rows: op.sum('rows'),
      weight: op.sum('weight'),
      weightSq: op.sum('weightSq'),
      errors: op.sum('errors'),
      floorSum: op.sum('floorSum'),
    })
    .objects() as Record<string, unknown>[];

  type Acc = { key: Record<string, string>; splits: Partial<Record<Split, SplitSums>>; floorParts: FloorPart[]; devFloorParts: FloorPart[] };
  const slices = new Map<string, Acc>();
  for (const r of rolled) {
    const key: Record<string, string> = {};
    by.forEach((b, i) => (key[b] = String(r[`k${i}`])));
    const id = keyCols.map((k) => String(r[k])).join('\u0000');
    let acc = slices.get(id);
    if (!acc) {
      acc = { key, splits: {}, floorParts: [], devFloorParts: [] };
      slices.set(id, acc);
    }
    const split = r.split as Split;
    const prev = acc.splits[split];
    const rows = Number(r.rows);
    const weight = Number(r.weight);
    const weightSq = Number(r.weightSq);
    const errors = Number(r.errors);
    const floorSum = Number(r.floorSum);
    acc.splits[split] = prev
      ? { rows: prev.rows + rows, weight: prev.weight + weight, weightSq: prev.weightSq + weightSq, errors: prev.errors + errors, floorSum: prev.floorSum + floorSum }
      : { rows, weight, weightSq, errors, floorSum };
    const part = { entry: Number(r.entry), weight, floorSum, n: r.floorN === null || r.floorN === undefined ? null : Number(r.floorN) };
    if (split === 'train') acc.floorParts.push(part);
    if (split === 'dev') acc.devFloorParts.push(part);
  }
  const out = [...slices.values()];
  for (const s of out) for (const sp of SPLITS) if (!s.splits[sp]) delete s.splits[sp];
  return out;
}
