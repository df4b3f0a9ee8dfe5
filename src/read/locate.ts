import type { Duck } from '../sql/duck.js';
import { PER_SPLIT_COLUMN, type Source } from './source.js';
import { ident, literal } from '../sql/quote.js';
import { describeColumns, tableSql } from './table.js';

/** Where a bad value sits: "file: line N, " (a prefix for messages) plus the value itself. */
export interface BadRowAt {
  readonly value: string;
  toString(): string;
}

/**
 * Finds the first row of any input that matches `predicate` (and the `--where` filter, when given) and
 * says where it is: a line number for CSV/TSV (header = line 1; assumes no line breaks inside quoted
 * fields) and JSON Lines, a row number for Parquet. Only used on the error path, so the extra scan costs
 * nothing when the input is good. An input without `column` (per-split files with different columns)
 * reads it as missing, as the rows view does.
 */
export async function firstBadRow(
  duck: Duck,
  source: Source,
  predicate: string,
  column: string,
  where: string | null = null,
): Promise<BadRowAt> {
  for (const input of source.inputs) {
    const expr = await tableSql(duck, input);
    const columns = await describeColumns(duck, expr, input.path);
    const added = [
      ...(columns.includes(column) ? [] : [`NULL::VARCHAR AS ${ident(column)}`]),
      ...(input.split ? [`${literal(input.split)} AS ${ident(PER_SPLIT_COLUMN)}`] : []),
    ];
    const inner = `SELECT row_number() OVER () AS fg_rn, ${ident(column)} AS fg_value, * FROM (SELECT *${added.map((a) => `, ${a}`).join('')} FROM ${expr})`;
    const query = (cond: string) => `SELECT fg_rn, fg_value FROM (${inner}) WHERE ${cond} ORDER BY fg_rn LIMIT 1`;
    let rows: Record<string, unknown>[];
    try {
      rows = await duck.all(query(where ? `(${predicate}) AND (${where})` : predicate));
    } catch (e) {
      // --where names a column this input lacks: locate without the filter
      if (!where) throw e;
      rows = await duck.all(query(predicate));
    }
    if (rows.length > 0) {
      const rn = Number(rows[0].fg_rn);
      const at =
        input.format === 'parquet' ? `row ${rn}` : input.format === 'jsonl' ? `line ${rn}` : `line ${rn + 1}`;
      const value = rows[0].fg_value === null ? '' : String(rows[0].fg_value);
      return { value, toString: () => `${input.path}: ${at}, ` };
    }
  }
  return { value: '', toString: () => `${source.where}: ` };
}
