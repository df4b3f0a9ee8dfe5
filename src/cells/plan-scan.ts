/**
 * The sampled pre-pass of a scan: roles, candidate columns and their bins, floor and cost tables,
 * annotator classes, the slice count and the grouping, decided from the first 100,000 rows before the
 * cell query runs.
 */
import type { CellPlan, Grouping } from './plan.js';
import { keySql } from './row-sql.js';
import type { Duck } from '../sql/duck.js';
import { chooseSliceColumns, createSample, MAX_AUTO_COLUMNS, MAX_CATEGORIES, profileColumns, SAMPLE_ROWS, sampleTupleCount, sliceColumns, type Profile } from './profile.js';
import { resolveRoles, roleColumns, type Roles } from '../read/roles.js';
import { checkWhere, type Source } from '../read/source.js';
import { safeWhere } from '../sql/where.js';
import type { SliceColumn } from '../core/cell.js';
import { textSql } from './profile.js';
import { readFloorTable, type FloorTable } from '../read/keyed-table.js';
import { withReadErrors } from '../read/read-errors.js';
import { error, FloorgapError } from '../core/errors.js';
import { DEFAULTS } from '../core/defaults.js';
import { cellLimit, type LoadOptions } from './plan.js';
import { chooseGrouping, pairSets } from './grouping.js';

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

/** Maps role names used in `--by` (label, pred) to the columns that play them. */
function resolveBy(by: readonly string[], columns: readonly string[], roles: Roles, where: string): string[] {
  return by.map((b) => {
    if (columns.includes(b)) return b;
    if (b === 'label' && roles.label) return roles.label;
    if (b === 'pred' && roles.pred) return roles.pred;
    throw error(`${where}: --by names "${b}", which is not a column; the columns are ${columns.map((c) => JSON.stringify(c)).join(', ')}`);
  });
}

/** Default most slices one grouping may hold (`--max-slices`). */
const MAX_SLICES = DEFAULTS.maxSlices;

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

/** Names for a message: at most three, quoted, then "…". */
function someNames(names: readonly string[]): string {
  return names.slice(0, 3).map((c) => JSON.stringify(c)).join(', ') + (names.length > 3 ? ', …' : '');
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
