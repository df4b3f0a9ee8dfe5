/**
 * Paired cells for `floorgap compare`: the rows of two prediction tables joined by id within each
 * split, grouped like the cell query (the plan's slice columns, its full cross or grouping sets, × the
 * split), each cell holding the weight sums of its pairs and of its discordant pairs each way (the
 * PairedWeightSums of stats/paired-mean-interval.ts). A row pairs only when the analysis uses it on
 * both sides (row-sql.ts: rowSplit is NULL for a row it leaves out).
 */
import { SPLITS, type Split } from '../core/split.js';
import { error } from '../core/errors.js';
import type { Duck } from '../sql/duck.js';
import { literal } from '../sql/quote.js';
import { ROWS_VIEW, whereSql } from '../read/source.js';
import type { CellPlan, Grouping } from './plan.js';
import { textSql } from './profile.js';
import { keySql, rowError, rowSplit, rowWeight } from './row-sql.js';
import { groupingCovers } from './grouping.js';

/** The two sides' keyed rows, as temporary tables. */
const PAIR_SIDES = { before: 'fg_pair_before', after: 'fg_pair_after' } as const;
export type Side = keyof typeof PAIR_SIDES;

/** One paired cell: the slice columns' keys (null where a grouping set does not group), split, sums. */
export interface PairedCell {
  /** cell keys by slice column index of the plan; null when the cell's set does not group the column */
  readonly keys: readonly (string | null)[];
  readonly split: Split;
  /** index of the grouping set the cell belongs to (0 for the full cross) */
  readonly set: number;
  readonly pairs: number;
  readonly sumW: number;
  readonly sumW2: number;
  readonly bSumW: number;
  readonly bSumW2: number;
  readonly cSumW: number;
  readonly cSumW2: number;
}

/** Per split: usable rows with an id on each side and the pairs among them. */
export interface SplitPairing {
  readonly before: number;
  readonly after: number;
  readonly pairs: number;
}

/** The paired cells and how each split paired. */
export interface PairedCells {
  /** the column names of `keys`, in plan order */
  readonly columns: readonly string[];
  /** the grouping sets of the cells, as column names ([all columns] for the full cross) */
  readonly sets: readonly (readonly string[])[];
  readonly cells: readonly PairedCell[];
  readonly pairing: Readonly<Record<Split, SplitPairing>>;
}

/**
 * Keeps the current rows view's usable rows with an id (id, canonical split, error, weight and, for
 * the side whose keys the pairs take, the cell keys) in a temporary table, so the view can be opened on
 * the other side's files. Fails when an id appears twice within one split of the side.
 * @param where the side's files, for messages
 * @param run the run the side's report reads (rows of other runs are left out), null without runs
 */
export async function keepSide(duck: Duck, plan: CellPlan, side: Side, where: string, run: string | null): Promise<void> {
  const { roles } = plan;
  if (!roles.id) throw new Error('keepSide: no id column');
  const split = rowSplit(roles, plan.splitColumn);
  const runFilter = run !== null && plan.runColumn ? ` AND ${textSql(plan.runColumn)} = ${literal(run)}` : '';
  const keys = side === 'before' ? plan.columns.map((c, i) => `, ${keySql(c)} AS fg_k${i}`).join('') : '';
  const table = PAIR_SIDES[side];
  await duck.run(
    `CREATE OR REPLACE TEMP TABLE ${table} AS SELECT * FROM (SELECT ${textSql(roles.id)} AS fg_id, ${split} AS fg_s, ${rowError(roles).error} AS fg_e, ${rowWeight(roles)} AS fg_w${keys}
      FROM ${ROWS_VIEW} WHERE ${whereSql(plan.where)}${runFilter}) WHERE fg_s IS NOT NULL AND fg_id IS NOT NULL`,
  );
  const dup = await duck.all(`SELECT fg_s, fg_id, count(*) AS n FROM ${table} GROUP BY fg_s, fg_id HAVING count(*) > 1 ORDER BY fg_s, fg_id LIMIT 1`);
  if (dup.length > 0) {
    const d = dup[0];
    throw error(`${where}: id ${JSON.stringify(String(d.fg_id))} appears ${Number(d.n)} times among the ${String(d.fg_s)} rows; ids must be unique within a split to pair rows`);
  }
}

/** The grouping sets of the paired cells: the plan's, and the `by` set when they do not hold it. */
function pairedSets(plan: CellPlan, grouping: Grouping, by: readonly string[] | null): string[][] {
  const names = plan.columns.map((c) => c.name);
  if (grouping.kind === 'cross') return [names];
  const sets = grouping.sets.map((s) => [...s]);
  if (by && by.length > 0 && !groupingCovers(grouping, by)) sets.push([...by]);
  return sets;
}

/**
 * Joins the two kept sides ({@link keepSide}) on split and id and sums each cell's pairs: Σw, Σw² over
 * all pairs and over the b pairs (wrong before, right after) and the c pairs (right before, wrong
 * after). The weight is the BEFORE row's; the cell keys are the BEFORE row's.
 * @param by the `--by` columns, so that their cross is among the sets
 */
export async function pairedCells(duck: Duck, plan: CellPlan, grouping: Grouping, by: readonly string[] | null): Promise<PairedCells> {
  const columns = plan.columns.map((c) => c.name);
  const sets = pairedSets(plan, grouping, by);
  const k = (i: number) => `fg_k${i}`;
  const setSql = sets.map((s) => `(${[...s.map((name) => k(columns.indexOf(name))), 'fg_s'].join(', ')})`);
  const bits = columns.length > 0 ? `, GROUPING(${columns.map((_, i) => k(i)).join(', ')}) AS fg_mask` : ', 0 AS fg_mask';
  const w = 'b.fg_w';
  const bPair = 'b.fg_e = 1 AND a.fg_e = 0';
  const cPair = 'b.fg_e = 0 AND a.fg_e = 1';
  const rows = await duck.all(`SELECT ${columns.map((_, i) => `${k(i)}, `).join('')}fg_s${bits}, count(*) AS pairs,
      sum(${w}) AS sw, sum(${w} * ${w}) AS sw2,
      coalesce(sum(CASE WHEN ${bPair} THEN ${w} END), 0) AS bw, coalesce(sum(CASE WHEN ${bPair} THEN ${w} * ${w} END), 0) AS bw2,
      coalesce(sum(CASE WHEN ${cPair} THEN ${w} END), 0) AS cw, coalesce(sum(CASE WHEN ${cPair} THEN ${w} * ${w} END), 0) AS cw2
    FROM ${PAIR_SIDES.before} b JOIN ${PAIR_SIDES.after} a USING (fg_s, fg_id)
    GROUP BY GROUPING SETS (${setSql.join(', ')})`);
  // GROUPING(k0, …, kn) has bit n − i set when k_i is not grouped
  const maskOf = (set: readonly string[]) => columns.reduce((m, name, i) => (set.includes(name) ? m : m | (1 << (columns.length - 1 - i))), 0);
  const masks = sets.map(maskOf);
  const cells: PairedCell[] = rows.map((r) => {
    const mask = Number(r.fg_mask);
    const set = masks.indexOf(mask);
    return {
      keys: columns.map((_, i) => (r[k(i)] === null || r[k(i)] === undefined ? null : String(r[k(i)]))),
      split: String(r.fg_s) as Split,
      set: set < 0 ? 0 : set,
      pairs: Number(r.pairs),
      sumW: Number(r.sw),
      sumW2: Number(r.sw2),
      bSumW: Number(r.bw),
      bSumW2: Number(r.bw2),
      cSumW: Number(r.cw),
      cSumW2: Number(r.cw2),
    };
  });
  const counts = await duck.all(`SELECT s, sum(nb) AS nb, sum(na) AS na, sum(np) AS np FROM (
      SELECT fg_s AS s, count(*) AS nb, 0 AS na, 0 AS np FROM ${PAIR_SIDES.before} GROUP BY fg_s
      UNION ALL SELECT fg_s, 0, count(*), 0 FROM ${PAIR_SIDES.after} GROUP BY fg_s
      UNION ALL SELECT fg_s, 0, 0, count(*) FROM ${PAIR_SIDES.before} JOIN ${PAIR_SIDES.after} USING (fg_s, fg_id) GROUP BY fg_s
    ) GROUP BY s`);
  const pairing = Object.fromEntries(SPLITS.map((s) => [s, { before: 0, after: 0, pairs: 0 }])) as Record<Split, SplitPairing>;
  for (const r of counts) pairing[String(r.s) as Split] = { before: Number(r.nb), after: Number(r.na), pairs: Number(r.np) };
  return { columns, sets, cells, pairing };
}
