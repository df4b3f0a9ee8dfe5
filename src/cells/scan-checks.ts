/** What the scan set aside and what its cells say, checked after it: bad rows, empty splits, weightless splits, unmatched table entries. */
import { unknownSplitError, type ScanIssues } from './scan.js';
import type { CellPlan } from './plan.js';
import { badScoreSql, badWeightSql, ERROR_WORDS_EXPECTED, WEIGHT_EXPECTED } from './row-status.js';
import { rowError, rowWeight } from './row-sql.js';
import { dialect } from '../sql/dialect.js';
import * as aq from 'arquero';
import { keyColumn, splitTotals, type CellTable } from './cell-table.js';
import type { Duck } from '../sql/duck.js';
import type { Roles } from '../read/roles.js';
import { ROWS_VIEW, type Source } from '../read/source.js';
import { ident } from '../sql/quote.js';
import type { SliceColumn } from '../core/cell.js';
import { normalizeSplit, SPLITS, type Split } from '../core/split.js';
import { describeKey, type FloorTable } from '../read/keyed-table.js';
import { firstBadRow } from '../read/locate.js';
import { error } from '../core/errors.js';

/** Rows and Σw of each split, over the cells serving the overall slice. */
export type SplitTotals = ReturnType<typeof splitTotals>;

/**
 * Every split that has rows needs some weight: a split whose rows all weigh 0 has no error rate, and
 * its gaps would silently vanish from the report. (A slice whose rows all weigh 0 is thin instead.)
 */
export function checkSplitWeights(where: string, totals: SplitTotals): void {
  const present = SPLITS.filter((s) => totals.rows[s] > 0);
  const weightless = present.filter((s) => !(totals.weight[s] > 0));
  if (weightless.length === 0) return;
  if (weightless.length === present.length) throw error(`${where}: every row has weight 0; expected some weight > 0`);
  const s = weightless[0];
  throw error(`${where}: every row with split ${s} has weight 0 (${plural(totals.rows[s], 'row')}); expected some weight > 0 in each split`);
}

export async function checkIssues(duck: Duck, source: Source, roles: Roles, plan: CellPlan, issues: ScanIssues, warnings: string[]): Promise<void> {
  if (issues.badWeight > 0) {
    const at = await firstBadRow(duck, source, badWeightSql(dialect('duckdb'), rowWeight(roles)), roles.weight!, plan.where);
    throw error(`${at}column "${roles.weight}": expected ${WEIGHT_EXPECTED}, got "${at.value}" (${plural(issues.badWeight, "row")} like it)`);
  }
  if (issues.badScore > 0) {
    const at = await firstBadRow(duck, source, badScoreSql(dialect('duckdb'), ident(roles.score!)), roles.score!, plan.where);
    throw error(`${at}column "${roles.score}": expected a number (model confidence), got "${at.value}" (${plural(issues.badScore, "row")} like it)`);
  }
  if (issues.badError > 0) {
    const at = await firstBadRow(duck, source, rowError(roles).badError, roles.error!, plan.where);
    throw error(`${at}column "${roles.error}": expected ${ERROR_WORDS_EXPECTED}, got "${at.value}" (${plural(issues.badError, "row")} like it)`);
  }
  if (issues.unknownSplits.size > 0) throw unknownSplitError(source.where, plan.splitColumn, issues.unknownSplits);
  if (issues.unlabelled > 0) {
    const what = roles.error ? `an empty "${roles.error}"` : `an empty "${roles.label}" or "${roles.pred}"`;
    warnings.push(`${plural(issues.unlabelled, 'row')} with ${what} ${issues.unlabelled === 1 ? 'was' : 'were'} left out`);
  }
}

/**
 * When rows left out for an empty label or prediction (or error value) leave no usable row at all, or
 * none in a required split, says so: "no rows with split train" would send the user looking for a
 * split that is there. Only on the error path: counts the left-out rows per split in one more query.
 */
export async function checkLeftOut(duck: Duck, where: string, plan: CellPlan, counts: Record<Split, number>, unlabelled: number): Promise<void> {
  const { roles } = plan;
  const what = roles.error ? `an empty "${roles.error}"` : `an empty "${roles.label}" or "${roles.pred}"`;
  if (SPLITS.every((s) => counts[s] === 0)) {
    const expected = roles.error ? `${ERROR_WORDS_EXPECTED} in it` : 'class labels in both columns';
    throw error(`${where}: every row was left out: ${plural(unlabelled, 'row')} ${unlabelled === 1 ? 'has' : 'have'} ${what}; expected ${expected}`);
  }
  const missing = (['train', 'dev'] as const).filter((s) => counts[s] === 0);
  if (missing.length === 0) return;
  const filter = plan.where ? ` AND (${plan.where})` : '';
  const rows = await duck.all(
    `SELECT ${ident(plan.splitColumn)} AS s, count(*) AS n FROM ${ROWS_VIEW} WHERE ${rowError(roles).unlabelled}${filter} GROUP BY 1`,
  );
  const left: Record<Split, number> = { train: 0, train_dev: 0, dev: 0, test: 0 };
  for (const r of rows) {
    const split = r.s === null ? null : normalizeSplit(String(r.s));
    if (split) left[split] += Number(r.n);
  }
  for (const s of missing) {
    if (left[s] > 0) throw error(`${where}: no usable rows with split ${s}: its ${plural(left[s], 'row')} ${left[s] === 1 ? 'has' : 'have'} ${what}`);
  }
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/**
 * Warnings for cost-table entries whose key matches no cell (judged from the cells, no extra scan;
 * an entry whose key columns no cell holds together, or that names a binned column, is not judged).
 */
export function unmatchedEntries(table: CellTable, costTable: FloorTable, columns: readonly SliceColumn[]): string[] {
  const binned = new Set(columns.filter((c) => c.kind === 'binned').map((c) => c.name));
  return costTable.entries.flatMap((e) => {
    const keys = Object.entries(e.keys);
    // cells hold bin labels for binned columns, not the values an entry names: not judged
    if (keys.some(([k]) => binned.has(k))) return [];
    const idx = keys.map(([k]) => table.columns.indexOf(k));
    if (idx.some((c) => c < 0)) return [];
    const want = keys.map(([, v], j) => table.dicts[idx[j]].indexOf(v));
    const cols = idx.map(keyColumn);
    // the cells that hold every key column of the entry (grouping sets may leave some out)
    const holding = table.table.filter(aq.escape((d: Record<string, number>) => cols.every((k) => d[k] >= 0)));
    if (holding.numRows() === 0) return [];
    const matching = holding.filter(aq.escape((d: Record<string, number>) => cols.every((k, j) => d[k] === want[j])));
    return matching.numRows() > 0 ? [] : [`${costTable.path}: line ${e.line} (${describeKey(e.keys)}) matches no row`];
  });
}
