import { auditFromFields, cellIndicesFor, selectCells, type CellTable } from '../cells/cell-table.js';
import { type AuditSums, type Cell } from '../core/cell.js';
import { SPLITS, type Split } from '../core/split.js';

/** Sums of one split of one slice. */
export interface SplitSums {
  readonly rows: number;
  readonly weight: number;
  readonly weightSq: number;
  readonly errors: number;
  readonly floorSum: number;
  /** Σ w · labelling cost over rows a cost-table entry matched, and Σ w over those rows */
  readonly costSum: number;
  readonly costWeight: number;
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
  /** annotator audit sums over every split of the slice, or null without annotators */
  readonly audit: AuditSums | null;
}

/** Cells as the rollup takes them: Cell objects, or a cell table. */
export type Cells = readonly Cell[] | CellTable;

/** Picks the cells that can serve a grouping: in grouping-sets mode, those of the set equal to `by`. */
export function cellsFor(cells: readonly Cell[], by: readonly string[]): Cell[] {
  if (cells.length === 0) return [];
  const sel = selectCells(cells);
  const picked = cellIndicesFor(sel, by);
  if (sel.index === null && sel.table.size === cells.length) {
    // the selection is the array itself, in order
    return Array.from(picked, (i) => cells[i]);
  }
  // map table indices back to positions in the array
  const position = new Map<number, number>();
  const idx = sel.index ?? Uint32Array.from(cells.keys());
  for (let j = 0; j < idx.length; j++) if (!position.has(idx[j])) position.set(idx[j], j);
  return Array.from(picked, (i) => cells[position.get(i)!]);
}

const SUM_FIELDS = 7; // rows, weight, weightSq, errors, floorSum, costSum, costWeight

const entryRanges = new WeakMap<CellTable, { min: number; max: number }>();

/** The smallest and largest floor entry of the table's cells (-1 is the default floor). */
function entryRange(table: CellTable): { min: number; max: number } {
  let r = entryRanges.get(table);
  if (!r) {
    let min = -1;
    let max = -1;
    for (let i = 0; i < table.size; i++) {
      const e = table.floorEntry[i];
      if (e < min) min = e;
      if (e > max) max = e;
    }
    r = { min, max };
    entryRanges.set(table, r);
  }
  return r;
}

/**
 * Rolls cells up into slices keyed by the `by` columns: a loop over the cells' integer-coded keys into
 * typed-array accumulators (no per-cell objects). `by` = [] gives the overall slice.
 * @example
 * rollupSlices(cells, ['station']); // => [{ key: { station: 'S1' }, splits: { train: {...}, dev: {...} }, ... }, ...]
 */
export function rollupSlices(cells: Cells, by: readonly string[], run: string | null = null): SliceStats[] {
  const sel = selectCells(cells);
  const { table } = sel;
  if (table.size === 0 || by.some((b) => !table.columns.includes(b))) return [];
  const use = cellIndicesFor(sel, by, run);
  const m = use.length;
  if (m === 0) return [];
  const byIdx = by.map((b) => table.columns.indexOf(b));
  const byCodes = byIdx.map((c) => table.codes[c]);
  const sizes = byIdx.map((c) => Math.max(1, table.dicts[c].length));
  // slot of every used cell: composite integer key → first-appearance slot number
  const slotOf = new Int32Array(m);
  const slotCell: number[] = [];
  let radixOk = true;
  let span = 1;
  for (const s of sizes) {
    span *= s;
    if (span > 2 ** 52) radixOk = false;
  }
  if (radixOk && span <= 1 << 22) {
    const dense = new Int32Array(span).fill(-1);
    for (let j = 0; j < m; j++) {
      const i = use[j];
      let key = 0;
      for (let b = byCodes.length - 1; b >= 0; b--) key = key * sizes[b] + byCodes[b][i];
      let slot = dense[key];
      if (slot < 0) {
        slot = slotCell.length;
        dense[key] = slot;
        slotCell.push(i);
      }
      slotOf[j] = slot;
    }
  } else {
    const lookup = new Map<number | string, number>();
    for (let j = 0; j < m; j++) {
      const i = use[j];
      let key: number | string;
      if (radixOk) {
        key = 0;
        for (let b = byCodes.length - 1; b >= 0; b--) key = key * sizes[b] + byCodes[b][i];
      } else {
        key = byCodes.map((codes) => codes[i]).join(',');
      }
      let slot = lookup.get(key);
      if (slot === undefined) {
        slot = slotCell.length;
        lookup.set(key, slot);
        slotCell.push(i);
      }
      slotOf[j] = slot;
    }
  }
  const slots = slotCell.length;
  const sums = new Float64Array(slots * 4 * SUM_FIELDS);
  const present = new Uint8Array(slots * 4);
  const audit = table.audit;
  const auditSums = audit ? new Float64Array(slots * audit.fields.length) : null;
  // floor parts: per slot, split (train or dev) and floor entry; dense while the entries are few
  const entries = entryRange(table);
  const width = entries.max - entries.min + 1;
  const partCount = slots * 2 * width;
  const dense = partCount <= 1 << 22;
  const pWeight = dense ? new Float64Array(partCount) : null;
  const pFloorSum = dense ? new Float64Array(partCount) : null;
  const pN = dense ? new Float64Array(partCount).fill(NaN) : null;
  const pSeen = dense ? new Uint8Array(partCount) : null;
  const sparse = dense ? null : new Map<number, { weight: number; floorSum: number; n: number }>();
  // the table's arrays in locals: the loop below is the rollup's whole cost
  const { split, rows, weight, weightSq, errors, floorSum, costSum, costWeight, floorEntry, floorN } = table;
  for (let j = 0; j < m; j++) {
    const i = use[j];
    const slot = slotOf[j];
    const sp = split[i];
    const base = (slot * 4 + sp) * SUM_FIELDS;
    present[slot * 4 + sp] = 1;
    sums[base] += rows[i];
    sums[base + 1] += weight[i];
    sums[base + 2] += weightSq[i];
    sums[base + 3] += errors[i];
    sums[base + 4] += floorSum[i];
    sums[base + 5] += costSum[i];
    sums[base + 6] += costWeight[i];
    if (auditSums) {
      const f = audit!.fields;
      const ab = slot * f.length;
      for (let k = 0; k < f.length; k++) auditSums[ab + k] += f[k][i];
    }
    if (sp === 0 || sp === 2) {
      const p = (slot * 2 + (sp === 2 ? 1 : 0)) * width + floorEntry[i] - entries.min;
      if (pWeight) {
        pSeen![p] = 1;
        pWeight[p] += weight[i];
        pFloorSum![p] += floorSum[i];
        if (Number.isNaN(pN![p])) pN![p] = floorN[i];
      } else {
        const part = sparse!.get(p) ?? { weight: 0, floorSum: 0, n: NaN };
        part.weight += weight[i];
        part.floorSum += floorSum[i];
        if (Number.isNaN(part.n)) part.n = floorN[i];
        sparse!.set(p, part);
      }
    }
  }
  const floorParts: FloorPart[][] = Array.from({ length: slots }, () => []);
  const devFloorParts: FloorPart[][] = Array.from({ length: slots }, () => []);
  const addPart = (p: number, weight: number, floorSum: number, n: number) => {
    const slot = Math.floor(p / (2 * width));
    const dev = Math.floor(p / width) % 2 === 1;
    const part: FloorPart = { entry: (p % width) + entries.min, weight, floorSum, n: Number.isNaN(n) ? null : n };
    (dev ? devFloorParts : floorParts)[slot].push(part);
  };
  if (pWeight) {
    for (let p = 0; p < partCount; p++) if (pSeen![p]) addPart(p, pWeight[p], pFloorSum![p], pN![p]);
  } else {
    for (const [p, v] of [...sparse!].sort((a, b) => a[0] - b[0])) addPart(p, v.weight, v.floorSum, v.n);
  }
  const out: SliceStats[] = [];
  for (let slot = 0; slot < slots; slot++) {
    const first = slotCell[slot];
    const key: Record<string, string> = {};
    for (let b = 0; b < by.length; b++) key[by[b]] = table.dicts[byIdx[b]][byCodes[b][first]];
    const splits: Partial<Record<Split, SplitSums>> = {};
    for (let sp = 0; sp < 4; sp++) {
      if (!present[slot * 4 + sp]) continue;
      const base = (slot * 4 + sp) * SUM_FIELDS;
      splits[SPLITS[sp]] = {
        rows: sums[base],
        weight: sums[base + 1],
        weightSq: sums[base + 2],
        errors: sums[base + 3],
        floorSum: sums[base + 4],
        costSum: sums[base + 5],
        costWeight: sums[base + 6],
      };
    }
    const a: AuditSums | null = auditSums ? auditFromFields((f) => auditSums[slot * audit!.fields.length + f], audit!.annotators, audit!.classes) : null;
    out.push({ key, splits, floorParts: floorParts[slot], devFloorParts: devFloorParts[slot], audit: a });
  }
  return out;
}
