/**
 * Reads cells from a DuckDB query or table into a CellTable without turning every key into a JS string:
 * DuckDB numbers each key column's distinct values (a small dictionary per column, joined back to the
 * cells), floorgap reads the dictionaries once and the codes and sums as typed arrays.
 */
import { cellTable, type CellTable } from './cell-table.js';
import type { Duck } from '../sql/duck.js';
import { ident, literal } from '../sql/quote.js';
import { dialect } from '../sql/dialect.js';
import { SPLITS } from '../core/split.js';
import { splitSql } from './row-status.js';
import { error } from '../core/errors.js';

/** Where each part of a cell sits among the columns of the source. */
export interface CellSourceColumns {
  /** per slice column of the table: the source column holding its value, or null when the source lacks it (all left out) */
  readonly keys: readonly (string | null)[];
  readonly split: string;
  /** null when the source has no run column */
  readonly run: string | null;
  /** rows, weight, weightSq, errors, floorSum, floorEntry, floorN, costSum, costWeight */
  readonly stats: readonly [string, string, string, string, string, string, string, string, string];
  /** audit fields in AuditColumns order, and the shape */
  readonly audit: { readonly columns: readonly string[]; readonly annotators: number; readonly classes: number } | null;
  /** most cells to read; more fail with advice to group coarser */
  readonly limit?: number;
}

let tempCounter = 0;

/**
 * Reads cells from `from` (a table name or a parenthesised query with an alias).
 * @param columns the slice columns of the table to build, in order
 * @returns the table of cells whose split is known, and the rows of every other split value (raw, as
 * written) — pseudo-splits that mark rows set aside, or split values that are not splits
 */
export async function readCells(
  duck: Duck,
  from: string,
  columns: readonly string[],
  src: CellSourceColumns,
): Promise<{ table: CellTable; other: Map<string, number> }> {
  const tmp = `fg_cells_${process.pid}_${tempCounter++}`;
  // the split's index in SPLITS, from any accepted spelling (NULL for anything else)
  const splitCode = `CASE ${splitSql(dialect('duckdb'), `CAST(${ident(src.split)} AS VARCHAR)`)} ${SPLITS.map((s, i) => `WHEN ${literal(s)} THEN ${i}`).join(' ')} END`;
  await duck.run(`CREATE TEMP TABLE ${tmp} AS SELECT *, ${splitCode} AS fg_split_code FROM ${from}`);
  try {
    if (src.limit !== undefined) {
      const [{ n }] = await duck.all(`SELECT count(*) AS n FROM ${tmp}`);
      if (Number(n) > src.limit) {
        throw error(
          `the slice columns give ${Number(n).toLocaleString('en-US')} cells (combinations of their values × split), more than the ${src.limit.toLocaleString('en-US')} floorgap holds in memory (5 × --max-cells, at least 1,000,000); use fewer or coarser --by / --slice-cols columns, fewer --bins, or narrow the rows with --where`,
        );
      }
    }
    const otherRows = await duck.all(`SELECT CAST(${ident(src.split)} AS VARCHAR) AS s, sum(${ident(src.stats[0])}) AS n FROM ${tmp} WHERE fg_split_code IS NULL GROUP BY 1`);
    const other = new Map(otherRows.map((r) => [r.s === null ? '' : String(r.s), Number(r.n)]));
    const known = `fg_split_code IS NOT NULL`;
    // each key column's distinct values, numbered in sorted order, joined back to give the codes
    const dictSql = (col: string) =>
      `SELECT v, CAST(row_number() OVER (ORDER BY v) - 1 AS INTEGER) AS code FROM (SELECT DISTINCT CAST(${ident(col)} AS VARCHAR) AS v FROM ${tmp} WHERE ${known} AND ${ident(col)} IS NOT NULL)`;
    const dictOf = async (col: string) => (await duck.all(`${dictSql(col)} ORDER BY code`)).map((r) => String(r.v));
    const dicts: string[][] = [];
    for (const k of src.keys) dicts.push(k === null ? [] : await dictOf(k));
    const runs = src.run === null ? [] : await dictOf(src.run);
    const joins: string[] = [];
    const codeOf = (col: string, alias: string) => {
      joins.push(`LEFT JOIN (${dictSql(col)}) AS ${alias} ON CAST(t.${ident(col)} AS VARCHAR) = ${alias}.v`);
      return `COALESCE(${alias}.code, -1)`;
    };
    // every column NOT NULL (a missing n is 0, a missing entry -1), for the fast copy below
    const statNull = (i: number) => (i === 5 ? '-1' : '0');
    const select = [
      'CAST(t.fg_split_code AS INTEGER) AS s',
      src.run === null ? 'CAST(-1 AS INTEGER) AS r' : `${codeOf(src.run, 'fg_dr')} AS r`,
      ...src.keys.map((k, c) => (k === null ? `CAST(-1 AS INTEGER) AS c${c}` : `${codeOf(k, `fg_d${c}`)} AS c${c}`)),
      ...src.stats.map((s, i) => `COALESCE(CAST(t.${ident(s)} AS DOUBLE), ${statNull(i)}) AS v${i}`),
      ...(src.audit?.columns ?? []).map((s, i) => `COALESCE(CAST(t.${ident(s)} AS DOUBLE), 0) AS a${i}`),
    ];
    const result = await duck.connection.run(`SELECT ${select.join(', ')} FROM ${tmp} AS t ${joins.join(' ')} WHERE t.${known}`);
    const n = result.rowCount;
    const split32 = new Int32Array(n);
    const run = new Int32Array(n);
    const codes = src.keys.map(() => new Int32Array(n));
    const stats = src.stats.map(() => new Float64Array(n));
    const audit = (src.audit?.columns ?? []).map(() => new Float64Array(n));
    let at = 0;
    for (;;) {
      const chunk = await result.fetchChunk();
      if (!chunk || chunk.rowCount === 0) break;
      const m = chunk.rowCount;
      const fill = (vi: number, target: Int32Array | Float64Array) => {
        const v = chunk.getColumnVector(vi);
        // every column is NOT NULL, so the vector's own typed array can be copied whole
        const items = (v as unknown as { items?: unknown }).items;
        if ((items instanceof Int32Array || items instanceof Float64Array) && items.length === m) {
          target.set(items, at);
          return;
        }
        for (let r = 0; r < m; r++) target[at + r] = Number(v.getItem(r));
      };
      fill(0, split32);
      fill(1, run);
      codes.forEach((c, i) => fill(2 + i, c));
      stats.forEach((s, i) => fill(2 + codes.length + i, s));
      audit.forEach((a, i) => fill(2 + codes.length + stats.length + i, a));
      at += m;
    }
    const table: CellTable = cellTable({
      columns,
      dicts,
      codes,
      split: split32,
      runs,
      run,
      sums: { rows: stats[0], weight: stats[1], weightSq: stats[2], errors: stats[3], floorSum: stats[4], costSum: stats[7], costWeight: stats[8] },
      floorEntry: Int32Array.from(stats[5]),
      floorN: stats[6],
      audit: src.audit ? { annotators: src.audit.annotators, classes: src.audit.classes, fields: audit } : null,
    });
    return { table, other };
  } finally {
    await duck.run(`DROP TABLE IF EXISTS ${tmp}`);
  }
}

