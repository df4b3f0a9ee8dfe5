import { readCellResult, scanCells, unknownSplitError, type ScanIssues } from './scan.js';
import type { CellPlan, Grouping } from './plan.js';
import { cellQuery } from './cell-query.js';
import { badScoreSql, badWeightSql, ERROR_WORDS_EXPECTED, WEIGHT_EXPECTED } from './row-status.js';
import { keySql, rowError, rowWeight } from './row-sql.js';
import { dialect } from '../sql/dialect.js';
import * as aq from 'arquero';
import { hasAudit, keyColumn, mergeCells, runsOf, splitTotals, usedFloorEntries, type CellTable } from './cell-table.js';
import type { Duck } from '../sql/duck.js';
import { chooseSliceColumns, createSample, MAX_AUTO_COLUMNS, MAX_CATEGORIES, profileColumns, SAMPLE_ROWS, sampleTupleCount, sampleTupleStats, sliceColumns, type Profile } from './profile.js';
import { chao1 } from '../stats/chao1.js';
import { resolveRoles, roleColumns, type RoleOptions, type Roles } from '../read/roles.js';
import { checkWhere, openSource, ROWS_VIEW, type Source, type SourceSpec } from '../read/source.js';
import { safeWhere } from '../sql/where.js';
import { ident } from '../sql/quote.js';
import type { SliceColumn } from '../core/cell.js';
import { normalizeSplit, SPLITS, type Split } from '../core/split.js';
import { textSql, type BinMethod } from './profile.js';
import { cacheKey, readCache, writeCache } from './cache.js';
import { describeKey, readFloorTable, type FloorTable } from '../read/keyed-table.js';
import { locateReadError, readError, withReadErrors } from '../read/read-errors.js';
import { firstBadRow } from '../read/locate.js';
import { error, FloorgapError } from '../core/errors.js';
import { DEFAULTS } from '../core/defaults.js';

/** Options of loading rows into cells. */
export interface LoadOptions {
  readonly source: SourceSpec;
  readonly roles: RoleOptions;
  readonly where: string | null;
  /** the `--by` columns (role names `label`/`pred` accepted); they join the cell columns */
  readonly by: readonly string[] | null;
  readonly sliceCols: readonly string[] | null;
  readonly bins: number;
  /** how numeric columns are cut into bins: 'quantile' (the default, about equal frequency) or 'natural' (natural breaks) */
  readonly binMethod?: BinMethod;
  readonly maxCells: number;
  /** most slices one grouping (the `--by` cross, or the overview) may hold; default {@link MAX_SLICES} */
  readonly maxSlices?: number;
  readonly floor: number | null;
  readonly floorTable: string | null;
  /** annotator columns: human labels on audited rows */
  readonly annotators?: readonly string[] | null;
  /** cost table (key columns + label_cost); rows it does not cover cost --label-cost */
  readonly costTable?: string | null;
}

/** Cells and everything known about how they were made. */
export interface Loaded {
  /** 'rows': cells scanned from prediction tables (the rows view is open); 'cells': ready-made cells (--cells), no rows */
  readonly origin?: 'rows' | 'cells';
  readonly source: Source;
  readonly roles: Roles;
  readonly columns: readonly SliceColumn[];
  /** candidate columns for the overview (not label/pred unless asked) */
  readonly overviewColumns: readonly string[];
  readonly by: readonly string[] | null;
  /** the cells: what every roll-up reads */
  readonly table: CellTable;
  readonly grouping: Grouping;
  readonly floorTable: FloorTable | null;
  readonly costTable: FloorTable | null;
  readonly warnings: readonly string[];
  readonly profile: Profile;
  /** annotator columns, in the order of the cells' audit sums */
  readonly annotators: readonly string[];
  /** classes counted for agreement (the last audit class index is "any other") */
  readonly classes: readonly string[];
  /** runs in the input (sorted), [] without a run column */
  readonly runs: readonly string[];
  /** the scan's plan, for later scans of the same rows (a regroup that grouping sets do not cover) */
  readonly plan: CellPlan;
}

/** Maps role names used in `--by` (label, pred) to the columns that play them. */
function resolveBy(by: readonly string[], columns: readonly string[], roles: Roles, where: string): string[] {
  return by.map((b) => {
    if (columns.includes(b)) return b;
    if (b === 'label' && roles.label) return roles.label;
    if (b === 'pred' && roles.pred) return roles.pred;
    throw error(`${where}: --by names "${b}", which is not a column; the columns are ${columns.map((c) => JSON.stringify(c)).join(', ')}`);
  });
}

/**
 * read → cells: opens the inputs, resolves roles, runs the sampled pre-pass, reads the floor table, and
 * computes the cells in one DuckDB scan (full cross when small, else grouping sets).
 */
export async function loadCells(duck: Duck, options: LoadOptions, hooks: LoadHooks = {}): Promise<Loaded> {
  const source = await openSource(duck, options.source);
  const cache = hooks.cache ?? null;
  const key = cache ? await cacheKey(options, cache.version, cache.cwd) : null;
  if (cache && key) {
    const hit = await readCache(cache.dir, key);
    if (hit) return { ...hit, source };
  }
  const bytes = source.inputs.reduce((a, i) => a + i.bytes, 0);
  const stop = hooks.onScan?.(duck, { where: source.where, bytes }) ?? (() => undefined);
  let loaded: Loaded;
  try {
    loaded = await scanSource(duck, options, source);
  } finally {
    stop();
  }
  if (cache && key) await writeCache(cache.dir, key, loaded);
  return loaded;
}

/** What a caller can add to a load: a cache of cells, and a watcher of the scan. */
export interface LoadHooks {
  /** where cached cells live (see cells/cache.ts); no cache when absent */
  readonly cache?: { readonly dir: string; readonly cwd: string; readonly version: string } | null;
  /** called when reading the rows starts (never for cached cells); the function it returns when it ends */
  readonly onScan?: (duck: Duck, info: { readonly where: string; readonly bytes: number }) => () => void;
}

/** Everything decided before the scan: the plan of the cell query and what it rests on. */
export interface ScanPlan {
  readonly source: Source;
  readonly roles: Roles;
  readonly plan: CellPlan;
  readonly grouping: Grouping;
  /** the cell columns (candidates, plus --by and floor/cost-table key columns) */
  readonly columns: readonly SliceColumn[];
  /** the candidate columns, for the overview */
  readonly overviewColumns: readonly string[];
  readonly by: readonly string[] | null;
  readonly floorTable: FloorTable | null;
  readonly costTable: FloorTable | null;
  readonly warnings: readonly string[];
  readonly profile: Profile;
  readonly annotators: readonly string[];
}

async function scanSource(duck: Duck, options: LoadOptions, source: Source): Promise<Loaded> {
  const planned = await planScan(duck, options, source);
  return scanPlanned(duck, planned);
}

/**
 * The sampled pre-pass: roles, candidate columns, bin edges, floor and cost tables, annotator classes,
 * and the grouping (full cross or grouping sets) — everything the cell query needs.
 * @param overrides bin edges given by the user (column → interior edges) and a forced grouping
 */
export async function planScan(
  duck: Duck,
  options: LoadOptions,
  source: Source,
  overrides: { readonly edges?: ReadonlyMap<string, readonly number[]>; readonly grouping?: 'cross' | 'sets' | null } = {},
): Promise<ScanPlan> {
  const warnings: string[] = [];
  const unnamed = source.unnamed ?? [];
  for (const u of unnamed) warnings.push(`${u.path}: column ${u.column} has no name and was left out; name it in the header to use it`);
  return withUnnamedNote(unnamed, () => planColumns(duck, options, source, overrides, warnings));
}

/**
 * Runs `plan`; when it fails for want of a column (a message listing "the columns are …") and an
 * input has unnamed columns, which were left out, the message says so: the column may be that one.
 */
async function withUnnamedNote<T>(unnamed: NonNullable<Source['unnamed']>, plan: () => Promise<T>): Promise<T> {
  try {
    return await plan();
  } catch (e) {
    if (!(e instanceof FloorgapError) || unnamed.length === 0 || !e.message.includes('the columns are ')) throw e;
    const note = unnamed.map((u) => `column ${u.column} of ${u.path}`).join(', ');
    throw error(`${e.message}; ${note} ${unnamed.length === 1 ? 'has' : 'have'} no name and ${unnamed.length === 1 ? 'was' : 'were'} left out`, e, e.exitCode);
  }
}

/** {@link planScan} itself; `warnings` collects its warnings. */
async function planColumns(
  duck: Duck,
  options: LoadOptions,
  source: Source,
  overrides: { readonly edges?: ReadonlyMap<string, readonly number[]>; readonly grouping?: 'cross' | 'sets' | null },
  warnings: string[],
): Promise<ScanPlan> {
  const roles = resolveRoles(source.columns, options.roles, source.where, source.splitColumn !== null);
  const splitColumn = roles.split ?? source.splitColumn!;
  // from here on the filter is the checked text DuckDB wrote back, never the text as given
  const givenWhere = options.where;
  options = { ...options, where: await safeWhere(duck, options.where) };
  await checkWhere(duck, options.where, givenWhere);
  const dataColumns = source.columns.filter((c) => c !== source.splitColumn);
  // role columns that never become slice columns are not profiled (an id column's 100,000 distinct
  // values cost more than all the others), unless named as slice columns
  const named = new Set([...(options.sliceCols ?? []), ...(options.by ?? [])]);
  const unsliced = new Set([roles.id, roles.score, roles.weight, roles.error, roles.run, roles.split, ...(options.annotators ?? [])].filter((c): c is string => c !== null));
  const profiled = dataColumns.filter((c) => !unsliced.has(c) || named.has(c));
  const sampled = [...new Set([...profiled, splitColumn, ...(roles.label ? [roles.label] : []), ...(options.annotators ?? [])])].filter(
    (c) => c === splitColumn || source.columns.includes(c),
  );
  const sample = await withReadErrors(source.inputs, source.where, () => createSample(duck, options.where, SAMPLE_ROWS, sampled));
  const profile = await profileColumns(duck, profiled, options.where, SAMPLE_ROWS, sample, named);
  if (profile.sampleRows === 0) {
    throw error(givenWhere ? `${source.where}: no rows match --where "${givenWhere}"` : `${source.where}: no rows; expected a header and data rows`);
  }
  const annotators = [...(options.annotators ?? [])];
  for (const a of annotators) {
    if (!dataColumns.includes(a)) {
      throw error(`${source.where}: no column "${a}" for --annotators; the columns are ${dataColumns.map((c) => JSON.stringify(c)).join(', ')}`);
    }
    if (roleColumns(roles).includes(a)) throw error(`${source.where}: column "${a}" cannot be both an annotator and a role column`);
  }
  if (annotators.length > 0 && roles.label === null) {
    throw error(`${source.where}: --annotators compares human labels with the true class, so it needs a label column (--label)`);
  }
  const roleCols = [...roleColumns(roles), ...annotators];
  for (const [flag, names] of [['--slice-cols', options.sliceCols], ['--by', options.by]] as const) {
    for (const name of names ?? []) {
      if (name === roles.run) throw error(`${flag} names the run column "${name}"; runs are compared by the learning curve, never sliced`);
      if (annotators.includes(name)) throw error(`${flag} names the annotator column "${name}"; annotator columns give floors, not slices`);
    }
  }
  const chosen = chooseSliceColumns(profile, roleCols, options.sliceCols, source.where, dataColumns);
  if (chosen.left.length > 0) {
    const n = chosen.left.length;
    warnings.push(
      `${n.toLocaleString('en-US')} more candidate slice column${n === 1 ? ' was' : 's were'} left out (${someNames(chosen.left)}): at most ${MAX_AUTO_COLUMNS} are chosen by themselves, columns of 2–${MAX_CATEGORIES} values first, then numeric ones, each in file order; choose them with --slice-cols`,
    );
  }
  const by = options.by ? resolveBy(options.by, dataColumns, roles, source.where) : null;
  // key columns of floor and cost tables are slice columns: label, pred and split are allowed (a floor
  // per true class), the row-level roles and annotator columns are not
  const notKeys = new Map<string, string>();
  for (const r of ['id', 'weight', 'score', 'error', 'run'] as const) {
    const col = roles[r];
    if (col) notKeys.set(col, `the ${r} column`);
  }
  for (const a of annotators) notKeys.set(a, 'an annotator column');
  const checkKeys = (path: string, table: FloorTable) => {
    for (const k of table.keyColumns) {
      if (!dataColumns.includes(k)) {
        throw error(`${path}: key column "${k}" is not a column of ${source.where}; the columns are ${dataColumns.map((c) => JSON.stringify(c)).join(', ')}`);
      }
      const role = notKeys.get(k);
      if (role) throw error(`${path}: key column "${k}" is ${role} of ${source.where}; keys must be slice columns (e.g. package), label, pred or split`);
    }
  };
  let floorTable: FloorTable | null = null;
  if (options.floorTable) {
    floorTable = await readFloorTable(duck, options.floorTable);
    checkKeys(options.floorTable, floorTable);
  }
  let costTable: FloorTable | null = null;
  if (options.costTable) {
    costTable = await readFloorTable(duck, options.costTable, 'label_cost');
    checkKeys(options.costTable, costTable);
  }
  // cell columns: candidates, plus --by columns and floor/cost-table keys that are not candidates
  const wanted = [...chosen.columns];
  const extra = [...(by ?? []), ...(floorTable?.keyColumns ?? []), ...(costTable?.keyColumns ?? [])];
  for (const name of extra) {
    if (wanted.some((c) => c.name === name)) continue;
    const p = profile.columns.find((c) => c.name === name);
    wanted.push({ name, kind: p && p.present === p.numeric && p.distinct > 50 && p.present > 0 ? 'binned' : 'category' });
  }
  if (wanted.length === 0 && !by) warnings.push('no candidate slice columns (2–50 distinct values, or numeric); name some with --slice-cols');
  const edges = overrides.edges ?? new Map<string, readonly number[]>();
  const columns = (await sliceColumns(duck, wanted.filter((c) => !edges.has(c.name)), options.bins, options.where, sample, options.binMethod)).concat(
    wanted.filter((c) => edges.has(c.name)).map((c): SliceColumn => ({ name: c.name, kind: 'binned', edges: [...edges.get(c.name)!] })),
  );
  columns.sort((a, b) => wanted.findIndex((w) => w.name === a.name) - wanted.findIndex((w) => w.name === b.name));
  await checkSliceCount(duck, profile, columns, by, chosen.columns.map((c) => c.name), options, sample);
  if (options.floor === null && !floorTable && annotators.length === 0) {
    warnings.push('no floor given (--floor or --floor-table): avoidable bias is measured against perfection (floor 0)');
  }
  const plan: CellPlan = {
    roles,
    splitColumn,
    columns,
    floorEntries: floorTable?.entries ?? [],
    defaultFloor: options.floor ?? 0,
    where: options.where,
    runColumn: roles.run,
    annotators,
    classes: annotators.length ? await auditClasses(duck, [roles.label!, ...annotators], sample) : [],
    costEntries: costTable?.entries ?? [],
    cellLimit: cellLimit(options.maxCells),
  };
  const grouping = overrides.grouping
    ? overrides.grouping === 'cross'
      ? ({ kind: 'cross' } as const)
      : pairSets(columns.map((c) => c.name), by)
    : await chooseGrouping(duck, plan, profile, options.maxCells, by, sample);
  return { source, roles, plan, grouping, columns, overviewColumns: chosen.columns.map((c) => c.name), by, floorTable, costTable, warnings, profile, annotators };
}

/** Default most slices one grouping may hold (`--max-slices`). */
const MAX_SLICES = DEFAULTS.maxSlices;
/**
 * Most cells a scan reads into memory: 5 × `--max-cells`, and never less than 1,000,000 (about 100 MB),
 * so that a small `--max-cells` (which only chooses grouping sets sooner) does not refuse small tables.
 */
export function cellLimit(maxCells: number): number {
  return 5 * Math.max(maxCells, DEFAULTS.maxCells);
}

/**
 * Stops a grouping that would list more than `--max-slices` slices before the scan: a column of ids or
 * serial numbers named in `--by` or `--slice-cols` would otherwise fill memory with one slice per row.
 * Counted in the sample (the first 100,000 rows), so the count is exact or a lower bound.
 */
async function checkSliceCount(
  duck: Duck,
  profile: Profile,
  columns: readonly SliceColumn[],
  by: readonly string[] | null,
  overview: readonly string[],
  options: LoadOptions,
  sample: string,
): Promise<void> {
  const max = options.maxSlices ?? MAX_SLICES;
  const values = (name: string) => {
    const c = columns.find((x) => x.name === name);
    if (c?.kind === 'binned') return (c.edges?.length ?? 0) + 1;
    return Math.max(1, profile.columns.find((x) => x.name === name)?.distinct ?? 1);
  };
  const where = profile.complete ? 'the rows hold' : `the first ${SAMPLE_ROWS.toLocaleString('en-US')} rows alone hold`;
  const advice = 'slice by fewer or coarser columns (numbers are binned: --bins), narrow the rows with --where, or raise --max-slices';
  if (by) {
    let n = by.reduce((p, name) => p * values(name), 1);
    if (n > max && by.length > 1) {
      const keys = by.map((name) => keySql(columns.find((c) => c.name === name) ?? { name, kind: 'category' }));
      n = await sampleTupleCount(duck, keys, '0', options.where, sample);
    }
    if (n > max) {
      throw error(`--by ${by.join(',')}: ${where} ${n.toLocaleString('en-US')} slices, more than --max-slices ${max.toLocaleString('en-US')}; ${advice}`);
    }
    return;
  }
  const n = overview.reduce((sum, name) => sum + values(name), 0);
  if (n > max) {
    const big = [...overview].sort((a, b) => values(b) - values(a))[0];
    throw error(
      `the overview's columns give ${n.toLocaleString('en-US')} slices (${big} alone ${values(big).toLocaleString('en-US')}), more than --max-slices ${max.toLocaleString('en-US')}; name fewer or coarser columns in --slice-cols (numbers are binned: --bins), narrow the rows with --where, or raise --max-slices`,
    );
  }
}

/** The scan of a planned load: cells, checks of the rows set aside, warnings. */
async function scanPlanned(duck: Duck, planned: ScanPlan): Promise<Loaded> {
  const { source, roles, plan, grouping, columns, by, floorTable, costTable, profile, annotators } = planned;
  const warnings = [...planned.warnings];
  const scanned = await scanCells(duck, plan, grouping, source.native ?? null).catch(async (e) => {
    if (e instanceof Error && e.name === 'FloorgapError') throw e;
    throw (await locateReadError(source.inputs, e)) ?? readError(source.where, e);
  });
  let table = scanned.table;
  const issues = scanned.issues;
  await checkIssues(duck, source, roles, plan, issues, warnings);
  if (grouping.kind === 'sets' && by && by.length > 2) {
    // a by of three or more columns: one more GROUP BY for exactly those columns
    table = mergeCells(table, await scanGrouping(duck, plan, by));
  }
  const totals = splitTotals(table);
  const counts = totals.rows;
  if (issues.unlabelled > 0) await checkLeftOut(duck, source.where, plan, counts, issues.unlabelled);
  for (const required of ['train', 'dev'] as const) {
    if (counts[required] === 0) {
      const present = (Object.keys(counts) as Split[]).filter((s) => counts[s] > 0);
      throw error(
        `${source.where}: no rows with split ${required}${present.length ? ` (found ${present.join(', ')})` : ''}; train and dev are required, train_dev and test are optional`,
      );
    }
  }
  checkSplitWeights(source.where, totals);
  if (floorTable) {
    const used = usedFloorEntries(table);
    for (const [i, e] of floorTable.entries.entries()) {
      if (!used.has(i)) warnings.push(`${floorTable.path}: line ${e.line} (${describeKey(e.keys)}) matches no row`);
    }
  }
  if (costTable) warnings.push(...unmatchedEntries(table, costTable, columns));
  if (annotators.length > 0 && !hasAudit(table)) {
    warnings.push(`no row has a label in the annotator columns ${annotators.join(', ')}: floors fall back to --floor`);
  }
  const runs = runsOf(table);
  const overviewColumns = planned.overviewColumns;
  return { origin: 'rows', source, roles, columns, overviewColumns, by, table, grouping, floorTable, costTable, warnings, profile, annotators, classes: plan.classes ?? [], runs, plan };
}

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

/**
 * Full cross when the cells it would hold are at most `maxCells`, else grouping sets of every column and
 * every pair. The count is exact when the sample holds every row; otherwise the product of the columns'
 * value counts, or, when that is too large, the Chao1 estimate from the sample's key tuples (columns
 * often nest, e.g. a board belongs to one package, so the product overstates the cross).
 */
async function chooseGrouping(duck: Duck, plan: CellPlan, profile: Profile, maxCells: number, by: readonly string[] | null, sample: string): Promise<Grouping> {
  const names = plan.columns.map((c) => c.name);
  const splitExpr = 'lower(trim(' + `"${plan.splitColumn.replace(/"/g, '""')}"` + '))';
  let estimate: number;
  if (profile.complete) {
    estimate = await sampleTupleCount(duck, plan.columns.map(keySql), splitExpr, plan.where, sample);
  } else {
    estimate = 4;
    for (const c of plan.columns) {
      const p = profile.columns.find((x) => x.name === c.name)!;
      const values = c.kind === 'binned' ? (c.edges?.length ?? 0) + 2 : p.distinct + 1;
      estimate *= values;
      if (estimate > 1e12) break;
    }
    if (estimate > maxCells) {
      // raw values are enough for an estimate (trimming merges a few at most)
      const keys = plan.columns.map((c) => (c.kind === 'binned' && c.edges?.length ? keySql(c) : ident(c.name)));
      const t = await sampleTupleStats(duck, keys, ident(plan.splitColumn), plan.where, sample);
      estimate = Math.min(estimate, chao1(t.distinct, t.singletons, t.doubletons));
    }
  }
  if (estimate <= maxCells) return { kind: 'cross' };
  return pairSets(names, by);
}

/** Grouping sets of every column and every pair (and the `by` pair when it is not one of them). */
export function pairSets(names: readonly string[], by: readonly string[] | null): Grouping {
  const sets: string[][] = names.map((n) => [n]);
  for (let i = 0; i < names.length; i++) for (let j = i + 1; j < names.length; j++) sets.push([names[i], names[j]]);
  const want = by ? [...by].sort().join('\u0000') : '';
  if (by && by.length === 2 && !sets.some((s) => [...s].sort().join('\u0000') === want)) sets.push([...by]);
  return { kind: 'sets', sets };
}

async function checkIssues(duck: Duck, source: Source, roles: Roles, plan: CellPlan, issues: ScanIssues, warnings: string[]): Promise<void> {
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
async function checkLeftOut(duck: Duck, where: string, plan: CellPlan, counts: Record<Split, number>, unlabelled: number): Promise<void> {
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

/** Names for a message: at most three, quoted, then "…". */
function someNames(names: readonly string[]): string {
  return names.slice(0, 3).map((c) => JSON.stringify(c)).join(', ') + (names.length > 3 ? ', …' : '');
}


function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** Most classes counted for agreement; rarer labels count as one "other" class. */
export const MAX_CLASSES = 50;

/**
 * The classes counted for agreement: the distinct values of the label and annotator columns in the
 * first 100,000 rows (at most 50, the most frequent first).
 */
async function auditClasses(duck: Duck, columns: readonly string[], sample: string): Promise<string[]> {
  const values = columns.map((c) => textSql(c)).join(', ');
  const rows = await duck.all(
    `SELECT v, count(*) AS n FROM (SELECT unnest([${values}]) AS v FROM ${sample}) WHERE v IS NOT NULL GROUP BY v ORDER BY n DESC, v LIMIT ${MAX_CLASSES}`,
  );
  return rows.map((r) => String(r.v)).sort();
}

/**
 * Warnings for cost-table entries whose key matches no cell (judged from the cells, no extra scan;
 * an entry whose key columns no cell holds together, or that names a binned column, is not judged).
 */
function unmatchedEntries(table: CellTable, costTable: FloorTable, columns: readonly SliceColumn[]): string[] {
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

/** True when cells made with `grouping` can serve the `by` grouping without another scan. */
export function groupingCovers(grouping: Grouping, by: readonly string[]): boolean {
  if (grouping.kind === 'cross' || by.length <= 1) return true;
  const want = [...by].sort().join('\u0000');
  return grouping.sets.some((set) => [...set].sort().join('\u0000') === want);
}

/**
 * One more GROUP BY for exactly the `by` columns (when grouping sets do not hold that grouping); the
 * cells keep every slice column in their key, null for the columns not grouped.
 */
export async function scanGrouping(duck: Duck, plan: CellPlan, by: readonly string[]): Promise<CellTable> {
  const exact: CellPlan = { ...plan, columns: plan.columns.filter((c) => by.includes(c.name)) };
  const { table } = await readCellResult(duck, cellQuery(exact, { kind: 'cross' }), exact, 1, plan.columns.map((c) => c.name));
  return table;
}
