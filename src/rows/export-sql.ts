/**
 * The SQL behind `floorgap export`: one SELECT over the `fg_rows` view that keeps the rows of the chosen
 * slices and splits, adds the `fg_` columns, neutralises formula-like text and orders the rows so that
 * likely label errors come first. DuckDB streams it into a file with `COPY (…) TO`; nothing is loaded
 * into JavaScript. Pure: builds strings only.
 */
import { MISSING, type CellPlan } from '../cells/plan.js';
import { keySql, rowError, rowSplit } from '../cells/row-sql.js';
import { textSql } from '../cells/profile.js';
import { ROWS_VIEW, whereSql } from '../read/source.js';
import { ident, literal } from '../sql/quote.js';
import type { SliceColumn } from '../core/cell.js';
import type { Split } from '../core/split.js';

/** The columns export adds to every row, after the original columns. */
export const EXPORT_COLUMNS = ['fg_slice', 'fg_focus', 'fg_rank', 'fg_split', 'fg_reason'] as const;

/** Separator of the slices of a row that lies in several chosen slices. */
const SLICE_SEPARATOR = ' | ';

/** One chosen slice, as the SQL needs it. */
export interface ExportSlice {
  /** column → value, as in the report (`(missing)` for a missing value, bin labels for binned columns) */
  readonly key: Readonly<Record<string, string>>;
  readonly label: string;
  readonly focus: string;
  readonly rank: number;
  readonly reason: string;
}

/** Everything the export query needs. */
export interface ExportQuery {
  /** the original columns of the input, in order */
  readonly columns: readonly string[];
  /** roles, split column, `--where`, annotators (the analysis' cell plan; floors are not used) */
  readonly plan: Pick<CellPlan, 'roles' | 'splitColumn' | 'where' | 'annotators'>;
  /** the slice columns of the analysis (for bin edges) */
  readonly sliceColumns: readonly SliceColumn[];
  /** the chosen slices in rank order */
  readonly slices: readonly ExportSlice[];
  /** the splits whose rows are written */
  readonly splits: readonly Split[];
  /** keep only rows the model got wrong */
  readonly errorsOnly: boolean;
  /** at most this many rows per slice (a row counts in the slice it sits with), or null */
  readonly limitPerSlice: number | null;
  /** prefix formula-like text with `'` */
  readonly neutralize: boolean;
  /** the run the report's numbers come from, when the input holds several runs */
  readonly run: { readonly column: string; readonly value: string } | null;
}

/** A number as spreadsheets read it: an optional sign, digits with an optional point, an optional exponent. */
const NUMBER_PATTERN = '^[+-]?([0-9]+[.]?[0-9]*|[.][0-9]+)([eE][+-]?[0-9]+)?$';
/** The first characters that make a spreadsheet run a cell as a formula (tab and CR included). */
const FORMULA_START = '^[-=+@\\t\\r]';

/**
 * SQL that prefixes a text value with `'` when a spreadsheet would run it as a formula: it starts with
 * `=`, `+`, `-`, `@`, tab or carriage return and is not a plain number (`-0.5` and `+3` stay as they are).
 * @param expr a VARCHAR expression
 * @returns a VARCHAR expression (NULL stays NULL)
 * @example
 * neutralizeSql('"note"'); // => CASE WHEN regexp_matches("note", …) AND NOT regexp_full_match("note", …) THEN '''' || "note" ELSE "note" END
 */
export function neutralizeSql(expr: string): string {
  return `CASE WHEN regexp_matches(${expr}, ${literal(FORMULA_START)}) AND NOT regexp_full_match(${expr}, ${literal(NUMBER_PATTERN)}) THEN '''' || ${expr} ELSE ${expr} END`;
}

/**
 * A row's annotator dissent: the share of its annotator labels that differ from its label; NULL
 * when no annotator labelled it.
 */
function dissentSql(plan: ExportQuery['plan']): string {
  const anns = plan.annotators ?? [];
  if (anns.length === 0 || !plan.roles.label) return 'NULL::DOUBLE';
  const label = textSql(plan.roles.label);
  const given = anns.map((a) => `CASE WHEN ${textSql(a)} IS NULL THEN 0 ELSE 1 END`).join(' + ');
  const differ = anns.map((a) => `CASE WHEN ${textSql(a)} IS NOT NULL AND ${textSql(a)} IS DISTINCT FROM ${label} THEN 1 ELSE 0 END`).join(' + ');
  return `CASE WHEN (${given}) = 0 THEN NULL ELSE (${differ})::DOUBLE / (${given}) END`;
}

/** The key columns the chosen slices use, each with its SQL. */
function keyColumns(q: ExportQuery): { name: string; sql: string; alias: string }[] {
  const names: string[] = [];
  for (const s of q.slices) for (const c of Object.keys(s.key)) if (!names.includes(c)) names.push(c);
  return names.map((name, i) => {
    const col = q.sliceColumns.find((c) => c.name === name) ?? { name, kind: 'category' as const };
    return { name, sql: keySql(col), alias: `__fg_k${i}` };
  });
}

/** Within a slice: the model's errors by score (highest first), then rows annotators dispute, then the rest; input order breaks ties. */
const WITHIN = [
  '__fg_class',
  'CASE WHEN __fg_class = 0 THEN __fg_score END DESC NULLS LAST',
  'CASE WHEN __fg_class = 1 THEN __fg_dissent END DESC NULLS LAST',
  '__fg_i',
].join(', ');

/**
 * The selected rows with their membership flags, before the output columns are formed. Internal
 * columns start with `__fg_`; `__fg_m<i>` says whether the row lies in chosen slice i, `__fg_best` is
 * the best-ranked chosen slice the row lies in (the slice it sits with).
 */
function selectedSql(q: ExportQuery): string {
  const keys = keyColumns(q);
  const cols = q.columns.map(ident);
  const score = q.plan.roles.score ? `TRY_CAST(${textSql(q.plan.roles.score)} AS DOUBLE)` : 'NULL::DOUBLE';
  const run = q.run ? ` AND COALESCE(${textSql(q.run.column)}, ${literal(MISSING)}) = ${literal(q.run.value)}` : '';
  const members = q.slices.map((s, i) => {
    const conds = Object.entries(s.key).map(([c, v]) => `${keys.find((k) => k.name === c)!.alias} = ${literal(v)}`);
    return `(${conds.length ? conds.join(' AND ') : 'TRUE'}) AS __fg_m${i}`;
  });
  const flags = q.slices.map((_, i) => `__fg_m${i}`);
  const best = flags.length ? `CASE ${flags.map((m, i) => `WHEN ${m} THEN ${i}`).join(' ')} END` : 'NULL::INTEGER';
  const splitList = q.splits.map(literal).join(', ');
  const base = `SELECT
    ${[...cols, `${rowSplit(q.plan.roles, q.plan.splitColumn)} AS __fg_split`, `${rowError(q.plan.roles).error} AS __fg_e`, `${score} AS __fg_score`, `${dissentSql(q.plan)} AS __fg_dissent`, ...keys.map((k) => `${k.sql} AS ${k.alias}`)].join(',\n    ')}
  FROM ${ROWS_VIEW}
  WHERE ${whereSql(q.plan.where)}${run}`;
  const member = `SELECT *, ${members.length ? members.join(', ') : 'FALSE AS __fg_none'} FROM (${base})`;
  const chosen = `SELECT *,
    row_number() OVER () AS __fg_i,
    ${best} AS __fg_best,
    CASE WHEN __fg_e = 1 THEN 0 WHEN __fg_dissent > 0 THEN 1 ELSE 2 END AS __fg_class
  FROM (${member})
  WHERE __fg_split IN (${splitList || 'NULL'}) AND (${flags.length ? flags.join(' OR ') : 'FALSE'})${q.errorsOnly ? ' AND __fg_e = 1' : ''}`;
  if (q.limitPerSlice === null) return chosen;
  return `SELECT * FROM (${chosen}) QUALIFY row_number() OVER (PARTITION BY __fg_best ORDER BY ${WITHIN}) <= ${Math.floor(q.limitPerSlice)}`;
}

/** `CASE WHEN m0 THEN 'a' END, CASE WHEN m1 THEN 'b' END, …` joined with the slice separator. */
function joined(q: ExportQuery, value: (s: ExportSlice) => string): string {
  if (q.slices.length === 0) return 'NULL::VARCHAR';
  const parts = q.slices.map((s, i) => `CASE WHEN __fg_m${i} THEN ${literal(value(s))} END`);
  return `concat_ws(${literal(SLICE_SEPARATOR)}, ${parts.join(', ')})`;
}

/**
 * The export query: every original column in order, then `fg_slice`, `fg_focus`, `fg_rank`, `fg_split`,
 * `fg_reason` (all text). A row in several chosen slices appears once, its slices joined with ` | ` in
 * rank order; rows are grouped by the best-ranked slice they lie in (slices in rank order), and within
 * it the model's errors come first by score (highest first), then rows whose annotator labels differ
 * from the label (most dissent first), then the rest, each in input order on ties.
 * @param q the query's inputs
 * @returns a SELECT statement for `COPY (…) TO`
 * @example
 * await duck.run(`COPY (${exportSql(q)}) TO 'rows.csv' (FORMAT csv, HEADER true)`);
 */
export function exportSql(q: ExportQuery): string {
  const wrap = (expr: string) => (q.neutralize ? neutralizeSql(expr) : expr);
  const out = [
    ...q.columns.map((c) => `${wrap(ident(c))} AS ${ident(c)}`),
    `${wrap(joined(q, (s) => s.label))} AS fg_slice`,
    `${wrap(joined(q, (s) => s.focus))} AS fg_focus`,
    `${wrap(joined(q, (s) => String(s.rank)))} AS fg_rank`,
    `${wrap('__fg_split')} AS fg_split`,
    `${wrap(joined(q, (s) => s.reason))} AS fg_reason`,
  ];
  return `SELECT
  ${out.join(',\n  ')}
FROM (${selectedSql(q)})
ORDER BY __fg_best, ${WITHIN}`;
}

/**
 * Counts of the rows the export query writes: one row per split with `rows` (each row once) and
 * `s<i>` (rows lying in chosen slice i: a row counts under each of its slices).
 * @param q the same inputs as {@link exportSql}
 * @returns a SELECT statement
 * @example
 * await duck.all(exportCountSql(q)); // => [{ split: 'dev', rows: 120, s0: 80, s1: 52 }, …]
 */
export function exportCountSql(q: ExportQuery): string {
  const sums = q.slices.map((_, i) => `count_if(__fg_m${i}) AS s${i}`);
  return `SELECT __fg_split AS split, count(*) AS rows${sums.length ? ', ' + sums.join(', ') : ''}
FROM (${selectedSql(q)})
GROUP BY __fg_split
ORDER BY __fg_split`;
}
