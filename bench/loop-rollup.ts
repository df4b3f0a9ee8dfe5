/**
 * The previous cells → slices roll-up, kept only as the benchmark's reference (bench/run.ts compares
 * the arquero roll-up of src/slices/rollup.ts with it): one loop over the cells' integer-coded keys
 * into typed-array accumulators, as the roll-up was written before it became an arquero
 * groupby/rollup. It reads the columns of the arquero cell table through `cellColumns` and returns
 * the same `SliceStats[]` as `rollupSlices` (and the same map as `rollupByRun`), for a full cross and
 * for grouping sets. Nothing in src/ imports it, and floorgap never runs it.
 */
import { auditFromFields, cellColumns, type CellColumns, type CellTable } from '../src/cells/cell-table.js';
import type { AuditSums } from '../src/core/cell.js';
import { SPLITS, type Split } from '../src/core/split.js';
import type { FloorPart, SliceStats, SplitSums } from '../src/slices/rollup.js';

const SUM_FIELDS = 7; // rows, weight, weightSq, errors, floorSum, costSum, costWeight
const TRAIN = SPLITS.indexOf('train');
const DEV = SPLITS.indexOf('dev');

/** Per table: its columns, the smallest and largest floor entry, and each cell's grouping set as a bit mask. */
interface Prepared {
  readonly c: CellColumns;
  readonly entryMin: number;
  readonly entryMax: number;
  /** bit k set when the cell groups column k; null for a full cross */
  readonly masks: Int32Array | null;
}

const prepared = new WeakMap<CellTable, Prepared>();

function prepare(cells: CellTable): Prepared {
  let p = prepared.get(cells);
  if (p) return p;
  const c = cellColumns(cells);
  let entryMin = -1;
  let entryMax = -1;
  for (let i = 0; i < cells.size; i++) {
    const e = c.floorEntry[i];
    if (e < entryMin) entryMin = e;
    if (e > entryMax) entryMax = e;
  }
  let masks: Int32Array | null = null;
  if (!cells.cross) {
    if (c.codes.length > 30) throw new Error('loop roll-up: grouping sets of more than 30 columns');
    masks = new Int32Array(cells.size);
    for (let k = 0; k < c.codes.length; k++) {
      const codes = c.codes[k];
      for (let i = 0; i < cells.size; i++) if (codes[i] >= 0) masks[i] |= 1 << k;
    }
  }
  p = { c, entryMin, entryMax, masks };
  prepared.set(cells, p);
  return p;
}

/**
 * The loop: the cells serving `by` (of run code `runCode` when ≥ 0), keyed by the `by` columns and,
 * when `byRun`, the run too. Returns run code → slices (−1 without the run in the key), slices and runs
 * in the order their first cell appears.
 */
function loop(cells: CellTable, by: readonly string[], runCode: number, byRun: boolean): Map<number, SliceStats[]> {
  const out = new Map<number, SliceStats[]>();
  if (cells.size === 0 || by.some((b) => !cells.columns.includes(b))) return out;
  const { c, entryMin, entryMax, masks } = prepare(cells);
  const byIdx = by.map((b) => cells.columns.indexOf(b));
  // the cells that serve the grouping: all of a cross; else those whose set is `by`'s (for [], cell 0's)
  let wantMask = -1;
  if (masks) wantMask = by.length > 0 ? byIdx.reduce((m, k) => m | (1 << k), 0) : masks[0];
  const n = cells.size;
  const use = new Int32Array(n);
  let m = 0;
  const run = c.run;
  for (let i = 0; i < n; i++) {
    if (runCode >= 0 && run[i] !== runCode) continue;
    if (masks && masks[i] !== wantMask) continue;
    use[m++] = i;
  }
  if (m === 0) return out;
  // the key of a cell: its codes of the `by` columns (and its run + 1), radix-composed
  const keyCodes: ArrayLike<number>[] = byIdx.map((k) => c.codes[k]);
  const sizes = byIdx.map((k) => Math.max(1, cells.dicts[k].length));
  let runShift: Int32Array | null = null;
  if (byRun) {
    runShift = new Int32Array(n);
    for (let i = 0; i < n; i++) runShift[i] = run[i] + 1;
    keyCodes.unshift(runShift);
    sizes.unshift(cells.runs.length + 1);
  }
  let span = 1;
  for (const s of sizes) span *= s;
  const slotOf = new Int32Array(m);
  const slotCell: number[] = [];
  const keyOf = (i: number) => {
    let key = 0;
    for (let b = keyCodes.length - 1; b >= 0; b--) key = key * sizes[b] + keyCodes[b][i];
    return key;
  };
  if (span <= 1 << 22) {
    const dense = new Int32Array(span).fill(-1);
    for (let j = 0; j < m; j++) {
      const i = use[j];
      const key = keyOf(i);
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
    const exact = span <= 2 ** 52;
    for (let j = 0; j < m; j++) {
      const i = use[j];
      const key = exact ? keyOf(i) : keyCodes.map((codes) => codes[i]).join(',');
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
  const audit = c.audit;
  const fieldCount = audit ? audit.fields.length : 0;
  const auditSums = audit ? new Float64Array(slots * fieldCount) : null;
  // floor parts: per slot, split (train or dev) and floor entry, dense while the entries are few
  const width = entryMax - entryMin + 1;
  const partCount = slots * 2 * width;
  if (partCount > 1 << 24) throw new Error('loop roll-up: too many floor entries for the dense parts');
  const pWeight = new Float64Array(partCount);
  const pFloorSum = new Float64Array(partCount);
  const pN = new Float64Array(partCount);
  const pSeen = new Uint8Array(partCount);
  // the table's arrays in locals: the loop below is the roll-up's whole cost
  const { split, floorEntry, floorN } = c;
  const { rows, weight, weightSq, errors, floorSum, costSum, costWeight } = c.sums;
  const fields = audit ? audit.fields : [];
  const audited = audit ? audit.fields[0] : null;
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
    // only cells that hold audited rows carry audit sums (as in the arquero roll-up)
    if (auditSums && audited![i] > 0) {
      const ab = slot * fieldCount;
      for (let k = 0; k < fieldCount; k++) auditSums[ab + k] += fields[k][i];
    }
    if (sp === TRAIN || sp === DEV) {
      const p = (slot * 2 + (sp === DEV ? 1 : 0)) * width + floorEntry[i] - entryMin;
      pSeen[p] = 1;
      pWeight[p] += weight[i];
      pFloorSum[p] += floorSum[i];
      if (floorN[i] > pN[p]) pN[p] = floorN[i];
    }
  }
  const floorParts: FloorPart[][] = Array.from({ length: slots }, () => []);
  const devFloorParts: FloorPart[][] = Array.from({ length: slots }, () => []);
  for (let p = 0; p < partCount; p++) {
    if (!pSeen[p]) continue;
    const slot = Math.floor(p / (2 * width));
    const dev = Math.floor(p / width) % 2 === 1;
    (dev ? devFloorParts : floorParts)[slot].push({ entry: (p % width) + entryMin, weight: pWeight[p], floorSum: pFloorSum[p], n: pN[p] > 0 ? pN[p] : null });
  }
  for (let slot = 0; slot < slots; slot++) {
    const first = slotCell[slot];
    const key: Record<string, string> = {};
    for (let b = 0; b < by.length; b++) key[by[b]] = cells.dicts[byIdx[b]][c.codes[byIdx[b]][first]];
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
    const a = auditSums ? auditFromFields((f) => auditSums[slot * fieldCount + f], audit!.annotators, audit!.classes) : null;
    const r = byRun ? c.run[first] : -1;
    const list = out.get(r) ?? [];
    list.push({ key, splits, floorParts: floorParts[slot], devFloorParts: devFloorParts[slot], audit: a });
    out.set(r, list);
  }
  return out;
}

/**
 * The loop's `rollupSlices`: slices keyed by the `by` columns (`by` = [] gives the overall slice), of
 * one run when `run` is given.
 * @example
 * loopRollupSlices(cells, ['station']); // => the same SliceStats[] as rollupSlices(cells, ['station'])
 */
export function loopRollupSlices(cells: CellTable, by: readonly string[], run: string | null = null): SliceStats[] {
  const code = run === null ? -1 : cells.runs.indexOf(run);
  if (run !== null && code < 0) return [];
  return loop(cells, by, code, false).get(-1) ?? [];
}

/**
 * The loop's `rollupByRun`: run name → the slices of that run, from one loop with the run in the key.
 * @example
 * loopRollupByRun(cells, ['lighting']).get('r4'); // => the same train and dev sums as rollupByRun(cells, ['lighting']).get('r4')
 */
export function loopRollupByRun(cells: CellTable, by: readonly string[]): Map<string, SliceStats[]> {
  const result = new Map<string, SliceStats[]>();
  // a learning curve reads train and dev rows, weights and errors only (rollupByRun's contract)
  const curve = (s: SliceStats): SliceStats => {
    const splits: Partial<Record<Split, SplitSums>> = {};
    for (const sp of ['train', 'dev'] as const) {
      const t = s.splits[sp];
      if (t) splits[sp] = { rows: t.rows, weight: t.weight, weightSq: t.weightSq, errors: t.errors, floorSum: 0, costSum: 0, costWeight: 0 };
    }
    return { key: s.key, splits, floorParts: [], devFloorParts: [], audit: null };
  };
  for (const [code, slices] of loop(cells, by, -1, true)) {
    if (code >= 0) result.set(cells.runs[code], slices.map(curve).filter((s) => Object.keys(s.splits).length > 0));
  }
  return result;
}

/**
 * Where two lists of slices differ: keys and their order, splits, every sum (to `tol` relative), floor
 * parts and audit sums. Empty when they are the same.
 */
export function sliceDifferences(a: readonly SliceStats[], b: readonly SliceStats[], tol = 1e-9): string[] {
  const out: string[] = [];
  const close = (x: number | null, y: number | null) => (x === null || y === null ? x === y : Math.abs(x - y) <= tol * Math.max(1, Math.abs(x), Math.abs(y)));
  const id = (s: SliceStats) => JSON.stringify(Object.entries(s.key));
  if (a.length !== b.length) out.push(`${a.length} slices against ${b.length}`);
  for (let i = 0; i < Math.min(a.length, b.length) && out.length < 5; i++) {
    const [x, y] = [a[i], b[i]];
    const name = id(x);
    if (name !== id(y)) {
      out.push(`slice ${i}: ${name} against ${id(y)}`);
      continue;
    }
    const splits = new Set([...Object.keys(x.splits), ...Object.keys(y.splits)]) as Set<Split>;
    for (const sp of splits) {
      const [p, q] = [x.splits[sp], y.splits[sp]];
      if (!p || !q) out.push(`${name}: split ${sp} in one only`);
      else for (const f of Object.keys(p) as (keyof SplitSums)[]) if (!close(p[f], q[f])) out.push(`${name} ${sp}: ${f} ${p[f]} against ${q[f]}`);
    }
    for (const parts of ['floorParts', 'devFloorParts'] as const) {
      const [p, q] = [x[parts], y[parts]];
      if (p.length !== q.length) out.push(`${name}: ${p.length} ${parts} against ${q.length}`);
      else p.forEach((part, k) => {
        const o = q[k];
        if (part.entry !== o.entry || !close(part.weight, o.weight) || !close(part.floorSum, o.floorSum) || !close(part.n, o.n)) out.push(`${name}: ${parts}[${k}] ${JSON.stringify(part)} against ${JSON.stringify(o)}`);
      });
    }
    const [u, v] = [x.audit, y.audit];
    if ((u === null) !== (v === null)) out.push(`${name}: audit sums in one only`);
    else if (u && v) {
      const flat = (s: AuditSums) => [s.audited, s.panelRows, s.panelErrors, s.agreeSum, ...s.annRows, ...s.annErrors, ...s.classCounts.flat()];
      const [fu, fv] = [flat(u), flat(v)];
      if (fu.length !== fv.length || fu.some((z, k) => !close(z, fv[k]))) out.push(`${name}: audit sums ${JSON.stringify(fu)} against ${JSON.stringify(fv)}`);
    }
  }
  return out.slice(0, 5);
}
