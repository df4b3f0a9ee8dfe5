import type { Duck } from '../engine/duck.js';
import type { Source } from '../engine/source.js';
import { tableSql } from './read-table.js';

/** Where a bad value sits: "file: line N, " (a prefix for messages) plus the value itself. */
export interface BadRowAt {
  readonly value: string;
  toString(): string;
}

/**
 * Finds the first row of any input that matches `predicate` and says where it is: a line number for
 * CSV/TSV (header = line 1; assumes no line breaks inside quoted fields) and JSON Lines, a row number for
 * Parquet. Only used on the error path, so the extra scan costs nothing when the input is good.
 */
export async function firstBadRow(duck: Duck, source: Source, predicate: string, column: string): Promise<BadRowAt> {
  for (const input of source.inputs) {
    const expr = await tableSql(duck, input);
    const rows = await duck.all(
      `SELECT fg_rn, fg_value FROM (SELECT row_number() OVER () AS fg_rn, "${column.replace(/"/g, '""')}" AS fg_value, * FROM ${expr}) WHERE ${predicate} ORDER BY fg_rn LIMIT 1`,
    );
    if (rows.length > 0) {
      const rn = Number(rows[0].fg_rn);
      const where =
        input.format === 'parquet' ? `row ${rn}` : input.format === 'jsonl' ? `line ${rn}` : `line ${rn + 1}`;
      const value = rows[0].fg_value === null ? '' : String(rows[0].fg_value);
      return { value, toString: () => `${input.path}: ${where}, ` };
    }
  }
  return { value: '', toString: () => `${source.where}: ` };
}
