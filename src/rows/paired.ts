import type { Duck } from '../sql/duck.js';
import { keySql, rowError, rowInSplits } from '../cells/row-sql.js';
import { errorRule, inSplitsSql } from '../cells/row-status.js';
import { dialect } from '../sql/dialect.js';
import { ident } from '../sql/quote.js';
import type { Loaded } from '../cells/load.js';
import { textSql } from '../cells/profile.js';
import { resolveRoles, type RoleOptions } from '../read/roles.js';
import { ROWS_VIEW, whereSql } from '../read/source.js';
import { literal } from '../sql/quote.js';
import { describeColumns, detectTable, readError, tableSql } from '../read/table.js';
import { error } from '../core/errors.js';

/** Discordant pairs of one slice (see triage/check.ts), before the slice's thinness is known. */
export interface PairedSums {
  readonly key: Readonly<Record<string, string>>;
  readonly pairs: number;
  readonly errorsBefore: number;
  readonly errorsNow: number;
  readonly worse: number;
  readonly better: number;
}

/**
 * Fails when an id appears more than once among the dev rows of one side (`from`: a relation with an
 * `fg_id` column, ids not null): rows can pair only one to one. Names the smallest such id.
 */
async function uniqueIds(duck: Duck, from: string, file: string): Promise<void> {
  const dup = await duck.all(`SELECT fg_id, count(*) AS n FROM ${from} GROUP BY fg_id HAVING count(*) > 1 ORDER BY fg_id LIMIT 1`);
  if (dup.length > 0) throw error(`${file}: id ${JSON.stringify(String(dup[0].fg_id))} appears ${dup[0].n} times among the dev rows; ids must be unique to pair rows`);
}

/**
 * Pairs the current dev rows with the baseline model's rows of the same id and counts, per slice of
 * each grouping (and overall), the pairs the baseline got right and the current model wrong (worse)
 * and the reverse (better). One scan of each table; unweighted (McNemar's test counts pairs).
 * @param groupings the report's groupings: [[...by]] or one [column] per overview column
 */
export async function pairedCounts(
  duck: Duck,
  loaded: Loaded,
  baselinePath: string,
  roleOptions: RoleOptions,
  groupings: readonly (readonly string[])[],
  where: string | null,
  run: string | null,
): Promise<{ sums: PairedSums[]; warnings: string[] }> {
  const idCol = loaded.roles.id;
  if (!idCol) throw error(`${loaded.source.where}: a paired baseline needs an id column in both tables; name it with --id`);
  const input = await detectTable(baselinePath);
  const expr = await tableSql(duck, input);
  const baseCols = await describeColumns(duck, expr, baselinePath);
  const baseRoles = resolveRoles(baseCols, { ...roleOptions, split: undefined, run: undefined }, baselinePath, true);
  const baseId = roleOptions.id ?? idCol;
  if (!baseCols.includes(baseId)) {
    throw error(`${baselinePath}: no id column "${baseId}" to pair rows by; the columns are ${baseCols.map((c) => JSON.stringify(c)).join(', ')}`);
  }
  const splitCol = baseCols.includes(loaded.roles.split ?? '') ? loaded.roles.split : baseCols.find((c) => c.toLowerCase() === 'split') ?? null;
  // a row the report leaves out (an empty label or prediction, or an empty error value) pairs with nothing
  const base = errorRule(dialect('duckdb'), baseRoles, ident);
  const baseDev = splitCol ? inSplitsSql(dialect('duckdb'), ident(splitCol), ['dev']) : 'TRUE';
  try {
    await duck.run(
      `CREATE OR REPLACE TEMP VIEW fg_base AS SELECT ${textSql(baseId)} AS fg_id, CASE WHEN ${base.unlabelled} THEN NULL ELSE ${base.error} END AS fg_eb, 1 AS fg_in FROM ${expr} WHERE ${baseDev} AND ${textSql(baseId)} IS NOT NULL`,
    );
    await uniqueIds(duck, 'fg_base', baselinePath);
  } catch (e) {
    if (e instanceof Error && e.name === 'FloorgapError') throw e;
    throw readError(baselinePath, e);
  }

  const columns = [...new Set(groupings.flat())].map((name) => {
    const col = loaded.columns.find((c) => c.name === name);
    if (!col) throw new Error(`paired: unknown slice column ${name}`);
    return col;
  });
  const runFilter = run !== null && loaded.roles.run ? ` AND ${textSql(loaded.roles.run)} = ${literal(run)}` : '';
  const now = rowError(loaded.roles);
  const keys = columns.map((c, i) => `${keySql(c)} AS k${i}`);
  const devRows = `${ROWS_VIEW} WHERE ${whereSql(where)} AND ${rowInSplits(loaded.roles.split ?? '__fg_split', ['dev'])}${runFilter}`;
  await uniqueIds(duck, `(SELECT ${textSql(idCol)} AS fg_id FROM ${devRows}) cur WHERE fg_id IS NOT NULL`, loaded.source.where);
  const current = `SELECT ${textSql(idCol)} AS fg_id, ${now.error} AS fg_en${keys.length ? ', ' + keys.join(', ') : ''} FROM ${devRows} AND NOT ${now.unlabelled}`;
  const sets = ['()', ...groupings.map((g) => `(${g.map((name) => `k${columns.findIndex((c) => c.name === name)}`).join(', ')})`)];
  const kNames = columns.map((_, i) => `k${i}`);
  const rows = await duck.all(`SELECT ${kNames.length ? kNames.join(', ') + ', ' : ''}
      count(fg_eb) AS pairs, count(*) AS rows, count(fg_in) AS matched,
      coalesce(sum(fg_eb), 0) AS eb, coalesce(sum(CASE WHEN fg_eb IS NULL THEN NULL ELSE fg_en END), 0) AS en,
      coalesce(sum(CASE WHEN fg_eb = 0 AND fg_en = 1 THEN 1 ELSE 0 END), 0) AS worse,
      coalesce(sum(CASE WHEN fg_eb = 1 AND fg_en = 0 THEN 1 ELSE 0 END), 0) AS better
    FROM (${current}) cur LEFT JOIN fg_base USING (fg_id)
    GROUP BY GROUPING SETS (${sets.join(', ')})`);
  const sums: PairedSums[] = rows.map((r) => {
    const key: Record<string, string> = {};
    columns.forEach((c, i) => {
      const v = r[`k${i}`];
      if (v !== null && v !== undefined) key[c.name] = String(v);
    });
    return { key, pairs: Number(r.pairs), errorsBefore: Number(r.eb), errorsNow: Number(r.en), worse: Number(r.worse), better: Number(r.better) };
  });
  const overall = rows.find((r) => columns.every((_, i) => r[`k${i}`] === null || r[`k${i}`] === undefined));
  const warnings: string[] = [];
  if (overall) {
    const unmatched = Number(overall.rows) - Number(overall.matched);
    const unlabelled = Number(overall.matched) - Number(overall.pairs);
    if (unmatched > 0) warnings.push(`${unmatched} dev rows have no row with the same id in ${baselinePath}; they are left out of the paired test`);
    if (unlabelled > 0) warnings.push(`${unlabelled} dev rows have an empty label or prediction in ${baselinePath}; they are left out of the paired test`);
    if (Number(overall.pairs) === 0) throw error(`${baselinePath}: no dev row shares an id with ${loaded.source.where}; a paired baseline must hold the same examples`);
  }
  return { sums, warnings };
}
