/**
 * Cells → slices: every roll-up is an arquero `groupby(…).rollup(…)` over the integer-coded cell table
 * (cells/cell-table.ts). Keys are decoded only for the slices that come out. Three roll-ups make a
 * slice's sufficient statistics: the sums per split, the floor parts (train and dev weight per floor
 * entry) and, only over cells that hold audited rows, the annotator sums.
 */
import * as aq from 'arquero';
import { auditColumn, auditFieldCount, auditFromFields, keyColumn, servingCells, SUM_COLUMNS, type CellTable, type SumColumn } from '../cells/cell-table.js';
import type { AuditSums } from '../core/cell.js';
import { SPLITS, type Split } from '../core/split.js';

const { op } = aq;
type ColumnTable = ReturnType<typeof aq.table>;

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
  /** per floor entry (ascending), over the slice's train rows */
  readonly floorParts: readonly FloorPart[];
  /** per floor entry (ascending), over the slice's dev rows (for the floor's source when train has none) */
  readonly devFloorParts: readonly FloorPart[];
  /** annotator audit sums over every split of the slice, or null without annotators */
  readonly audit: AuditSums | null;
}

const TRAIN = SPLITS.indexOf('train');
const DEV = SPLITS.indexOf('dev');

/** A slice of the result being assembled. */
interface Slot {
  readonly key: Record<string, string>;
  readonly splits: Partial<Record<Split, SplitSums>>;
  readonly floorParts: FloorPart[];
  readonly devFloorParts: FloorPart[];
  audit: AuditSums | null;
}

type Row = Record<string, number>;
/** The sums of an arquero roll-up: output name → aggregate. */
type Sums = Record<string, ReturnType<typeof op.sum>>;

/** What a roll-up needs to know of a cell table once: which sums carry information, the floor entries. */
interface TableFacts {
  /** some cell's weight differs from its rows (or Σw² from Σw): weights were given */
  readonly weighted: boolean;
  /** some cell carries a labelling cost */
  readonly costs: boolean;
  /** the largest floor entry (−1: the default floor only) */
  readonly maxEntry: number;
  /** per floor entry, the rows behind its human estimate (0: none) */
  readonly entryN: ReadonlyMap<number, number>;
}

const FACTS = new WeakMap<CellTable, TableFacts>();

/** The facts of a cell table, read once from its typed columns (a cell table never changes). */
function factsOf(cells: CellTable): TableFacts {
  const known = FACTS.get(cells);
  if (known) return known;
  const col = (name: string) => cells.table.column(name) as unknown as ArrayLike<number>;
  const rows = col('rows');
  const weight = col('weight');
  const weightSq = col('weightSq');
  const costSum = col('costSum');
  const costWeight = col('costWeight');
  const entry = col('floorEntry');
  const floorN = col('floorN');
  let weighted = false;
  let costs = false;
  let maxEntry = -1;
  const entryN = new Map<number, number>();
  for (let i = 0; i < cells.size; i++) {
    if (weight[i] !== rows[i] || weightSq[i] !== rows[i]) weighted = true;
    if (costSum[i] !== 0 || costWeight[i] !== 0) costs = true;
    if (entry[i] > maxEntry) maxEntry = entry[i];
    // an entry's n is the same in every cell (0: none); the largest is kept, as a max would
    if (!(floorN[i] <= (entryN.get(entry[i]) ?? -1))) entryN.set(entry[i], floorN[i]);
  }
  const facts = { weighted, costs, maxEntry, entryN };
  FACTS.set(cells, facts);
  return facts;
}

/**
 * The sums a roll-up adds up: without weights a cell's weight and Σw² equal its rows, and without a
 * cost table its cost sums are 0, so those are not added again.
 */
function sumsOf(facts: TableFacts, columns: readonly SumColumn[]): Sums {
  const skip = new Set<SumColumn>([...(facts.weighted ? [] : (['weight', 'weightSq'] as const)), ...(facts.costs ? [] : (['costSum', 'costWeight'] as const))]);
  return Object.fromEntries(columns.filter((c) => !skip.has(c)).map((c) => [c, op.sum(c)]));
}

/** A sum of a roll-up row, with those {@link sumsOf} left out restored. */
function sumOf(r: Row, name: SumColumn, facts: TableFacts): number {
  if (!facts.weighted && (name === 'weight' || name === 'weightSq')) return r.rows;
  if (!facts.costs && (name === 'costSum' || name === 'costWeight')) return 0;
  return r[name];
}

/**
 * One integer per cell for grouping: the codes of `by`'s columns and then the `extra` columns
 * (each with its number of values), as the digits of a mixed-radix number. Grouping by one number
 * is several times faster in arquero than grouping by several columns, whose keys it joins into a
 * string per cell. Null when the number could exceed 2^53 (then the columns are grouped as they are).
 */
function compositeKey(
  cells: CellTable,
  idx: readonly number[],
  extra: readonly { readonly column: string; readonly size: number; readonly offset: number }[],
): { readonly expr: string; readonly radix: readonly number[] } | null {
  const digits = [...idx.map((c) => ({ column: keyColumn(c), size: Math.max(1, cells.dicts[c].length), offset: 0 })), ...extra];
  let range = 1;
  for (const d of digits) range *= d.size;
  if (!(range <= Number.MAX_SAFE_INTEGER)) return null;
  let expr = '0';
  for (const d of digits) expr = `(${expr}) * ${d.size} + (d.${d.column}${d.offset ? ` + ${d.offset}` : ''})`;
  return { expr, radix: digits.map((d) => d.size) };
}

/** The digits of a composite key, first digit first. */
function digitsOf(g: number, radix: readonly number[]): number[] {
  const out = new Array<number>(radix.length);
  for (let i = radix.length - 1; i >= 0; i--) {
    out[i] = g % radix[i];
    g = (g - out[i]) / radix[i];
  }
  return out;
}

/**
 * Groups `t` by `by`'s codes and the `extra` columns and adds up `sums`: one arquero
 * `groupby(…).rollup(…)`, on a composite key when it fits. Each result row carries the codes as
 * `c0 …` (by's columns, then the extras, offsets removed) and the sums.
 */
function groupSums(
  cells: CellTable,
  t: ColumnTable,
  idx: readonly number[],
  extra: readonly { readonly column: string; readonly size: number; readonly offset: number }[],
  sums: Sums,
): Row[] {
  const key = compositeKey(cells, idx, extra);
  const names = [...idx.map(keyColumn), ...extra.map((e) => e.column)];
  const offsets = [...idx.map(() => 0), ...extra.map((e) => e.offset)];
  if (!key) {
    const rows = t.groupby(...names).rollup(sums).objects() as Row[];
    return rows.map((r) => ({ ...r, ...Object.fromEntries(names.map((n, i) => [`c${i}`, r[n]])) }));
  }
  const rows = t.derive({ fg_key: key.expr }).groupby('fg_key').rollup(sums).objects() as Row[];
  for (const r of rows) digitsOf(r.fg_key, key.radix).forEach((v, i) => (r[`c${i}`] = v - offsets[i]));
  return rows;
}

/**
 * Rolls up the cells of `t` (already selected for the grouping) by the `by` columns: per slice its
 * sums per split and its floor parts, from one roll-up by slice, split and floor entry, and, over the
 * cells that hold audited rows only, its annotator sums. Slices come in the order their first cell
 * appears.
 */
/** A new slice for a roll-up row: its key decoded from the row's codes `c0 …`, no sums yet. */
function emptySlot(cells: CellTable, idx: readonly number[], by: readonly string[], r: Row): Slot {
  const key: Record<string, string> = {};
  idx.forEach((c, b) => (key[by[b]] = cells.dicts[c][r[`c${b}`]]));
  return { key, splits: {}, floorParts: [], devFloorParts: [], audit: null };
}

function rollup(cells: CellTable, t: ColumnTable, by: readonly string[]): Slot[] {
  const idx = by.map((b) => cells.columns.indexOf(b));
  const facts = factsOf(cells);
  const out: Slot[] = [];
  const slots = new Map<string, Slot>();
  const slotOf = (r: Row): Slot => {
    const id = idx.map((_, b) => r[`c${b}`]).join(',');
    let slot = slots.get(id);
    if (!slot) {
      slot = emptySlot(cells, idx, by, r);
      slots.set(id, slot);
      out.push(slot);
    }
    return slot;
  };
  const m = idx.length;
  const extra = [
    { column: 'split', size: SPLITS.length, offset: 0 },
    { column: 'floorEntry', size: facts.maxEntry + 2, offset: 1 },
  ];
  const parts: { slot: Slot; split: number; entry: number; weight: number; floorSum: number }[] = [];
  for (const r of groupSums(cells, t, idx, extra, sumsOf(facts, SUM_COLUMNS))) {
    const slot = slotOf(r);
    const split = SPLITS[r[`c${m}`]];
    const s = (slot.splits[split] ??= { rows: 0, weight: 0, weightSq: 0, errors: 0, floorSum: 0, costSum: 0, costWeight: 0 }) as { -readonly [K in keyof SplitSums]: number };
    for (const name of SUM_COLUMNS) s[name] += sumOf(r, name, facts);
    if (r[`c${m}`] === TRAIN || r[`c${m}`] === DEV) parts.push({ slot, split: r[`c${m}`], entry: r[`c${m + 1}`], weight: sumOf(r, 'weight', facts), floorSum: r.floorSum });
  }
  // floor parts of train and dev rows, per entry (ascending)
  parts.sort((a, b) => a.entry - b.entry);
  for (const p of parts) {
    const n = facts.entryN.get(p.entry) ?? 0;
    (p.split === DEV ? p.slot.devFloorParts : p.slot.floorParts).push({ entry: p.entry, weight: p.weight, floorSum: p.floorSum, n: n > 0 ? n : null });
  }
  if (cells.audit) {
    const { annotators, classes } = cells.audit;
    const fields = auditFieldCount(annotators, classes);
    const zero = auditFromFields(() => 0, annotators, classes);
    for (const slot of out) slot.audit = zero;
    // only cells that hold audited rows carry audit sums: the wide roll-up runs over those alone
    const audited = t.filter((d: Row) => d.a0 > 0);
    if (audited.numRows() > 0) {
      const aSums = Object.fromEntries(Array.from({ length: fields }, (_, f) => [auditColumn(f), op.sum(auditColumn(f))]));
      for (const r of groupSums(cells, audited, idx, [], aSums)) slotOf(r).audit = auditFromFields((f) => r[auditColumn(f)], annotators, classes);
    }
  }
  return out;
}

/**
 * Rolls cells up into slices keyed by the `by` columns (`by` = [] gives the overall slice), from the
 * cells that serve that grouping, of one run when `run` is given.
 * @example
 * rollupSlices(cells, ['station']); // => [{ key: { station: 'S1' }, splits: { train: {...}, dev: {...} }, ... }, ...]
 */
export function rollupSlices(cells: CellTable, by: readonly string[], run: string | null = null): SliceStats[] {
  if (by.some((b) => !cells.columns.includes(b))) return [];
  const t = servingCells(cells, by, run);
  if (!t) return [];
  return rollup(cells, t, by);
}

/**
 * The same slices in every run, for their learning curves: run name → slices, from one roll-up with
 * the run in the key. Each slice carries its train and dev sums only (a curve needs no more: no other
 * split, no floor parts, no audit).
 * @example
 * rollupByRun(cells, ['lighting']).get('r4'); // => the lighting slices of run r4
 */
export function rollupByRun(cells: CellTable, by: readonly string[]): Map<string, SliceStats[]> {
  const result = new Map<string, SliceStats[]>();
  if (by.some((b) => !cells.columns.includes(b))) return result;
  const t = servingCells(cells, by);
  if (!t) return result;
  const idx = by.map((b) => cells.columns.indexOf(b));
  const facts = factsOf(cells);
  const m = idx.length;
  const slots = new Map<string, Slot>();
  const curveSplits = t.params({ train: TRAIN, dev: DEV }).filter((d: Row, $: Row) => (d.split === $.train || d.split === $.dev) && d.run >= 0);
  const extra = [
    { column: 'run', size: Math.max(1, cells.runs.length), offset: 0 },
    { column: 'split', size: SPLITS.length, offset: 0 },
  ];
  for (const r of groupSums(cells, curveSplits, idx, extra, sumsOf(facts, ['rows', 'weight', 'weightSq', 'errors']))) {
    const run = cells.runs[r[`c${m}`]];
    const id = `${r[`c${m}`]}|${idx.map((_, b) => r[`c${b}`]).join(',')}`;
    let slot = slots.get(id);
    if (!slot) {
      slot = emptySlot(cells, idx, by, r);
      slots.set(id, slot);
      const list = result.get(run) ?? [];
      list.push(slot);
      result.set(run, list);
    }
    const weight = sumOf(r, 'weight', facts);
    slot.splits[SPLITS[r[`c${m + 1}`]]] = { rows: r.rows, weight, weightSq: sumOf(r, 'weightSq', facts), errors: r.errors, floorSum: 0, costSum: 0, costWeight: 0 };
  }
  // runs in the order of their codes (sorted names), as a map's iteration order
  return new Map([...result].sort((x, y) => cells.runs.indexOf(x[0]) - cells.runs.indexOf(y[0])));
}
