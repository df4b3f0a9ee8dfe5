import type { Duck } from '../sql/duck.js';
import { ROWS_VIEW, whereSql } from '../read/source.js';
import { ident } from '../sql/quote.js';
import type { SliceColumn } from '../core/cell.js';
import { error } from '../core/errors.js';
import { naturalBreaks } from '../stats/natural-breaks.js';
import { DEFAULTS } from '../core/defaults.js';

/** What the sampled pre-pass saw of one column. */
export interface ColumnProfile {
  readonly name: string;
  /**
   * distinct non-empty values in the sample: exact for a column of at most about 2,000 raw values or
   * one named exact (see {@link profileColumns}); above that, an estimate within a few per cent
   */
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

export const SAMPLE_ROWS: number = DEFAULTS.sampleRows;
export const MAX_CATEGORIES = 50;

/**
 * The sampled rows: the first `limit` rows matching `where`, or `from`, a table that already holds
 * them (see {@link createSample}).
 */
function sampleSql(where: string | null, limit: number, from?: string): string {
  return from ?? `(SELECT * FROM ${ROWS_VIEW} WHERE ${whereSql(where)} LIMIT ${limit})`;
}

/** Name of the temporary table holding the sample, once {@link createSample} made it. */
const SAMPLE_TABLE = 'fg_sample';

/**
 * Copies the first 100,000 rows (after `--where`) into a temporary table, so that the pre-pass reads
 * the input once, not once per question.
 * @returns the table's name, for the `from` parameter of the pre-pass functions
 */
export async function createSample(duck: Duck, where: string | null, sampleRows = SAMPLE_ROWS, columns?: readonly string[]): Promise<string> {
  const list = columns && columns.length > 0 ? columns.map(ident).join(', ') : '*';
  // the engine keeps the input's order under LIMIT (preserve_insertion_order): the first rows, whatever
  // the number of threads (its settings are locked by now, see openDuck)
  await duck.run(`CREATE OR REPLACE TEMP TABLE ${SAMPLE_TABLE} AS SELECT ${list} FROM ${ROWS_VIEW} WHERE ${whereSql(where)} LIMIT ${sampleRows}`);
  return SAMPLE_TABLE;
}

/** Text value of a column with surrounding space removed and empty as NULL. */
export function textSql(column: string): string {
  return `NULLIF(trim(${ident(column)}), '')`;
}

/**
 * The sampled pre-pass: counts distinct, present and numeric values of each column in the first
 * 100,000 rows (after `--where`). Columns are profiled in batches, so that a table of thousands of
 * columns (embeddings stored as columns) costs time in proportion, never one query holding an
 * aggregate per column, whose memory the engine cannot bound.
 * @param exact columns whose distinct values are counted exactly however many there are (those named
 *   in `--by` or `--slice-cols`, whose count a message may quote); for the others, a count above
 *   2,000 is an estimate
 */
export async function profileColumns(
  duck: Duck,
  columns: readonly string[],
  where: string | null,
  sampleRows = SAMPLE_ROWS,
  from?: string,
  exact: ReadonlySet<string> = new Set(),
): Promise<Profile> {
  const from_ = sampleSql(where, sampleRows, from);
  const [{ n: rowCount }] = await duck.all(`SELECT count(*) AS n FROM ${from_}`);
  const n = Number(rowCount);
  // first, per column, an estimate of its raw distinct values (HyperLogLog: small, fixed memory), its
  // raw values and its smallest one; cheap aggregates that route each column to one of the passes below
  const raw: { estimate: number; values: number; min: string | null }[] = [];
  for (const batch of batches(columns.map((_, i) => i), ESTIMATE_BATCH)) {
    const aggs = batch.flatMap((i) => [`approx_count_distinct(${ident(columns[i])}) AS e${i}`, `count(${ident(columns[i])}) AS v${i}`, `min(${ident(columns[i])}) AS m${i}`]);
    const [r] = await duck.all(`SELECT ${aggs.join(', ')} FROM ${from_}`);
    for (const i of batch) raw[i] = { estimate: Number(r[`e${i}`]), values: Number(r[`v${i}`]), min: r[`m${i}`] === null ? null : String(r[`m${i}`]) };
  }
  const stats = new Map<number, { distinct: number; present: number; numeric: number }>();
  // columns with few raw values are profiled exactly on their distinct values (trim and number parsing
  // once per value, not once per row): a GROUP BY per column, or, for a small sample, where a query per
  // column costs more than its rows, one grouping of (column, value) pairs per batch
  const lowIdx = columns.map((_, i) => i).filter((i) => raw[i].estimate <= FEW_VALUES);
  const pairs = n < PAIRS_BELOW_ROWS;
  for (const batch of batches(lowIdx, pairs ? FEW_BATCH : FEW_BATCH_PER_COLUMN)) {
    const values = pairs
      ? `SELECT c, NULLIF(trim(v), '') AS t, count(*) AS n FROM (UNPIVOT (SELECT ${batch.map((i) => `${ident(columns[i])} AS c${i}`).join(', ')} FROM ${from_}) ON COLUMNS(*) INTO NAME c VALUE v) GROUP BY c, v`
      : batch.map((i) => `SELECT 'c${i}' AS c, NULLIF(trim(v), '') AS t, n FROM (SELECT ${ident(columns[i])} AS v, count(*) AS n FROM ${from_} GROUP BY 1)`).join(' UNION ALL ');
    const rows = await duck.all(
      `SELECT c, count(DISTINCT t) AS d, coalesce(sum(n) FILTER (WHERE t IS NOT NULL), 0) AS p, coalesce(sum(n) FILTER (WHERE TRY_CAST(t AS DOUBLE) IS NOT NULL), 0) AS x FROM (${values}) GROUP BY c`,
    );
    for (const r of rows) stats.set(Number(String(r.c).slice(1)), { distinct: Number(r.d), present: Number(r.p), numeric: Number(r.x) });
  }
  // columns with many values: numbers counted per row (the cast ignores surrounding spaces, as
  // trimming would); a value empty after trimming can only exist when the smallest value is empty or
  // starts with a space or a control character, else every raw value is present
  const highIdx = columns.map((_, i) => i).filter((i) => raw[i].estimate > FEW_VALUES);
  for (const batch of batches(highIdx, MANY_BATCH)) {
    const blankable = (i: number) => raw[i].min === null || raw[i].min === '' || raw[i].min!.charCodeAt(0) <= 0x20;
    const aggs = batch.flatMap((i) => [
      `count(TRY_CAST(${ident(columns[i])} AS DOUBLE)) AS x${i}`,
      ...(blankable(i) ? [`count(${textSql(columns[i])}) AS p${i}`] : []),
      ...(exact.has(columns[i]) ? [`count(DISTINCT ${textSql(columns[i])}) AS d${i}`] : []),
    ]);
    const [r] = await duck.all(`SELECT ${aggs.join(', ')} FROM ${from_}`);
    for (const i of batch) {
      stats.set(i, {
        distinct: exact.has(columns[i]) ? Number(r[`d${i}`]) : raw[i].estimate,
        present: blankable(i) ? Number(r[`p${i}`]) : raw[i].values,
        numeric: Number(r[`x${i}`]),
      });
    }
  }
  return {
    sampleRows: n,
    complete: n < sampleRows,
    columns: columns.map((name, i) => ({ name, ...(stats.get(i) ?? { distinct: 0, present: 0, numeric: 0 }) })),
  };
}

/** Columns with at most this many raw values in the sample are profiled on their distinct values. */
const FEW_VALUES = 2000;
/**
 * Columns per query of the pre-pass: the routing aggregates; columns of few values (at most about
 * 2,000 values each, so a batch groups about 512,000 pairs at most); columns of many values (each
 * perhaps an exact count(DISTINCT) over up to 100,000 values).
 */
const ESTIMATE_BATCH = 256;
const FEW_BATCH = 256;
const FEW_BATCH_PER_COLUMN = 32;
const MANY_BATCH = 32;
/**
 * Samples of fewer rows group columns of few values as (column, value) pairs; larger ones one column at
 * a time (measured on 2 cores: pairs cost less below about 20,000 rows, a query per column above).
 */
const PAIRS_BELOW_ROWS = 20_000;

function batches<T>(items: readonly T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}

/** A column is numeric when every non-empty sampled value parses as a number. */
export function isNumeric(p: ColumnProfile): boolean {
  return p.present > 0 && p.numeric === p.present;
}

/** Most candidate slice columns chosen automatically (without `--slice-cols`). */
export const MAX_AUTO_COLUMNS = 32;

/**
 * Picks candidate slice columns: every non-role column with 2–50 distinct values, plus numeric columns
 * with more (cut into bins), at most {@link MAX_AUTO_COLUMNS} of them: the columns of 2–50 values
 * first, then the binned ones, each in file order; the rest are `left` out (their names, in file
 * order). `explicit` (from `--slice-cols`) overrides the automatic list.
 */
export function chooseSliceColumns(
  profile: Profile,
  roleCols: readonly string[],
  explicit: readonly string[] | null,
  where: string,
  allColumns?: readonly string[],
): { columns: { name: string; kind: 'category' | 'binned' }[]; skipped: string[]; left: string[] } {
  const byName = new Map(profile.columns.map((c) => [c.name, c]));
  const kindOf = (p: ColumnProfile): 'category' | 'binned' =>
    isNumeric(p) && p.distinct > MAX_CATEGORIES ? 'binned' : 'category';
  if (explicit) {
    const columns = explicit.map((name) => {
      const p = byName.get(name);
      if (!p) {
        throw error(`${where}: --slice-cols names "${name}", which is not a column; the columns are ${(allColumns ?? [...byName.keys()]).map((c) => JSON.stringify(c)).join(', ')}`);
      }
      return { name, kind: kindOf(p) };
    });
    return { columns, skipped: [], left: [] };
  }
  const eligible: { name: string; kind: 'category' | 'binned' }[] = [];
  const skipped: string[] = [];
  for (const p of profile.columns) {
    if (roleCols.includes(p.name)) continue;
    if (p.distinct >= 2 && p.distinct <= MAX_CATEGORIES) eligible.push({ name: p.name, kind: 'category' });
    else if (isNumeric(p) && p.distinct > MAX_CATEGORIES) eligible.push({ name: p.name, kind: 'binned' });
    else skipped.push(p.name);
  }
  const kept = new Set(
    [...eligible.filter((c) => c.kind === 'category'), ...eligible.filter((c) => c.kind === 'binned')].slice(0, MAX_AUTO_COLUMNS).map((c) => c.name),
  );
  return {
    columns: eligible.filter((c) => kept.has(c.name)),
    skipped,
    left: eligible.filter((c) => !kept.has(c.name)).map((c) => c.name),
  };
}

/** Rounds to 3 significant digits, so bin labels show the exact edges used. */
export function round3(x: number): number {
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
  from?: string,
): Promise<number[]> {
  if (bins < 2) return [];
  const qs = Array.from({ length: bins - 1 }, (_, i) => (i + 1) / bins);
  const rows = await duck.all(
    `SELECT quantile_cont(v, [${qs.join(', ')}]) AS q FROM (SELECT TRY_CAST(${textSql(column)} AS DOUBLE) AS v FROM ${sampleSql(where, sampleRows, from)}) WHERE v IS NOT NULL AND NOT isnan(v) AND NOT isinf(v)`,
  );
  const q = (rows[0]?.q ?? null) as unknown;
  const values = q && typeof q === 'object' && 'items' in (q as object) ? ((q as { items: unknown[] }).items as number[]) : (q as number[] | null);
  if (!values) return [];
  const edges = [...new Set(values.map((v) => round3(Number(v))))].sort((a, b) => a - b);
  return edges;
}

/** How numeric slice columns are cut into bins (`--bin-method`). */
export const BIN_METHODS = ['quantile', 'natural'] as const;
export type BinMethod = (typeof BIN_METHODS)[number];

/** Most distinct values of a column that its natural breaks are computed from. */
export const NATURAL_MAX_VALUES = 10_000;

/**
 * At most `max` of the sorted `values`, evenly spaced by rank (a systematic sample: the smallest, the
 * largest, and every (n − 1)/(max − 1)-th value between); all of them when there are at most `max`.
 * @example
 * evenlySpaced([0, 1, 2, 3, 4, 5, 6, 7, 8, 9], 4); // => [0, 3, 6, 9]
 */
export function evenlySpaced(values: readonly number[], max: number): number[] {
  const n = values.length;
  if (n <= max) return [...values];
  if (max < 2) return values.slice(0, max);
  return Array.from({ length: max }, (_, i) => values[Math.round((i * (n - 1)) / (max - 1))]);
}

/**
 * The values natural breaks are computed from: the distinct finite numbers of the column in the sample,
 * sorted, at most {@link NATURAL_MAX_VALUES} of them ({@link evenlySpaced} when there are more).
 */
export async function naturalValues(duck: Duck, column: string, where: string | null, sampleRows = SAMPLE_ROWS, from?: string): Promise<number[]> {
  const rows = await duck.all(
    `SELECT DISTINCT v FROM (SELECT TRY_CAST(${textSql(column)} AS DOUBLE) AS v FROM ${sampleSql(where, sampleRows, from)}) WHERE v IS NOT NULL AND NOT isnan(v) AND NOT isinf(v) ORDER BY v`,
  );
  return evenlySpaced(rows.map((r) => Number(r.v)), NATURAL_MAX_VALUES);
}

/**
 * The edge between two runs of values, as a label shows it: the number of 3 significant digits nearest
 * `mid` (the point halfway between the runs) in (below, above], so that every value keeps its run (a bin
 * `[a, b)` puts a value equal to b in the next bin, where `above` belongs); `round3(mid)` when no such
 * number lies there (runs closer than 3 significant digits tell apart).
 * @param below the largest value of the lower run
 * @param above the smallest value of the upper run
 * @example
 * gapEdge(0.5875, 0.587, 0.588); // => 0.588 (0.587, the rounded midpoint, would move 0.587 up a bin)
 * gapEdge(15.5, 15, 16); // => 15.5
 */
export function gapEdge(mid: number, below: number, above: number): number {
  const inGap = (x: number) => x > below && x <= above;
  const nearest = round3(mid);
  if (inGap(nearest) || mid === 0) return nearest;
  // the 3-significant-digit number on the other side of the midpoint: the only other one that can be in the gap
  const step = 10 ** (Math.floor(Math.log10(Math.abs(mid))) - 2);
  const other = round3(nearest < mid ? nearest + step : nearest - step);
  return inGap(other) ? other : nearest;
}

/**
 * Bin edges at the natural breaks of the column (optimal 1-D k-means of its distinct sampled values,
 * each counted once; see {@link naturalBreaks}): interior edges between the runs, each the number of 3
 * significant digits nearest the midpoint that keeps both runs whole ({@link gapEdge}), duplicates removed.
 */
export async function naturalBinEdges(
  duck: Duck,
  column: string,
  bins: number,
  where: string | null,
  sampleRows = SAMPLE_ROWS,
  from?: string,
): Promise<number[]> {
  if (bins < 2) return [];
  const values = await naturalValues(duck, column, where, sampleRows, from);
  const edges = naturalBreaks(values, bins).map((mid) => {
    // the runs' neighbouring values: the last value below the midpoint and the first above it
    let lo = 0;
    let hi = values.length - 1;
    while (lo < hi) {
      const m = (lo + hi) >> 1;
      if (values[m] > mid) hi = m;
      else lo = m + 1;
    }
    return gapEdge(mid, values[lo - 1], values[lo]);
  });
  return [...new Set(edges)].sort((a, b) => a - b);
}

/** Human-readable label of bin `i` of a binned column with the given interior edges. */
export function binLabel(edges: readonly number[], i: number): string {
  if (edges.length === 0) return 'all';
  if (i === 0) return `< ${edges[0]}`;
  if (i === edges.length) return `>= ${edges[edges.length - 1]}`;
  return `[${edges[i - 1]}, ${edges[i]})`;
}

/** Builds the SliceColumn list, computing bin edges for binned columns by `method`. */
export async function sliceColumns(
  duck: Duck,
  chosen: readonly { name: string; kind: 'category' | 'binned' }[],
  bins: number,
  where: string | null,
  from?: string,
  method: BinMethod = 'quantile',
): Promise<SliceColumn[]> {
  const edgesOf = method === 'natural' ? naturalBinEdges : binEdges;
  const out: SliceColumn[] = [];
  for (const c of chosen) {
    if (c.kind === 'binned') out.push({ name: c.name, kind: 'binned', edges: await edgesOf(duck, c.name, bins, where, SAMPLE_ROWS, from) });
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
  from?: string,
): Promise<number> {
  const rows = await duck.all(
    `SELECT count(*) AS n FROM (SELECT DISTINCT ${[splitExpr, ...keyExprs].join(', ')} FROM ${sampleSql(where, SAMPLE_ROWS, from)})`,
  );
  return Number(rows[0].n);
}

/**
 * Distinct key tuples × split in the sample, and how many of them occur once and twice (for the Chao1
 * estimate of the cells of the whole input).
 */
export async function sampleTupleStats(
  duck: Duck,
  keyExprs: readonly string[],
  splitExpr: string,
  where: string | null,
  from?: string,
): Promise<{ distinct: number; singletons: number; doubletons: number }> {
  const rows = await duck.all(
    `SELECT count(*) AS d, count(*) FILTER (WHERE n = 1) AS f1, count(*) FILTER (WHERE n = 2) AS f2 FROM (SELECT count(*) AS n FROM ${sampleSql(where, SAMPLE_ROWS, from)} GROUP BY ${[splitExpr, ...keyExprs].join(', ')})`,
  );
  return { distinct: Number(rows[0].d), singletons: Number(rows[0].f1), doubletons: Number(rows[0].f2) };
}
