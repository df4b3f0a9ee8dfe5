/**
 * The rules of src/cells/row-status.ts as DuckDB SQL over the local rows view (`fg_rows`, every column
 * text): what export, examples, paired rows and the locating queries read a row with. The cell query
 * writes the same rules for any dialect.
 */
import type { SliceColumn } from '../core/cell.js';
import type { Split } from '../core/split.js';
import { dialect } from '../sql/dialect.js';
import { ident, literal } from '../sql/quote.js';
import type { Roles } from '../read/roles.js';
import { MISSING } from './plan.js';
import { binLabel, textSql } from './profile.js';
import { badScoreSql, badWeightSql, errorRule, inSplitsSql, ROW_STATUS, splitSql, statusSql, type ErrorRule } from './row-status.js';

const DUCKDB = dialect('duckdb');

/**
 * A row's error and the conditions that leave it out, over the text columns of the rows view.
 * @example
 * rowError(roles).error; // => 'CASE WHEN "label" = "pred" THEN 0 WHEN TRIM("label") = TRIM("pred") THEN 0 …'
 */
export function rowError(roles: Pick<Roles, 'label' | 'pred' | 'error' | 'errorIsCorrect'>): ErrorRule {
  return errorRule(DUCKDB, roles, ident);
}

/** A row's weight as a double (1 without a weight column; NULL for a value that is not a number). */
export function rowWeight(roles: Pick<Roles, 'weight'>): string {
  return roles.weight ? `TRY_CAST(${textSql(roles.weight)} AS DOUBLE)` : '1';
}

/** A row's status code (row-status.ts ROW_STATUS): 0 for a row the analysis uses. */
export function rowStatus(roles: Roles): string {
  const rule = rowError(roles);
  return statusSql({
    badWeight: roles.weight ? badWeightSql(DUCKDB, rowWeight(roles)) : undefined,
    badScore: roles.score ? badScoreSql(DUCKDB, ident(roles.score)) : undefined,
    badError: rule.badError,
    unlabelled: rule.unlabelled,
  });
}

/** A row's canonical split, NULL for a row the analysis leaves out or a value that is not a split. */
export function rowSplit(roles: Roles, splitColumn: string): string {
  return `CASE WHEN ${rowStatus(roles)} = ${ROW_STATUS.usable} THEN ${splitSql(DUCKDB, ident(splitColumn))} END`;
}

/** A condition true for the rows of the given splits (any accepted spelling). */
export function rowInSplits(splitColumn: string, splits: readonly Split[]): string {
  return inSplitsSql(DUCKDB, ident(splitColumn), splits);
}

/**
 * SQL for a slice column's cell key of a row: trimmed text (`(missing)` when empty), or the bin label
 * for numeric columns.
 */
export function keySql(col: SliceColumn): string {
  if (col.kind === 'category' || !col.edges || col.edges.length === 0) {
    return `COALESCE(${textSql(col.name)}, ${literal(MISSING)})`;
  }
  const x = `TRY_CAST(${textSql(col.name)} AS DOUBLE)`;
  const edges = col.edges;
  const whens = edges.map((e, i) => `WHEN ${x} < ${e} THEN ${literal(binLabel(edges, i))}`);
  return `CASE WHEN ${x} IS NULL OR isnan(${x}) THEN ${literal(MISSING)} ${whens.join(' ')} ELSE ${literal(binLabel(edges, edges.length))} END`;
}
