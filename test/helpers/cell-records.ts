/**
 * Cells written as plain records, for tests that state cells by hand ("450 errors in 5,000 train rows
 * at floor 2 %"), and the cell table they stand for (src/cells/cell-table.ts builds it). Test-only:
 * floorgap itself never holds cells as objects.
 */
import { auditFieldCount, auditFromFields, cellColumns, cellTable, keyColumn, SUM_COLUMNS, type CellTable, type SumColumn } from '../../src/cells/cell-table.js';
import type { AuditSums } from '../../src/core/cell.js';
import { SPLITS, type Split } from '../../src/core/split.js';

/** One cell as a record: a key (null for a column its grouping set leaves out), split, run and its sums. */
export interface CellRecord {
  readonly key: Readonly<Record<string, string | null>>;
  readonly split: Split;
  readonly run: string | null;
  readonly rows: number;
  readonly weight: number;
  readonly weightSq: number;
  readonly errors: number;
  readonly floorSum: number;
  readonly floorEntry: number;
  /** null when the entry gave no n */
  readonly floorN: number | null;
  readonly costSum: number;
  readonly costWeight: number;
  readonly audit: AuditSums | null;
}

function flatAudit(a: AuditSums): number[] {
  const out = [a.audited, a.panelRows, a.panelErrors, a.agreeSum];
  for (let j = 0; j < a.annRows.length; j++) out.push(a.annRows[j], a.annErrors[j], ...a.classCounts[j]);
  return out;
}

/**
 * The cell table of some records: columns in order of first appearance among the keys, each
 * dictionary in order of first appearance, runs sorted.
 * @example
 * cellsOf([cell({ line: 'A' }, 'train', { rows: 10, errors: 1 })]).size; // => 1
 */
export function cellsOf(records: readonly CellRecord[]): CellTable {
  const columns: string[] = [];
  for (const r of records) for (const k of Object.keys(r.key)) if (!columns.includes(k)) columns.push(k);
  const n = records.length;
  const dicts: string[][] = columns.map(() => []);
  const codes = columns.map((c, k) =>
    Int32Array.from(records, (r) => {
      const v = r.key[c];
      if (v === null || v === undefined) return -1;
      let code = dicts[k].indexOf(v);
      if (code < 0) code = dicts[k].push(v) - 1;
      return code;
    }),
  );
  const runs = [...new Set(records.map((r) => r.run).filter((r): r is string => r !== null))].sort();
  const shapeOf = records.find((r) => r.audit)?.audit ?? null;
  const audit = shapeOf ? { annotators: shapeOf.annRows.length, classes: shapeOf.classCounts[0]?.length ?? 0 } : null;
  const fields = audit ? auditFieldCount(audit.annotators, audit.classes) : 0;
  const flat = records.map((r) => (r.audit ? flatAudit(r.audit) : new Array<number>(fields).fill(0)));
  return cellTable({
    columns,
    dicts,
    codes,
    split: Int32Array.from(records, (r) => SPLITS.indexOf(r.split)),
    runs,
    run: Int32Array.from(records, (r) => (r.run === null ? -1 : runs.indexOf(r.run))),
    sums: Object.fromEntries(SUM_COLUMNS.map((s) => [s, Float64Array.from(records, (r) => r[s])])) as Record<SumColumn, Float64Array>,
    floorEntry: Int32Array.from(records, (r) => r.floorEntry),
    floorN: Float64Array.from(records, (r) => r.floorN ?? 0),
    audit: audit ? { ...audit, fields: Array.from({ length: fields }, (_, f) => Float64Array.from({ length: n }, (_, i) => flat[i][f])) } : null,
  });
}

/** The records of a cell table, in table order (to assert what a scan produced). */
export function recordsOf(cells: CellTable): CellRecord[] {
  const c = cellColumns(cells);
  const out: CellRecord[] = [];
  for (let i = 0; i < cells.size; i++) {
    const key: Record<string, string | null> = {};
    c.columns.forEach((name, k) => (key[name] = c.codes[k][i] < 0 ? null : c.dicts[k][c.codes[k][i]]));
    const audit: AuditSums | null = c.audit ? auditFromFields((f) => c.audit!.fields[f][i], c.audit.annotators, c.audit.classes) : null;
    out.push({
      key,
      split: SPLITS[c.split[i]],
      run: c.run[i] < 0 ? null : c.runs[c.run[i]],
      rows: c.sums.rows[i],
      weight: c.sums.weight[i],
      weightSq: c.sums.weightSq[i],
      errors: c.sums.errors[i],
      floorSum: c.sums.floorSum[i],
      floorEntry: c.floorEntry[i],
      floorN: c.floorN[i] > 0 ? c.floorN[i] : null,
      costSum: c.sums.costSum[i],
      costWeight: c.sums.costWeight[i],
      audit,
    });
  }
  return out;
}

/** The codes column of slice column `name` (for tests of the encoding). */
export function codesOf(cells: CellTable, name: string): Int32Array {
  return cells.table.column(keyColumn(cells.columns.indexOf(name))) as unknown as Int32Array;
}
