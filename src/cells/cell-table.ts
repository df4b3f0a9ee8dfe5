/**
 * Cells as an arquero table: one row per cell, slice-column values integer-coded (one dictionary per
 * column, decoded only for the slices a roll-up returns), the split, run and floor entry as integer
 * columns, every sufficient statistic as a Float64 column. The one representation of cells from the
 * scan (or a cells file, or the cache) to the roll-up (slices/rollup.ts).
 */
import * as aq from 'arquero';
import type { AuditSums } from '../core/cell.js';
import { SPLITS, type Split } from '../core/split.js';

type ColumnTable = ReturnType<typeof aq.table>;

/** The additive sums of a cell, each a Float64 column of the table. */
export const SUM_COLUMNS = ['rows', 'weight', 'weightSq', 'errors', 'floorSum', 'costSum', 'costWeight'] as const;
export type SumColumn = (typeof SUM_COLUMNS)[number];

/** The table column holding the codes of slice column `c`. */
export const keyColumn = (c: number): string => `k${c}`;
/** The table column holding audit field `f` (see {@link auditFieldCount} for the order). */
export const auditColumn = (f: number): string => `a${f}`;

/** Number of audit fields for a shape: audited, panel rows, panel errors, agreement sum, then per annotator rows, errors and one count per class. */
export function auditFieldCount(annotators: number, classes: number): number {
  return 4 + annotators * (2 + classes);
}

/**
 * Audit sums from their flat fields in the order of {@link auditFieldCount}, read through `get`.
 * @example
 * auditFromFields((f) => row[auditColumn(f)], 3, 6).annRows.length; // => 3
 */
export function auditFromFields(get: (f: number) => number, annotators: number, classes: number): AuditSums {
  const annRows: number[] = [];
  const annErrors: number[] = [];
  const classCounts: number[][] = [];
  for (let j = 0; j < annotators; j++) {
    const base = 4 + j * (2 + classes);
    annRows.push(get(base));
    annErrors.push(get(base + 1));
    classCounts.push(Array.from({ length: classes }, (_, k) => get(base + 2 + k)));
  }
  return { audited: get(0), panelRows: get(1), panelErrors: get(2), agreeSum: get(3), annRows, annErrors, classCounts };
}

/** The shape of the audit sums the cells carry. */
export interface AuditShape {
  readonly annotators: number;
  /** classes counted per annotator, the last one being "any other class" */
  readonly classes: number;
}

/**
 * Cells. `table` columns: `k0 … k{m−1}` (Int32 codes into `dicts`, −1 where the cell's grouping set
 * leaves the column out), `split` (Int32 index into SPLITS), `run` (Int32 index into `runs`, −1 without
 * a run column), `gset` (Int32 index into `sets`: the columns the cell groups), the {@link SUM_COLUMNS},
 * `floorEntry` (Int32, −1 for the default floor), `floorN` (Float64: rows behind the entry's human
 * estimate, 0 when the entry gave none) and, with annotators, `a0 …` (the audit sums).
 */
export interface CellTable {
  readonly table: ColumnTable;
  readonly size: number;
  /** the slice columns, in key order */
  readonly columns: readonly string[];
  /** per slice column, the values its codes stand for */
  readonly dicts: readonly (readonly string[])[];
  /** the runs the codes of `run` stand for, sorted */
  readonly runs: readonly string[];
  readonly audit: AuditShape | null;
  /** the grouping sets the cells hold (column indices, ascending), in order of first appearance */
  readonly sets: readonly (readonly number[])[];
  /** true when no cell leaves a column out (a full cross, not grouping sets) */
  readonly cross: boolean;
}

/** Cells in plain typed columns, as a scan, a cells file or the cache gives them. */
export interface CellColumns {
  readonly columns: readonly string[];
  readonly dicts: readonly (readonly string[])[];
  /** per column, each cell's code (−1: left out by its grouping set) */
  readonly codes: readonly Int32Array[];
  /** index into SPLITS */
  readonly split: Int32Array;
  /** the run dictionary, sorted */
  readonly runs: readonly string[];
  /** index into runs, −1 without a run column */
  readonly run: Int32Array;
  readonly sums: Readonly<Record<SumColumn, Float64Array>>;
  readonly floorEntry: Int32Array;
  /** 0 where the entry gave no n */
  readonly floorN: Float64Array;
  readonly audit: (AuditShape & { readonly fields: readonly Float64Array[] }) | null;
}

/**
 * Builds the arquero cell table. The arrays are used as they are (not copied). Cells hold no NaN or
 * null: arquero's sums skip them, so they are refused here (a cells file's values are checked before).
 * @throws Error for arrays of different lengths or a NaN sum (an internal fault)
 * @example
 * cellTable({ columns: ['station'], dicts: [['S1']], codes: [Int32Array.of(0)], split: Int32Array.of(0), runs: [], run: Int32Array.of(-1), sums, floorEntry: Int32Array.of(-1), floorN: Float64Array.of(0), audit: null }).size; // => 1
 */
export function cellTable(c: CellColumns): CellTable {
  const n = c.split.length;
  const same = (a: ArrayLike<number>, what: string) => {
    if (a.length !== n) throw new Error(`cell table: ${what} has ${a.length} cells, split has ${n}`);
  };
  c.codes.forEach((a, i) => same(a, `column ${i}`));
  same(c.run, 'run');
  same(c.floorEntry, 'floorEntry');
  same(c.floorN, 'floorN');
  // the grouping set of each cell: the columns it does not leave out
  const gset = new Int32Array(n);
  const sets: number[][] = [];
  const setIds = new Map<string, number>();
  let cross = true;
  for (let i = 0; i < n; i++) {
    let signature = '';
    let grouped = 0;
    for (let k = 0; k < c.codes.length; k++) {
      if (c.codes[k][i] >= 0) {
        signature += `${k},`;
        grouped++;
      }
    }
    if (grouped !== c.codes.length) cross = false;
    let id = setIds.get(signature);
    if (id === undefined) {
      id = sets.length;
      sets.push(c.codes.map((_, k) => k).filter((k) => c.codes[k][i] >= 0));
      setIds.set(signature, id);
    }
    gset[i] = id;
  }
  const data: Record<string, ArrayLike<number>> = { split: c.split, run: c.run, gset };
  c.codes.forEach((a, k) => (data[keyColumn(k)] = a));
  for (const s of SUM_COLUMNS) {
    const a = c.sums[s];
    same(a, s);
    for (let i = 0; i < n; i++) if (Number.isNaN(a[i])) throw new Error(`cell table: ${s} of cell ${i} is NaN`);
    data[s] = a;
  }
  data.floorEntry = c.floorEntry;
  data.floorN = c.floorN;
  if (c.audit) {
    if (c.audit.fields.length !== auditFieldCount(c.audit.annotators, c.audit.classes)) throw new Error('cell table: audit fields do not match the audit shape');
    c.audit.fields.forEach((a, f) => {
      same(a, `audit field ${f}`);
      data[auditColumn(f)] = a;
    });
  }
  return {
    table: aq.table(data),
    size: n,
    columns: [...c.columns],
    dicts: c.dicts.map((d) => [...d]),
    runs: [...c.runs],
    audit: c.audit ? { annotators: c.audit.annotators, classes: c.audit.classes } : null,
    sets,
    cross,
  };
}

/** A typed column of an unfiltered cell table (the arrays it was built from). */
function column<T extends Int32Array | Float64Array = Float64Array>(cells: CellTable, name: string): T {
  return cells.table.column(name) as unknown as T;
}

/** The cells back as plain typed columns (for the cache, and for re-coding in {@link mergeCells}). */
export function cellColumns(cells: CellTable): CellColumns {
  const sums = Object.fromEntries(SUM_COLUMNS.map((s) => [s, column(cells, s)])) as Record<SumColumn, Float64Array>;
  return {
    columns: cells.columns,
    dicts: cells.dicts,
    codes: cells.columns.map((_, k) => column<Int32Array>(cells, keyColumn(k))),
    split: column<Int32Array>(cells, 'split'),
    runs: cells.runs,
    run: column<Int32Array>(cells, 'run'),
    sums,
    floorEntry: column<Int32Array>(cells, 'floorEntry'),
    floorN: column(cells, 'floorN'),
    audit: cells.audit ? { ...cells.audit, fields: Array.from({ length: auditFieldCount(cells.audit.annotators, cells.audit.classes) }, (_, f) => column(cells, auditColumn(f))) } : null,
  };
}

/**
 * The cells of `a` and then those of `b` (the same slice columns, or a subset of them, and the same
 * audit shape): `b`'s codes are re-coded into dictionaries that extend `a`'s, its runs likewise.
 */
export function mergeCells(a: CellTable, b: CellTable): CellTable {
  const ca = cellColumns(a);
  const cb = cellColumns(b);
  const dicts = ca.dicts.map((d) => [...d]);
  const codes = ca.columns.map((name, k) => {
    const bk = cb.columns.indexOf(name);
    const out = new Int32Array(a.size + b.size);
    out.set(ca.codes[k]);
    if (bk < 0) {
      out.fill(-1, a.size);
      return out;
    }
    const lookup = new Map(dicts[k].map((v, i) => [v, i]));
    const recode = cb.dicts[bk].map((v) => {
      let code = lookup.get(v);
      if (code === undefined) {
        code = dicts[k].length;
        dicts[k].push(v);
        lookup.set(v, code);
      }
      return code;
    });
    const src = cb.codes[bk];
    for (let i = 0; i < b.size; i++) out[a.size + i] = src[i] < 0 ? -1 : recode[src[i]];
    return out;
  });
  const runs = [...new Set([...ca.runs, ...cb.runs])].sort();
  const runOf = (list: readonly string[], code: number) => (code < 0 ? -1 : runs.indexOf(list[code]));
  const run = new Int32Array(a.size + b.size);
  for (let i = 0; i < a.size; i++) run[i] = runOf(ca.runs, ca.run[i]);
  for (let i = 0; i < b.size; i++) run[a.size + i] = runOf(cb.runs, cb.run[i]);
  const join = <T extends Int32Array | Float64Array>(x: T, y: T): T => {
    const out = new (x.constructor as new (n: number) => T)(x.length + y.length);
    out.set(x);
    out.set(y, x.length);
    return out;
  };
  if ((ca.audit === null) !== (cb.audit === null)) throw new Error('mergeCells: one table has audit sums, the other none');
  return cellTable({
    columns: ca.columns,
    dicts,
    codes,
    split: join(ca.split, cb.split),
    runs,
    run,
    sums: Object.fromEntries(SUM_COLUMNS.map((s) => [s, join(ca.sums[s], cb.sums[s])])) as Record<SumColumn, Float64Array>,
    floorEntry: join(ca.floorEntry, cb.floorEntry),
    floorN: join(ca.floorN, cb.floorN),
    audit: ca.audit && cb.audit ? { ...ca.audit, fields: ca.audit.fields.map((f, i) => join(f, cb.audit!.fields[i])) } : null,
  });
}

/** The grouping set (an index into `sets`) whose columns are exactly `by`, or null. */
function groupingSet(cells: CellTable, by: readonly string[]): number | null {
  const want = by.map((name) => cells.columns.indexOf(name));
  if (want.some((c) => c < 0)) return null;
  const key = [...new Set(want)].sort((a, b) => a - b).join(',');
  const id = cells.sets.findIndex((set) => set.join(',') === key);
  return id < 0 ? null : id;
}

/**
 * The cells that serve a grouping, as an arquero table: every cell of a full cross; with grouping
 * sets, those of the set equal to `by` (for `by` = [], the set of the first cell: any one-column set
 * covers every row once). `run` keeps one run's cells. Null when no cell serves it.
 */
export function servingCells(cells: CellTable, by: readonly string[], run: string | null = null): ColumnTable | null {
  let t = cells.table;
  if (cells.size === 0) return null;
  if (run !== null) {
    const code = cells.runs.indexOf(run);
    if (code < 0) return null;
    t = t.params({ code }).filter((d: { run: number }, $: { code: number }) => d.run === $.code);
  }
  if (!cells.cross) {
    const set = by.length > 0 ? groupingSet(cells, by) : (column<Int32Array>(cells, 'gset')[0] ?? null);
    if (set === null) return null;
    t = t.params({ set }).filter((d: { gset: number }, $: { set: number }) => d.gset === $.set);
  }
  return t.numRows() > 0 ? t : null;
}

/** The runs present in the cells (sorted), [] without a run column. */
export function runsOf(cells: CellTable): string[] {
  if (cells.runs.length === 0 || cells.size === 0) return [];
  const present = cells.table
    .filter((d: { run: number }) => d.run >= 0)
    .groupby('run')
    .count()
    .array('run') as number[];
  const codes = new Set(present);
  return cells.runs.filter((_, r) => codes.has(r));
}

/** Per split, the rows and the weight of the cells serving the overall slice. */
export function splitTotals(cells: CellTable): { readonly rows: Record<Split, number>; readonly weight: Record<Split, number> } {
  const rows: Record<Split, number> = { train: 0, train_dev: 0, dev: 0, test: 0 };
  const weight: Record<Split, number> = { train: 0, train_dev: 0, dev: 0, test: 0 };
  const t = servingCells(cells, []);
  if (!t) return { rows, weight };
  for (const r of t.groupby('split').rollup({ rows: aq.op.sum('rows'), weight: aq.op.sum('weight') }).objects() as { split: number; rows: number; weight: number }[]) {
    rows[SPLITS[r.split]] += r.rows;
    weight[SPLITS[r.split]] += r.weight;
  }
  return { rows, weight };
}

/** The floor entries some cell took (−1, the default floor, included when a cell took it). */
export function usedFloorEntries(cells: CellTable): Set<number> {
  if (cells.size === 0) return new Set();
  return new Set(cells.table.groupby('floorEntry').count().array('floorEntry') as number[]);
}

/** The sum of one column over every cell. */
export function total(cells: CellTable, name: SumColumn): number {
  if (cells.size === 0) return 0;
  return cells.table.rollup({ s: aq.op.sum(name) }).get('s', 0) as number;
}

/** True when some cell holds an audited row. */
export function hasAudit(cells: CellTable): boolean {
  if (!cells.audit || cells.size === 0) return false;
  return (cells.table.rollup({ m: aq.op.max(auditColumn(0)) }).get('m', 0) as number) > 0;
}

/**
 * The cells that serve the grouping `by` and lie in the slice `key` (column → value), as a table of
 * their own marked as a cross: its cells all come from one grouping, so any roll-up of them by some of
 * `by`'s columns needs no further selection. For the detail pane's breakdown of a slice.
 */
export function cellsWithin(cells: CellTable, key: Readonly<Record<string, string>>, by: readonly string[]): CellTable {
  const serving = servingCells(cells, by);
  const empty: CellTable = { ...cells, table: cells.table.filter(() => false).reify(), size: 0, cross: true };
  if (!serving) return empty;
  let t = serving;
  for (const [name, value] of Object.entries(key)) {
    const c = cells.columns.indexOf(name);
    const code = c < 0 ? -1 : cells.dicts[c].indexOf(value);
    if (code < 0) return empty;
    const k = keyColumn(c);
    t = t.params({ code }).filter(aq.escape((d: Record<string, number>) => d[k] === code));
  }
  const within = t.reify();
  return { ...cells, table: within, size: within.numRows(), cross: true };
}
