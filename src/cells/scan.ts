import type { Duck } from '../sql/duck.js';
import { SPLIT_HELP } from '../core/split.js';
import { AUDIT_COLUMNS, cellColumnNames, cellQuery } from './cell-query.js';
import type { ColumnKind } from '../read/source.js';
import type { CellTable } from './cell-table.js';
import { readCells } from './read-cells.js';
import { error } from '../core/errors.js';
import type { CellPlan, Grouping } from './plan.js';
import { problemOfSplit } from './row-status.js';

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
    const problem = problemOfSplit(raw);
    if (problem === 'badWeight') badWeight += count;
    else if (problem === 'badScore') badScore += count;
    else if (problem === 'badError') badError += count;
    else if (problem === 'unlabelled') unlabelled += count;
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
