import type { Duck } from './duck.js';
import { ROWS_VIEW, whereSql } from './source.js';
import { ident } from './sql.js';
import type { SliceColumn } from './types.js';
import { error } from '../util/error.js';

/** What the sampled pre-pass saw of one column. */
export interface ColumnProfile {
  readonly name: string;
  /** distinct non-empty values in the sample */
  readonly distinct: number;
  /** non-empty values in the sample */
  readonly present: number;
  /** non-empty values that parse as numbers */
  readonly numeric: number;
}

export interface Profile {
  readonly sampleRows: number;
  /** true when the sample holds every row (so counts from it are exact) */
  readonly complete: boolean;
  readonly columns: readonly ColumnProfile[];
}

export const SAMPLE_ROWS = 100_000;
export const MAX_CATEGORIES = 50;

function sampleSql(where: string | null, limit: number): string {
  return `(SELECT * FROM ${ROWS_VIEW} WHERE ${whereSql(where)} LIMIT ${limit})`;
}

/** Text value of a column with surrounding space removed and empty as NULL. */
export function textSql(column: string): string {
  return `NULLIF(trim(${ident(column)}), '')`;
}

/**
 * The sampled pre-pass: counts distinct, present and numeric values of each column in the first
 * 100,000 rows (after `--where`).
 */
export async function profileColumns(
  duck: Duck,
  columns: readonly string[],
  where: string | null,
  sampleRows = SAMPLE_ROWS,
): Promise<Profile> {
  const aggs = columns.flatMap((c, i) => [
    `count(DISTINCT ${textSql(c)}) AS d${i}`,
    `count(${textSql(c)}) AS p${i}`,
    `count(TRY_CAST(${textSql(c)} AS DOUBLE)) AS x${i}`,
  ]);
  const rows = await duck.all(`SELECT count(*) AS n, ${aggs.join(', ')} FROM ${sampleSql(where, sampleRows)}`);
  const r = rows[0];
  const n = Number(r.n);
  return {
    sampleRows: n,
    complete: n < sampleRows,
    columns: columns.map((name, i) => ({
      name,
      distinct: Number(r[`d${i}`]),
      present: Number(r[`p${i}`]),
      numeric: Number(r[`x${i}`]),
    })),
  };
}

/** A column is numeric when every non-empty sampled value parses as a number. */
export function isNumeric(p: ColumnProfile): boolean {
  return p.present > 0 && p.numeric === p.present;
}

/**
 * Picks candidate slice columns: every non-role column with 2–50 distinct values, plus numeric columns
 * with more (cut into bins). `explicit` (from `--slice-cols`) overrides the automatic list.
 */
export function chooseSliceColumns(
  profile: Profile,
  roleCols: readonly string[],
  explicit: readonly string[] | null,
  where: string,
): { columns: { name: string; kind: 'category' | 'binned' }[]; skipped: string[] } {
  const byName = new Map(profile.columns.map((c) => [c.name, c]));
  const kindOf = (p: ColumnProfile): 'category' | 'binned' =>
    isNumeric(p) && p.distinct > MAX_CATEGORIES ? 'binned' : 'category';
  if (explicit) {
    const columns = explicit.map((name) => {
      const p = byName.get(name);
      if (!p) {
        throw error(`${where}: --slice-cols names "${name}", which is not a column; the columns are ${[...byName.keys()].map((c) => JSON.stringify(c)).join(', ')}`);
      }
      return { name, kind: kindOf(p) };
    });
    return { columns, skipped: [] };
  }
  const columns: { name: string; kind: 'category' | 'binned' }[] = [];
  const skipped: string[] = [];
  for (const p of profile.columns) {
    if (roleCols.includes(p.name)) continue;
    if (p.distinct >= 2 && p.distinct <= MAX_CATEGORIES) columns.push({ name: p.name, kind: 'category' });
    else if (isNumeric(p) && p.distinct > MAX_CATEGORIES) columns.push({ name: p.name, kind: 'binned' });
    else skipped.push(p.name);
  }
  return { columns, skipped };
}

/** Rounds to 3 significant digits, so bin labels show the exact edges used. */
function round3(x: number): number {
  return x === 0 ? 0 : Number(x.toPrecision(3));
}

/**
 * Approximately equal-frequency bin edges from the sample's quantiles (interior edges only, rounded to
 * 3 significant digits, duplicates removed).
 */
export async function binEdges(
  duck: Duck,
  column: string,
  bins: number,
  where: string | null,
  sampleRows = SAMPLE_ROWS,
): Promise<number[]> {
  if (bins < 2) return [];
  const qs = Array.from({ length: bins - 1 }, (_, i) => (i + 1) / bins);
  const rows = await duck.all(
    `SELECT quantile_cont(v, [${qs.join(', ')}]) AS q FROM (SELECT TRY_CAST(${textSql(column)} AS DOUBLE) AS v FROM ${sampleSql(where, sampleRows)}) WHERE v IS NOT NULL AND NOT isnan(v) AND NOT isinf(v)`,
  );
  const q = (rows[0]?.q ?? null) as unknown;
  const values = q && typeof q === 'object' && 'items' in (q as object) ? ((q as { items: unknown[] }).items as number[]) : (q as number[] | null);
  if (!values) return [];
  const edges = [...new Set(values.map((v) => round3(Number(v))))].sort((a, b) => a - b);
  return edges;
}

/** Human-readable label of bin `i` of a binned column with the given interior edges. */
export function binLabel(edges: readonly number[], i: number): string {
  if (edges.length === 0) return 'all';
  if (i === 0) return `< ${edges[0]}`;
  if (i === edges.length) return `>= ${edges[edges.length - 1]}`;
  return `[${edges[i - 1]}, ${edges[i]})`;
}

/** Builds the SliceColumn list, computing bin edges for binned columns. */
export async function sliceColumns(
  duck: Duck,
  chosen: readonly { name: string; kind: 'category' | 'binned' }[],
  bins: number,
  where: string | null,
): Promise<SliceColumn[]> {
  const out: SliceColumn[] = [];
  for (const c of chosen) {
    if (c.kind === 'binned') out.push({ name: c.name, kind: 'binned', edges: await binEdges(duck, c.name, bins, where) });
    else out.push({ name: c.name, kind: 'category' });
  }
  return out;
}

/** Exact number of distinct key tuples × split in the sample (used when the sample is the whole input). */
export async function sampleTupleCount(
  duck: Duck,
  keyExprs: readonly string[],
  splitExpr: string,
  where: string | null,
): Promise<number> {
  const rows = await duck.all(
    `SELECT count(*) AS n FROM (SELECT DISTINCT ${[splitExpr, ...keyExprs].join(', ')} FROM ${sampleSql(where, SAMPLE_ROWS)})`,
  );
  return Number(rows[0].n);
}
