import type { Duck } from '../sql/duck.js';
import { binLabel, textSql } from './profile.js';
import { SPLIT_HELP } from '../read/roles.js';
import { AUDIT_COLUMNS, badWeightSql, cellColumnNames, cellQuery, STATUS_SPLITS } from './cell-query.js';
import type { ColumnKind } from '../read/source.js';
import { dialect } from '../sql/dialect.js';
import type { CellTable } from './cell-table.js';
import { readCells } from './read-cells.js';
import { literal } from '../sql/quote.js';
import type { Cell, SliceColumn, Split } from '../core/cell.js';
import { error } from '../core/errors.js';
import { MISSING, type CellPlan, type Grouping } from './plan.js';
import type { Roles } from '../read/roles.js';
import type { FloorEntry } from '../read/keyed-table.js';

export { MISSING, type CellPlan, type Grouping };

/** Pseudo-split values that mark rows the scan could not use; never valid split spellings. */
const BAD = {
  weight: '!weight',
  score: '!score',
  error: '!error',
  unlabelled: '!unlabelled',
} as const;

/** SQL for a slice column's cell key: trimmed text, or the bin label for numeric columns. */
export function keySql(col: SliceColumn): string {
  if (col.kind === 'category' || !col.edges || col.edges.length === 0) {
    return `COALESCE(${textSql(col.name)}, ${literal(MISSING)})`;
  }
  const x = `TRY_CAST(${textSql(col.name)} AS DOUBLE)`;
  const edges = col.edges;
  const whens = edges.map((e, i) => `WHEN ${x} < ${e} THEN ${literal(binLabel(edges, i))}`);
  return `CASE WHEN ${x} IS NULL OR isnan(${x}) THEN ${literal(MISSING)} ${whens.join(' ')} ELSE ${literal(binLabel(edges, edges.length))} END`;
}

const TRUE_WORDS = ['1', '1.0', 'true', 't', 'yes', 'y'];
const FALSE_WORDS = ['0', '0.0', 'false', 'f', 'no', 'n'];

function inList(words: readonly string[]): string {
  return `(${words.map(literal).join(', ')})`;
}

/**
 * SQL for a row's error (1 or 0): label ≠ pred as trimmed strings, or the 0/1 error column (or the
 * `correct` column inverted); with conditions for a value that is not 0/1 and for an unlabelled row.
 */
export function errorSql(roles: Pick<Roles, 'label' | 'pred' | 'error' | 'errorIsCorrect'>): { error: string; badError: string; unlabelled: string } {
  if (roles.error) {
    const e = `lower(${textSql(roles.error)})`;
    const one = roles.errorIsCorrect ? FALSE_WORDS : TRUE_WORDS;
    return {
      error: `CASE WHEN ${e} IN ${inList(one)} THEN 1 ELSE 0 END`,
      badError: `(${e} IS NOT NULL AND ${e} NOT IN ${inList([...TRUE_WORDS, ...FALSE_WORDS])})`,
      unlabelled: `(${e} IS NULL)`,
    };
  }
  const label = textSql(roles.label!);
  const pred = textSql(roles.pred!);
  return {
    // two numbers compare as numbers (1 = 1.0), as in the cell query
    error: `CASE WHEN ${label} = ${pred} THEN 0 WHEN TRY_CAST(${label} AS DOUBLE) = TRY_CAST(${pred} AS DOUBLE) THEN 0 ELSE 1 END`,
    badError: 'FALSE',
    unlabelled: `(${label} IS NULL OR ${pred} IS NULL)`,
  };
}

/** SQL pieces that compute a row's weight, error, validity and floor entry. */
export function rowSql(plan: CellPlan): {
  weight: string;
  error: string;
  status: string;
  floorEntry: string;
} {
  const { roles } = plan;
  const weight = roles.weight ? `TRY_CAST(${textSql(roles.weight)} AS DOUBLE)` : '1';
  const badWeight = roles.weight ? badWeightSql(dialect('duckdb'), weight) : 'FALSE';
  const scoreNum = roles.score ? `TRY_CAST(${textSql(roles.score)} AS DOUBLE)` : null;
  const badScore = roles.score ? `(${textSql(roles.score)} IS NOT NULL AND (${scoreNum} IS NULL OR isnan(${scoreNum}) OR isinf(${scoreNum})))` : 'FALSE';
  const { error, badError, unlabelled } = errorSql(roles);
  const status = `CASE WHEN ${badWeight} THEN ${literal(BAD.weight)} WHEN ${badScore} THEN ${literal(BAD.score)} WHEN ${badError} THEN ${literal(BAD.error)} WHEN ${unlabelled} THEN ${literal(BAD.unlabelled)} ELSE COALESCE(${textSql(plan.splitColumn)}, '') END`;
  return { weight, error, status, floorEntry: floorEntrySql(plan.floorEntries) };
}

/**
 * The floor-table entry a row takes: the most specific matching entry (most key columns), earlier
 * lines first among equally specific ones; -1 (the default floor) when none matches.
 */
export function floorEntrySql(entries: readonly FloorEntry[]): string {
  if (entries.length === 0) return '-1';
  const order = entries
    .map((e, i) => ({ e, i }))
    .sort((a, b) => Object.keys(b.e.keys).length - Object.keys(a.e.keys).length || a.i - b.i);
  const whens = order.map(({ e, i }) => {
    const conds = Object.entries(e.keys).map(([col, v]) =>
      v === MISSING ? `${textSql(col)} IS NULL` : `${textSql(col)} = ${literal(v)}`,
    );
    return `WHEN ${conds.length ? conds.join(' AND ') : 'TRUE'} THEN ${i}`;
  });
  return `CASE ${whens.join(' ')} ELSE -1 END`;
}

/** Rows the scan set aside, by reason. */
export interface ScanIssues {
  readonly badWeight: number;
  readonly badScore: number;
  readonly badError: number;
  readonly unlabelled: number;
  readonly unknownSplits: ReadonlyMap<string, number>;
}

/**
 * Reads the cell query's result into a cell table, counting the rows set aside and the unknown split
 * values on the way.
 * @param copies how many times the scan counted each row (the number of grouping sets), so that the
 * counts of rows set aside are counts of rows
 * @param columns the table's slice columns: the plan's, or more (cells of a narrower plan then leave the
 * others out, as grouping sets do)
 */
export async function readCellResult(
  duck: Duck,
  sql: string,
  plan: CellPlan,
  copies = 1,
  columns: readonly string[] = plan.columns.map((c) => c.name),
): Promise<{ table: CellTable; issues: ScanIssues }> {
  const names = cellColumnNames(plan, 'local');
  const anns = plan.annotators ?? [];
  const classes = (plan.classes ?? []).length + 1;
  const { table, other } = await readCells(duck, `(${sql}) AS fg_scan`, columns, {
    limit: plan.cellLimit,
    keys: columns.map((name) => {
      const k = plan.columns.findIndex((c) => c.name === name);
      return k < 0 ? null : names.keys[k];
    }),
    split: 'fg_split',
    run: plan.runColumn ? 'fg_run' : null,
    stats: ['fg_rows', 'fg_weight', 'fg_weight_sq', 'fg_errors', 'fg_floor_sum', 'fg_floor_entry', 'fg_floor_n', 'fg_cost_sum', 'fg_cost_weight'],
    audit:
      anns.length > 0
        ? { columns: [...AUDIT_COLUMNS, ...anns.flatMap((_, j) => [names.annRows[j], names.annErrors[j], ...names.classCounts[j]])], annotators: anns.length, classes }
        : null,
  });
  let badWeight = 0;
  let badScore = 0;
  let badError = 0;
  let unlabelled = 0;
  const unknownSplits = new Map<string, number>();
  for (const [raw, count] of other) {
    if (raw === STATUS_SPLITS[4]) badWeight += count;
    else if (raw === STATUS_SPLITS[3]) badScore += count;
    else if (raw === STATUS_SPLITS[5]) badError += count;
    else if (raw === STATUS_SPLITS[2]) unlabelled += count;
    else unknownSplits.set(raw, (unknownSplits.get(raw) ?? 0) + count / copies);
  }
  const issues: ScanIssues = {
    badWeight: badWeight / copies,
    badScore: badScore / copies,
    badError: badError / copies,
    unlabelled: unlabelled / copies,
    unknownSplits,
  };
  return { table, issues };
}

/** Runs the cell scan. */
export async function scanCells(
  duck: Duck,
  plan: CellPlan,
  grouping: Grouping,
  native: { readonly view: string; readonly kinds: ReadonlyMap<string, ColumnKind> } | null = null,
): Promise<{ table: CellTable; issues: ScanIssues }> {
  const sql = native ? cellQuery(plan, grouping, { table: native.view, columnTypes: native.kinds }) : cellQuery(plan, grouping);
  return readCellResult(duck, sql, plan, grouping.kind === 'sets' ? grouping.sets.length : 1);
}

/** One-line error for unknown split values. */
export function unknownSplitError(where: string, column: string, unknown: ReadonlyMap<string, number>): Error {
  const list = [...unknown.entries()]
    .sort((a, b) => b[1] - a[1])
    .slice(0, 10)
    .map(([v, n]) => `"${v === '' ? '(empty)' : v}" (${n} rows)`)
    .join(', ');
  return error(`${where}: column "${column}" has unknown split values ${list}; expected ${SPLIT_HELP}`);
}

/** Splits present in a set of cells, with their row counts. */
export function splitRows(cells: readonly Cell[]): Record<Split, number> {
  const out: Record<Split, number> = { train: 0, train_dev: 0, dev: 0, test: 0 };
  for (const c of cells) out[c.split] += c.rows;
  return out;
}
