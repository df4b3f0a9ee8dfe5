import type { CellPlan } from '../cells/plan.js';
import { keySql, rowError, rowInSplits, rowStatus } from '../cells/row-sql.js';
import { ROW_STATUS } from '../cells/row-status.js';
import type { Duck } from '../sql/duck.js';
import { textSql } from '../cells/profile.js';
import { ROWS_VIEW, whereSql } from '../read/source.js';
import { literal } from '../sql/quote.js';

/** One dev row the model got wrong. */
export interface ErrorExample {
  readonly id: string | null;
  readonly label: string | null;
  readonly pred: string | null;
  readonly score: number | null;
}

/**
 * The slice's dev rows the model got wrong with the highest confidence (score descending): the rows
 * most likely to carry a label error, or the model's most confident mistakes.
 * @param key the slice (column → value, as the cells hold it: bin labels for binned columns)
 * @example
 * await topErrors(duck, plan, { station: 'S5' }, 5, null); // => [{ id: 'J0001805', label: 'good', pred: 'bridge', score: 0.975 }, …]
 */
export async function topErrors(
  duck: Duck,
  plan: CellPlan,
  key: Readonly<Record<string, string>>,
  limit: number,
  run: { column: string; value: string } | null,
): Promise<ErrorExample[]> {
  const { roles } = plan;
  const conds = [
    whereSql(plan.where),
    rowInSplits(plan.splitColumn, ['dev']),
    `${rowStatus(roles)} = ${ROW_STATUS.usable}`,
    `(${rowError(roles).error}) = 1`,
  ];
  for (const [name, value] of Object.entries(key)) {
    const col = plan.columns.find((c) => c.name === name);
    if (!col) continue;
    conds.push(`${keySql(col)} = ${literal(value)}`);
  }
  if (run) conds.push(`${textSql(run.column)} = ${literal(run.value)}`);
  const score = roles.score ? `TRY_CAST(${textSql(roles.score)} AS DOUBLE)` : 'NULL::DOUBLE';
  const rows = await duck.all(
    `SELECT ${roles.id ? textSql(roles.id) : 'NULL'} AS id, ${roles.label ? textSql(roles.label) : 'NULL'} AS label, ${roles.pred ? textSql(roles.pred) : 'NULL'} AS pred, ${score} AS score
     FROM ${ROWS_VIEW} WHERE ${conds.join(' AND ')} ORDER BY score DESC NULLS LAST LIMIT ${Math.max(1, Math.floor(limit))}`,
  );
  return rows.map((r) => ({
    id: r.id === null ? null : String(r.id),
    label: r.label === null ? null : String(r.label),
    pred: r.pred === null ? null : String(r.pred),
    score: r.score === null ? null : Number(r.score),
  }));
}
