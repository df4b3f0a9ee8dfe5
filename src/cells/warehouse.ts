/**
 * The cell query for a table that lives in a warehouse: the plan is made from a local sample file when
 * there is one (the same pre-pass as a local report), else from the options alone; numeric columns
 * need their bin edges and annotator audits their classes, which a small query run on the warehouse
 * gives when they are not known.
 */
import { cellQuery } from './cell-query.js';
import type { CellPlan, Grouping } from './plan.js';
import { dialect as dialectOf, type Dialect, type DialectName } from '../sql/dialect.js';
import type { Duck } from '../sql/duck.js';
import { pairSets } from './grouping.js';
import { planScan, type ScanPlan } from './plan-scan.js';
import { type LoadOptions } from './plan.js';
import { MAX_CATEGORIES, SAMPLE_ROWS } from './profile.js';
import type { Roles } from '../read/roles.js';
import { openSource } from '../read/source.js';
import type { SliceColumn } from '../core/cell.js';
import { readFloorTable, type FloorTable } from '../read/keyed-table.js';
import { error } from '../core/errors.js';
import { hasUnsafeChars } from '../core/unsafe-chars.js';
import { printableWhere, safeWhere } from '../sql/where.js';

/** What `floorgap sql` knows beyond the load options. */
export interface WarehouseOptions {
  readonly dialect: DialectName;
  /** the warehouse table (written into the query as given) */
  readonly table: string;
  /** column → interior bin edges given with --bin-edges; a column with an empty list is numeric, edges unknown */
  readonly edges: ReadonlyMap<string, readonly number[]>;
  /** classes counted for agreement (--classes), when there is no sample file */
  readonly classes: readonly string[] | null;
  /** 'auto': as a local report would (cross without a sample file) */
  readonly grouping: 'auto' | 'cross' | 'sets';
}

/** The plan of the cell query, or the queries that must run first to make one. */
export type WarehousePlan =
  | { readonly kind: 'ready'; readonly plan: CellPlan; readonly grouping: Grouping; readonly planned: ScanPlan | null }
  | { readonly kind: 'needs'; readonly queries: readonly { readonly what: string; readonly sql: string }[] };

const CORRECT_NAMES = ['correct', 'is_correct'];

/**
 * Plans the cell query: from the sample file(s) in `options.source` when given, else from the options.
 */
export async function planWarehouse(duck: Duck, options: LoadOptions, w: WarehouseOptions): Promise<WarehousePlan> {
  const known = new Map([...w.edges].filter(([, e]) => e.length > 0));
  const hasFiles = options.source.files.length > 0 || Object.values(options.source.perSplit).some(Boolean);
  if (hasFiles) {
    const source = await openSource(duck, options.source);
    const grouping = w.grouping === 'auto' ? null : w.grouping;
    const planned = await planScan(duck, options, source, { edges: known, grouping });
    const plan = w.classes ? { ...planned.plan, classes: [...w.classes] } : planned.plan;
    return { kind: 'ready', plan, grouping: planned.grouping, planned };
  }
  const d = dialectOf(w.dialect);
  // no sample: nothing reads the filter here, it is printed for the warehouse; DuckDB's own SQL is
  // checked as a local filter is, another engine's by its characters
  tableRef(w.dialect, w.table);
  const where = options.where === null ? null : d.name === 'duckdb' ? await safeWhere(duck, options.where) : printableWhere(options.where);
  options = { ...options, where };
  // no sample: the roles are the flags, or the common names
  const r = options.roles;
  const errorCol = r.error ?? null;
  const roles: Roles = {
    label: r.label ?? (errorCol ? null : 'label'),
    pred: errorCol ? null : r.pred ?? 'pred',
    error: errorCol,
    errorIsCorrect: errorCol !== null && CORRECT_NAMES.includes(errorCol.toLowerCase()),
    split: r.split ?? 'split',
    id: r.id ?? null,
    score: r.score ?? null,
    weight: r.weight ?? null,
    run: r.run ?? null,
  };
  const annotators = [...(options.annotators ?? [])];
  if (annotators.length > 0 && roles.label === null) {
    throw error('--annotators compares human labels with the true class, so it needs a label column (--label)');
  }
  let floorTable: FloorTable | null = null;
  if (options.floorTable) floorTable = await readFloorTable(duck, options.floorTable);
  let costTable: FloorTable | null = null;
  if (options.costTable) costTable = await readFloorTable(duck, options.costTable, 'label_cost');
  const names: string[] = [];
  const add = (n: string) => {
    if (!names.includes(n)) names.push(n);
  };
  for (const n of options.sliceCols ?? []) add(n);
  // without a sample every name is taken as a column; label and pred stand for their role columns
  const by = options.by ? options.by.map((b) => (b === 'label' && roles.label ? roles.label : b === 'pred' && roles.pred ? roles.pred : b)) : null;
  for (const n of by ?? []) add(n);
  for (const n of floorTable?.keyColumns ?? []) add(n);
  for (const n of costTable?.keyColumns ?? []) add(n);
  if (names.length === 0) throw error('floorgap sql without a sample file needs the slice columns: --slice-cols a,b,c (or --by), or give a local sample of the table');
  const needs: { what: string; sql: string }[] = [];
  const missingEdges = [...w.edges].filter(([, e]) => e.length === 0).map(([c]) => c);
  if (missingEdges.length > 0 && options.binMethod === 'natural') {
    // natural breaks come from the column's values, which only a local sample gives
    const c = missingEdges[0];
    throw error(`--bin-method natural needs the values of ${JSON.stringify(c)}, which floorgap sql reads from a local sample of the table: give a sample file (floorgap sql sample.parquet --table ${tableRef(w.dialect, w.table)} --bin-method natural …), or the edges as --bin-edges ${JSON.stringify(`${c}=e1,e2,...`)}`);
  }
  for (const c of missingEdges) {
    const what = d.name === 'bigquery' ? 'the values between the first and the last' : 'the values';
    needs.push({ what: `bin edges of ${JSON.stringify(c)}: pass ${what} as --bin-edges ${JSON.stringify(`${c}=e1,e2,...`)}`, sql: edgesQuery(d, w.table, c, options.bins, options.where) });
  }
  if (annotators.length > 0 && !w.classes) {
    needs.push({ what: `classes for agreement: pass them as --classes a,b,c`, sql: classesQuery(d, w.table, [roles.label!, ...annotators], options.where) });
  }
  if (needs.length > 0) return { kind: 'needs', queries: needs.map((q) => ({ what: q.what, sql: printable(q.sql, [...names, ...annotators, roles.label ?? '']) })) };
  const columns: SliceColumn[] = names.map((name) => (known.has(name) ? { name, kind: 'binned', edges: [...known.get(name)!] } : { name, kind: 'category' }));
  const plan: CellPlan = {
    roles,
    splitColumn: roles.split!,
    columns,
    floorEntries: floorTable?.entries ?? [],
    defaultFloor: options.floor ?? 0,
    where: options.where,
    runColumn: roles.run,
    annotators,
    classes: [...(w.classes ?? [])].sort(),
    costEntries: costTable?.entries ?? [],
  };
  const grouping: Grouping = w.grouping === 'sets' ? pairSets(names, by) : { kind: 'cross' };
  return { kind: 'ready', plan, grouping, planned: null };
}

function sample(table: string, where: string | null): string {
  return `(SELECT * FROM ${table}${where ? ` WHERE (${where})` : ''} LIMIT ${SAMPLE_ROWS}) AS fg_sample`;
}

/** A query for the interior bin edges of a numeric column: quantiles of the first 100,000 rows. */
function edgesQuery(d: Dialect, table: string, column: string, bins: number, where: string | null): string {
  const x = d.toNumber(`CAST(${d.ident(column)} AS ${d.types.text})`);
  const qs = Array.from({ length: bins - 1 }, (_, i) => (i + 1) / bins);
  const from = `(SELECT ${x} AS fg_x FROM ${sample(table, where)}) AS fg_v WHERE fg_x IS NOT NULL AND ${d.isFinite('fg_x')}`;
  switch (d.name) {
    case 'duckdb':
      return `SELECT quantile_cont(fg_x, [${qs.join(', ')}]) AS edges FROM ${from}`;
    case 'trino':
      return `SELECT approx_percentile(fg_x, ARRAY[${qs.join(', ')}]) AS edges FROM ${from}`;
    case 'spark':
      return `SELECT percentile_approx(fg_x, array(${qs.join(', ')})) AS edges FROM ${from}`;
    case 'bigquery':
      return `SELECT APPROX_QUANTILES(fg_x, ${bins}) AS edges FROM ${from}`;
    case 'ansi':
      return `SELECT ${qs.map((q, i) => `PERCENTILE_CONT(${q}) WITHIN GROUP (ORDER BY fg_x) AS q${i + 1}`).join(', ')} FROM ${from}`;
  }
}

/** A query for the classes counted for agreement: the 50 most frequent labels of the first 100,000 rows. */
function classesQuery(d: Dialect, table: string, columns: readonly string[], where: string | null): string {
  const parts = columns.map((c) => `SELECT NULLIF(TRIM(CAST(${d.ident(c)} AS ${d.types.text})), '') AS fg_v FROM ${sample(table, where)}`);
  return `SELECT fg_v AS class, COUNT(*) AS n FROM (${parts.join(' UNION ALL ')}) AS fg_all WHERE fg_v IS NOT NULL GROUP BY fg_v ORDER BY n DESC, fg_v LIMIT ${MAX_CATEGORIES}`;
}

/**
 * Checks `--table` as a table name the query can read: dot-separated parts, each a plain name
 * (letters, digits, `_`, `$`; `-` too for BigQuery's project ids) or a name quoted as the dialect quotes
 * names (`"…"`, or `` `…` `` for Spark and BigQuery, a doubled quote inside). Anything else — a space, a
 * `;`, a comment, a parenthesis, a line break — could make the printed text more than one query.
 * @example
 * tableRef('trino', 'lake.ml.preds'); // => 'lake.ml.preds'
 * tableRef('trino', 'preds; DROP TABLE preds'); // throws
 */
export function tableRef(dialect: DialectName, table: string): string {
  const quote = dialect === 'spark' || dialect === 'bigquery' ? '`' : '"';
  const bare = dialect === 'bigquery' ? /[A-Za-z0-9_$-]/ : /[A-Za-z0-9_$]/;
  const refuse = (why: string) =>
    error(`--table ${JSON.stringify(table)}: ${why}; expected a table name such as lake.ml.preds (quote a part as ${quote}my table${quote})`);
  if (table.trim() === '') throw refuse('empty');
  if (hasUnsafeChars(table)) throw refuse('holds a line break or control character');
  let i = 0;
  let parts = 0;
  while (i < table.length) {
    if (table[i] === quote) {
      let j = i + 1;
      for (; j < table.length; j++) {
        if (table[j] === quote) {
          if (table[j + 1] === quote) j++;
          else break;
        }
      }
      if (j >= table.length) throw refuse(`a ${quote} is never closed`);
      if (dialect === 'bigquery' && table.slice(i + 1, j).includes('\\')) throw refuse('a backslash in a quoted name');
      i = j + 1;
    } else {
      const start = i;
      while (i < table.length && bare.test(table[i])) i++;
      if (i === start) throw refuse(`${JSON.stringify(table[i])} is not part of a name`);
    }
    parts++;
    if (i < table.length) {
      if (table[i] !== '.') throw refuse(`${JSON.stringify(table[i])} is not part of a name`);
      i++;
      if (i === table.length) throw refuse('it ends with a dot');
    }
  }
  if (parts > 4) throw refuse('more than four dot-separated parts');
  return table;
}

/**
 * The cell query for the warehouse, in the cells file format.
 * @example
 * warehouseQuery(plan, { kind: 'cross' }, 'trino', 'lake.preds');
 */
export function warehouseQuery(plan: CellPlan, grouping: Grouping, dialect: DialectName, table: string): string {
  for (const c of plan.columns) {
    if (c.name.startsWith('fg_')) {
      throw error(`column "${c.name}" starts with fg_, which cells files keep for statistics; rename it (e.g. with a view) or leave it out with --slice-cols`);
    }
  }
  const query = cellQuery(plan, grouping, { dialect: dialectOf(dialect), table: tableRef(dialect, table), textColumns: false, names: 'cells' });
  const names = [...plan.columns.map((c) => c.name), ...Object.values(plan.roles).filter((v): v is string => typeof v === 'string'), ...(plan.annotators ?? [])];
  return printable(query, names);
}

/**
 * A query to print, checked: literals carry unsafe characters as escapes (see Dialect.str); a quoted
 * column name keeps a line break or tab as it is (valid inside the quotes, and the name it is); any
 * other unsafe character can only come from a name, which is refused.
 */
function printable(query: string, names: readonly string[]): string {
  if (!hasUnsafeChars(query.replace(/[\n\r\t]/g, ' '))) return query;
  const bad = names.find((n) => hasUnsafeChars(n.replace(/[\n\r\t]/g, ' '))) ?? '?';
  throw error(`column ${JSON.stringify(bad)}: its name holds a control character, which a printed query cannot carry safely; rename it in the warehouse (e.g. with a view) or leave it out with --slice-cols`);
}
