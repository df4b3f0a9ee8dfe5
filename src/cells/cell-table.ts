/**
 * Cells in columns: slice-column values encoded as small integers (one dictionary per column) and
 * every sufficient statistic in a typed array. Rolling cells up into slices is then a loop over
 * integer keys (see slices/rollup.ts), and the cells cost a few dozen bytes each however many there are.
 */
import { SPLITS, type AuditSums, type Cell, type Split } from '../core/cell.js';

/** Audit sums in columns: `fields[f][i]` is field f of cell i (see {@link auditFieldCount} for the order). */
export interface AuditColumns {
  readonly annotators: number;
  /** classes counted per annotator, the last one being "any other class" */
  readonly classes: number;
  /** audited, panelRows, panelErrors, agreeSum, then per annotator j: rows, errors, class 0 … classes − 1 */
  readonly fields: readonly Float64Array[];
}

/** Cells in columns. Every array has `size` entries. */
export interface CellTable {
  readonly size: number;
  /** the slice columns, in key order */
  readonly columns: readonly string[];
  /** per column, the values its codes stand for */
  readonly dicts: readonly (readonly string[])[];
  /** per column, each cell's value as an index into the column's dictionary; -1 when the cell's grouping set leaves the column out */
  readonly codes: readonly Int32Array[];
  /** index into SPLITS */
  readonly split: Uint8Array;
  /** the runs the codes of `run` stand for, sorted */
  readonly runs: readonly string[];
  /** index into `runs`; -1 without a run column */
  readonly run: Int32Array;
  readonly rows: Float64Array;
  readonly weight: Float64Array;
  readonly weightSq: Float64Array;
  readonly errors: Float64Array;
  readonly floorSum: Float64Array;
  readonly floorEntry: Int32Array;
  /** NaN where the entry gave no n */
  readonly floorN: Float64Array;
  readonly costSum: Float64Array;
  readonly costWeight: Float64Array;
  readonly audit: AuditColumns | null;
}

/** Number of audit fields for a shape: 4 + annotators × (2 + classes). */
export function auditFieldCount(annotators: number, classes: number): number {
  return 4 + annotators * (2 + classes);
}

const SPLIT_CODE: Record<Split, number> = { train: 0, train_dev: 1, dev: 2, test: 3 };

/** One cell as plain values, for {@link CellTableBuilder.add}. */
export interface CellValues {
  /** per column (in table order): the value, or null when the grouping set leaves the column out */
  readonly key: readonly (string | null)[];
  readonly split: Split;
  readonly run: string | null;
  readonly rows: number;
  readonly weight: number;
  readonly weightSq: number;
  readonly errors: number;
  readonly floorSum: number;
  readonly floorEntry: number;
  readonly floorN: number | null;
  readonly costSum: number;
  readonly costWeight: number;
  /** the audit fields in {@link AuditColumns} order, or null */
  readonly audit: ArrayLike<number> | null;
}

function grow<T extends Float64Array | Int32Array | Uint8Array>(a: T, n: number): T {
  if (a.length >= n) return a;
  const b = new (a.constructor as new (n: number) => T)(Math.max(n, a.length * 2, 64));
  b.set(a);
  return b;
}

/**
 * Builds a CellTable one cell at a time (dictionary-encoding the keys as it goes). Cells with the same
 * key, split, run and floor entry are not merged: callers add distinct cells, or rely on the rollup,
 * which adds them anyway.
 */
export class CellTableBuilder {
  private n = 0;
  private readonly lookup: Map<string, number>[];
  private readonly dicts: string[][];
  private codes: Int32Array[];
  private split = new Uint8Array(64);
  private runLookup = new Map<string, number>();
  private runNames: string[] = [];
  private run = new Int32Array(64);
  private num: Float64Array[] = Array.from({ length: 9 }, () => new Float64Array(64));
  private floorEntry = new Int32Array(64);
  private audit: Float64Array[] | null;

  constructor(
    readonly columns: readonly string[],
    private readonly auditShape: { annotators: number; classes: number } | null = null,
  ) {
    this.lookup = columns.map(() => new Map());
    this.dicts = columns.map(() => []);
    this.codes = columns.map(() => new Int32Array(64));
    this.audit = auditShape ? Array.from({ length: auditFieldCount(auditShape.annotators, auditShape.classes) }, () => new Float64Array(64)) : null;
  }

  get size(): number {
    return this.n;
  }

  /** The code of `value` in column `c`, adding it to the dictionary when new. */
  code(c: number, value: string | null): number {
    if (value === null) return -1;
    const map = this.lookup[c];
    let k = map.get(value);
    if (k === undefined) {
      k = this.dicts[c].length;
      this.dicts[c].push(value);
      map.set(value, k);
    }
    return k;
  }

  private runCode(run: string | null): number {
    if (run === null) return -1;
    let k = this.runLookup.get(run);
    if (k === undefined) {
      k = this.runNames.length;
      this.runNames.push(run);
      this.runLookup.set(run, k);
    }
    return k;
  }

  private ensure(): number {
    const i = this.n++;
    if (i >= this.split.length) {
      const n = i + 1;
      this.codes = this.codes.map((a) => grow(a, n));
      this.split = grow(this.split, n);
      this.run = grow(this.run, n);
      this.num = this.num.map((a) => grow(a, n));
      this.floorEntry = grow(this.floorEntry, n);
      if (this.audit) this.audit = this.audit.map((a) => grow(a, n));
    }
    return i;
  }

  add(cell: CellValues): void {
    const i = this.ensure();
    for (let c = 0; c < this.columns.length; c++) this.codes[c][i] = this.code(c, cell.key[c]);
    this.split[i] = SPLIT_CODE[cell.split];
    this.run[i] = this.runCode(cell.run);
    const num = this.num;
    num[0][i] = cell.rows;
    num[1][i] = cell.weight;
    num[2][i] = cell.weightSq;
    num[3][i] = cell.errors;
    num[4][i] = cell.floorSum;
    num[5][i] = cell.floorN === null ? NaN : cell.floorN;
    num[6][i] = cell.costSum;
    num[7][i] = cell.costWeight;
    this.floorEntry[i] = cell.floorEntry;
    if (this.audit) {
      const a = cell.audit;
      for (let f = 0; f < this.audit.length; f++) this.audit[f][i] = a ? a[f] : 0;
    }
  }

  /** The table; runs are re-coded so that their dictionary is sorted. */
  build(): CellTable {
    const n = this.n;
    const sortedRuns = [...this.runNames].sort();
    const remap = this.runNames.map((r) => sortedRuns.indexOf(r));
    const run = new Int32Array(n);
    for (let i = 0; i < n; i++) run[i] = this.run[i] < 0 ? -1 : remap[this.run[i]];
    const cut = <T extends Float64Array | Int32Array | Uint8Array>(a: T): T => a.slice(0, n) as T;
    return {
      size: n,
      columns: [...this.columns],
      dicts: this.dicts.map((d) => [...d]),
      codes: this.codes.map(cut),
      split: cut(this.split),
      runs: sortedRuns,
      run,
      rows: cut(this.num[0]),
      weight: cut(this.num[1]),
      weightSq: cut(this.num[2]),
      errors: cut(this.num[3]),
      floorSum: cut(this.num[4]),
      floorN: cut(this.num[5]),
      costSum: cut(this.num[6]),
      costWeight: cut(this.num[7]),
      floorEntry: cut(this.floorEntry),
      audit: this.audit && this.auditShape ? { ...this.auditShape, fields: this.audit.map(cut) } : null,
    };
  }
}

/** Audit sums as a flat field list in {@link AuditColumns} order. */
export function flattenAudit(a: AuditSums): number[] {
  const out = [a.audited, a.panelRows, a.panelErrors, a.agreeSum];
  for (let j = 0; j < a.annRows.length; j++) out.push(a.annRows[j], a.annErrors[j], ...a.classCounts[j]);
  return out;
}

/** The inverse of {@link flattenAudit}. */
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

/** Marks a Cell made from a table with the table and its index, so arrays of such cells convert back without re-encoding. */
const ORIGIN = Symbol('floorgap.cellOrigin');
type Origin = { readonly table: CellTable; readonly index: number };

/** Cell i of the table as a Cell object (keys by column name; null for a column the grouping set leaves out). */
export function cellAt(table: CellTable, i: number): Cell {
  const key: Record<string, string | null> = {};
  for (let c = 0; c < table.columns.length; c++) {
    const k = table.codes[c][i];
    key[table.columns[c]] = k < 0 ? null : table.dicts[c][k];
  }
  const audit = table.audit ? auditFromFields((f) => table.audit!.fields[f][i], table.audit.annotators, table.audit.classes) : null;
  const cell: Cell = {
    key,
    split: SPLITS[table.split[i]],
    run: table.run[i] < 0 ? null : table.runs[table.run[i]],
    rows: table.rows[i],
    weight: table.weight[i],
    weightSq: table.weightSq[i],
    errors: table.errors[i],
    floorSum: table.floorSum[i],
    floorEntry: table.floorEntry[i],
    floorN: Number.isNaN(table.floorN[i]) ? null : table.floorN[i],
    costSum: table.costSum[i],
    costWeight: table.costWeight[i],
    audit,
  };
  Object.defineProperty(cell, ORIGIN, { value: { table, index: i } satisfies Origin, enumerable: false });
  return cell;
}

/** Every cell of the table as Cell objects (for code that wants objects; the rollup reads the table itself). */
export function tableCells(table: CellTable): Cell[] {
  const out = new Array<Cell>(table.size);
  for (let i = 0; i < table.size; i++) out[i] = cellAt(table, i);
  return out;
}

/** A table and the indices of the cells to use (all when null). */
export interface CellSelection {
  readonly table: CellTable;
  readonly index: Uint32Array | null;
}

const converted = new WeakMap<readonly Cell[], CellSelection>();

/**
 * The cells as a table selection. Cells that came from one table (cellAt) are selected by index, without
 * copying; other cells are encoded into a new table. The result is remembered per array.
 */
export function selectCells(cells: readonly Cell[] | CellTable): CellSelection {
  if (!Array.isArray(cells)) return { table: cells as CellTable, index: null };
  const list = cells as readonly Cell[];
  const known = converted.get(list);
  if (known) return known;
  let result: CellSelection | null = null;
  const first = list.length > 0 ? ((list[0] as unknown as Record<symbol, Origin | undefined>)[ORIGIN] ?? null) : null;
  if (first) {
    const index = new Uint32Array(list.length);
    let same = true;
    for (let i = 0; i < list.length; i++) {
      const o = (list[i] as unknown as Record<symbol, Origin | undefined>)[ORIGIN];
      if (!o || o.table !== first.table) {
        same = false;
        break;
      }
      index[i] = o.index;
    }
    if (same) result = { table: first.table, index: list.length === first.table.size && isIdentity(index) ? null : index };
  }
  result ??= { table: cellsToTable(list), index: null };
  converted.set(list, result);
  return result;
}

function isIdentity(index: Uint32Array): boolean {
  for (let i = 0; i < index.length; i++) if (index[i] !== i) return false;
  return true;
}

/** Encodes Cell objects into a table (columns: the keys of the first cell, then any others seen). */
export function cellsToTable(cells: readonly Cell[]): CellTable {
  const columns: string[] = [];
  const seen = new Set<string>();
  for (const c of cells) {
    for (const k of Object.keys(c.key)) {
      if (!seen.has(k)) {
        seen.add(k);
        columns.push(k);
      }
    }
  }
  const firstAudit = cells.find((c) => c.audit !== null)?.audit ?? null;
  const shape = firstAudit ? { annotators: firstAudit.annRows.length, classes: firstAudit.classCounts[0]?.length ?? 0 } : null;
  const b = new CellTableBuilder(columns, shape);
  for (const c of cells) {
    b.add({
      key: columns.map((k) => c.key[k] ?? null),
      split: c.split,
      run: c.run,
      rows: c.rows,
      weight: c.weight,
      weightSq: c.weightSq,
      errors: c.errors,
      floorSum: c.floorSum,
      floorEntry: c.floorEntry,
      floorN: c.floorN,
      costSum: c.costSum,
      costWeight: c.costWeight,
      audit: c.audit ? flattenAudit(c.audit) : null,
    });
  }
  return b.build();
}

/**
 * Appends the cells of `b` to those of `a` (same columns and audit shape; `b`'s dictionaries are merged
 * into `a`'s).
 */
export function concatTables(a: CellTable, b: CellTable): CellTable {
  const builder = new CellTableBuilder(a.columns, a.audit ? { annotators: a.audit.annotators, classes: a.audit.classes } : null);
  for (const t of [a, b]) {
    const colIndex = a.columns.map((name) => t.columns.indexOf(name));
    for (let i = 0; i < t.size; i++) {
      builder.add({
        key: colIndex.map((c) => (c < 0 || t.codes[c][i] < 0 ? null : t.dicts[c][t.codes[c][i]])),
        split: SPLITS[t.split[i]],
        run: t.run[i] < 0 ? null : t.runs[t.run[i]],
        rows: t.rows[i],
        weight: t.weight[i],
        weightSq: t.weightSq[i],
        errors: t.errors[i],
        floorSum: t.floorSum[i],
        floorEntry: t.floorEntry[i],
        floorN: Number.isNaN(t.floorN[i]) ? null : t.floorN[i],
        costSum: t.costSum[i],
        costWeight: t.costWeight[i],
        audit: t.audit ? t.audit.fields.map((f) => f[i]) : null,
      });
    }
  }
  return builder.build();
}

/** The runs present in the cells, or [] when the input has no run column. */
export function runsOf(cells: readonly Cell[] | CellTable): string[] {
  const { table, index } = selectCells(cells);
  if (index === null) {
    const seen = new Uint8Array(table.runs.length);
    for (let i = 0; i < table.size; i++) if (table.run[i] >= 0) seen[table.run[i]] = 1;
    return table.runs.filter((_, r) => seen[r] === 1);
  }
  const seen = new Uint8Array(table.runs.length);
  for (let j = 0; j < index.length; j++) {
    const r = table.run[index[j]];
    if (r >= 0) seen[r] = 1;
  }
  return table.runs.filter((_, r) => seen[r] === 1);
}

const crossTables = new WeakMap<CellTable, boolean>();

/** True when no cell of the table leaves a column out (the full cross, not grouping sets). */
export function isCrossTable(table: CellTable): boolean {
  let known = crossTables.get(table);
  if (known === undefined) {
    known = true;
    for (const codes of table.codes) {
      for (let i = 0; i < codes.length; i++) {
        if (codes[i] < 0) {
          known = false;
          break;
        }
      }
      if (!known) break;
    }
    crossTables.set(table, known);
  }
  return known;
}

function groupedSignature(table: CellTable, i: number): string {
  let s = '';
  for (let c = 0; c < table.codes.length; c++) if (table.codes[c][i] >= 0) s += c + ',';
  return s;
}

/**
 * The indices (into the table) of the cells that serve a grouping: every cell of a full cross; in
 * grouping-sets mode those of the set equal to `by` (for `by` = [], the set of the first cell, any
 * one-column set covering every row once). `run` restricts to one run's cells.
 */
export function cellIndicesFor(sel: CellSelection, by: readonly string[], run: string | null = null): Uint32Array {
  const { table, index } = sel;
  const n = index ? index.length : table.size;
  const runCode = run === null ? -2 : table.runs.indexOf(run);
  if (run !== null && runCode < 0) return new Uint32Array(0);
  const out = new Uint32Array(n);
  let m = 0;
  for (let j = 0; j < n; j++) {
    const i = index ? index[j] : j;
    if (runCode >= -1 && table.run[i] !== runCode) continue;
    out[m++] = i;
  }
  if (m === 0 || isCrossTable(table)) return out.subarray(0, m);
  const byIdx = by.map((b) => table.columns.indexOf(b));
  if (byIdx.some((c) => c < 0)) return new Uint32Array(0);
  const want = by.length > 0 ? [...byIdx].sort((a, b) => a - b).map((c) => c + ',').join('') : groupedSignature(table, out[0]);
  let k = 0;
  for (let j = 0; j < m; j++) if (groupedSignature(table, out[j]) === want) out[k++] = out[j];
  return out.subarray(0, k);
}

