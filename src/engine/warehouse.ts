/**
 * The cell query for a table that lives in a warehouse: the plan is made from a local sample file when
 * there is one (the same pre-pass as a local report), else from the options alone; numeric columns
 * need their bin edges and annotator audits their classes, which a small query run on the warehouse
 * gives when they are not known.
 */
import { cellQuery } from './cell-query.js';
import type { CellPlan, Grouping } from './cells.js';
import { dialect as dialectOf, type Dialect, type DialectName } from './dialect.js';
import type { Duck } from './duck.js';
import { pairSets, planScan, type LoadOptions, type ScanPlan } from './load.js';
import { MAX_CATEGORIES, SAMPLE_ROWS } from './profile.js';
import type { Roles } from './roles.js';
import { openSource } from './source.js';
import type { SliceColumn } from './types.js';
import { readFloorTable, type FloorTable } from '../io/read-floor-table.js';
import { error } from '../util/error.js';

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
  for (const c of missingEdges) {
    const what = d.name === 'bigquery' ? 'the values between the first and the last' : 'the values';
    needs.push({ what: `bin edges of "${c}": pass ${what} as --bin-edges ${c}=e1,e2,...`, sql: edgesQuery(d, w.table, c, options.bins, options.where) });
  }
  if (annotators.length > 0 && !w.classes) {
    needs.push({ what: `classes for agreement: pass them as --classes a,b,c`, sql: classesQuery(d, w.table, [roles.label!, ...annotators], options.where) });
  }
  if (needs.length > 0) return { kind: 'needs', queries: needs };
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
export function edgesQuery(d: Dialect, table: string, column: string, bins: number, where: string | null): string {
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
export function classesQuery(d: Dialect, table: string, columns: readonly string[], where: string | null): string {
  const parts = columns.map((c) => `SELECT NULLIF(TRIM(CAST(${d.ident(c)} AS ${d.types.text})), '') AS fg_v FROM ${sample(table, where)}`);
  return `SELECT fg_v AS class, COUNT(*) AS n FROM (${parts.join(' UNION ALL ')}) AS fg_all WHERE fg_v IS NOT NULL GROUP BY fg_v ORDER BY n DESC, fg_v LIMIT ${MAX_CATEGORIES}`;
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
  return cellQuery(plan, grouping, { dialect: dialectOf(dialect), table, textColumns: false, names: 'cells' });
}
