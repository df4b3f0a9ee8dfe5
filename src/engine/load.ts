import { cellSql, keySql, scanCells, toCells, unknownSplitError, type CellPlan, type Grouping, type ScanIssues } from './cells.js';
import type { Duck } from './duck.js';
import { chooseSliceColumns, profileColumns, sampleTupleCount, sliceColumns, type Profile } from './profile.js';
import { resolveRoles, roleColumns, type RoleOptions, type Roles } from './roles.js';
import { checkWhere, openSource, type Source, type SourceSpec } from './source.js';
import type { Cell, SliceColumn, Split } from './types.js';
import { runsOf } from './slices.js';
import { ROWS_VIEW, whereSql } from './source.js';
import { textSql } from './profile.js';
import { describeKey, readFloorTable, type FloorEntry, type FloorTable } from '../io/read-floor-table.js';
import { firstBadRow } from '../io/locate.js';
import { error } from '../util/error.js';

/** Options of loading rows into cells. */
export interface LoadOptions {
  readonly source: SourceSpec;
  readonly roles: RoleOptions;
  readonly where: string | null;
  /** the `--by` columns (role names `label`/`pred` accepted); they join the cell columns */
  readonly by: readonly string[] | null;
  readonly sliceCols: readonly string[] | null;
  readonly bins: number;
  readonly maxCells: number;
  readonly floor: number | null;
  readonly floorTable: string | null;
  /** annotator columns: human labels on audited rows */
  readonly annotators?: readonly string[] | null;
  /** cost table (key columns + label_cost); rows it does not cover cost --label-cost */
  readonly costTable?: string | null;
}

/** Cells and everything known about how they were made. */
export interface Loaded {
  readonly source: Source;
  readonly roles: Roles;
  readonly columns: readonly SliceColumn[];
  /** candidate columns for the overview (not label/pred unless asked) */
  readonly overviewColumns: readonly string[];
  readonly by: readonly string[] | null;
  readonly cells: readonly Cell[];
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
export function resolveBy(by: readonly string[], columns: readonly string[], roles: Roles, where: string): string[] {
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
export async function loadCells(duck: Duck, options: LoadOptions): Promise<Loaded> {
  const warnings: string[] = [];
  const source = await openSource(duck, options.source);
  const roles = resolveRoles(source.columns, options.roles, source.where, source.splitColumn !== null);
  const splitColumn = roles.split ?? source.splitColumn!;
  await checkWhere(duck, options.where);
  const dataColumns = source.columns.filter((c) => c !== source.splitColumn);
  const profile = await profileColumns(duck, dataColumns, options.where);
  if (profile.sampleRows === 0) {
    throw error(options.where ? `${source.where}: no rows match --where "${options.where}"` : `${source.where}: no rows; expected a header and data rows`);
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
  const chosen = chooseSliceColumns(profile, roleCols, options.sliceCols, source.where);
  const by = options.by ? resolveBy(options.by, dataColumns, roles, source.where) : null;
  let floorTable: FloorTable | null = null;
  if (options.floorTable) {
    floorTable = await readFloorTable(duck, options.floorTable);
    for (const k of floorTable.keyColumns) {
      if (!dataColumns.includes(k)) {
        throw error(`${options.floorTable}: key column "${k}" is not a column of ${source.where}; the columns are ${dataColumns.map((c) => JSON.stringify(c)).join(', ')}`);
      }
    }
  }
  let costTable: FloorTable | null = null;
  if (options.costTable) {
    costTable = await readFloorTable(duck, options.costTable, 'label_cost');
    for (const k of costTable.keyColumns) {
      if (!dataColumns.includes(k)) {
        throw error(`${options.costTable}: key column "${k}" is not a column of ${source.where}; the columns are ${dataColumns.map((c) => JSON.stringify(c)).join(', ')}`);
      }
    }
  }
  // cell columns: candidates, plus --by columns and floor/cost-table keys that are not candidates
  const wanted = [...chosen.columns];
  const extra = [...(by ?? []), ...(floorTable?.keyColumns ?? []), ...(costTable?.keyColumns ?? [])];
  for (const name of extra) {
    if (wanted.some((c) => c.name === name)) continue;
    const p = profile.columns.find((c) => c.name === name)!;
    wanted.push({ name, kind: p.present === p.numeric && p.distinct > 50 && p.present > 0 ? 'binned' : 'category' });
  }
  if (wanted.length === 0 && !by) warnings.push('no candidate slice columns (2–50 distinct values, or numeric); name some with --slice-cols');
  const columns = await sliceColumns(duck, wanted, options.bins, options.where);
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
    classes: annotators.length ? await auditClasses(duck, [roles.label!, ...annotators], options.where) : [],
    costEntries: costTable?.entries ?? [],
  };
  const grouping = await chooseGrouping(duck, plan, profile, options.maxCells, by);
  const scanned = await scanCells(duck, plan, grouping).catch((e) => {
    throw scanError(source, e);
  });
  let cells = scanned.cells;
  await checkIssues(duck, source, roles, plan, scanned.issues, warnings);
  if (grouping.kind === 'sets' && by && by.length > 2) {
    // a by of three or more columns: one more GROUP BY for exactly those columns
    cells = [...cells, ...(await scanGrouping(duck, plan, by))];
  }
  const counts = splitCounts(cells, grouping);
  for (const required of ['train', 'dev'] as const) {
    if (counts[required] === 0) {
      const present = (Object.keys(counts) as Split[]).filter((s) => counts[s] > 0);
      throw error(
        `${source.where}: no rows with split ${required}${present.length ? ` (found ${present.join(', ')})` : ''}; train and dev are required, train_dev and test are optional`,
      );
    }
  }
  if (floorTable) {
    const used = new Set(cells.map((c) => c.floorEntry));
    for (const [i, e] of floorTable.entries.entries()) {
      if (!used.has(i)) warnings.push(`${floorTable.path}: line ${e.line} (${describeKey(e.keys)}) matches no row`);
    }
  }
  if (costTable) warnings.push(...unmatchedEntries(cells, costTable, columns));
  if (annotators.length > 0 && !cells.some((c) => (c.audit?.audited ?? 0) > 0)) {
    warnings.push(`no row has a label in the annotator columns ${annotators.join(', ')}: floors fall back to --floor`);
  }
  const runs = runsOf(cells);
  const overviewColumns = chosen.columns.map((c) => c.name);
  return { source, roles, columns, overviewColumns, by, cells, grouping, floorTable, costTable, warnings, profile, annotators, classes: plan.classes ?? [], runs, plan };
}

function scanError(source: Source, e: unknown): Error {
  if (e instanceof Error && e.name === 'FloorgapError') return e;
  const msg = e instanceof Error ? e.message.split('\n')[0] : String(e);
  return error(`${source.where}: cannot read the rows (${msg.replace(/^[A-Za-z ]+ Error: /, '')})`, e);
}

function splitCounts(cells: readonly Cell[], grouping: Grouping): Record<Split, number> {
  const out: Record<Split, number> = { train: 0, train_dev: 0, dev: 0, test: 0 };
  if (cells.length === 0) return out;
  // in grouping-sets mode count one set only
  const names = Object.keys(cells[0].key);
  const first = names.filter((k) => cells[0].key[k] !== null).join('\u0000');
  for (const c of cells) {
    if (grouping.kind === 'sets' && names.filter((k) => c.key[k] !== null).join('\u0000') !== first) continue;
    out[c.split] += c.rows;
  }
  return out;
}

async function chooseGrouping(duck: Duck, plan: CellPlan, profile: Profile, maxCells: number, by: readonly string[] | null): Promise<Grouping> {
  const names = plan.columns.map((c) => c.name);
  let estimate: number;
  if (profile.complete) {
    estimate = await sampleTupleCount(duck, plan.columns.map(keySql), 'lower(trim(' + `"${plan.splitColumn.replace(/"/g, '""')}"` + '))', plan.where);
  } else {
    estimate = 4;
    for (const c of plan.columns) {
      const p = profile.columns.find((x) => x.name === c.name)!;
      const values = c.kind === 'binned' ? (c.edges?.length ?? 0) + 2 : p.distinct + 1;
      estimate *= values;
      if (estimate > 1e12) break;
    }
  }
  if (estimate <= maxCells) return { kind: 'cross' };
  const sets: string[][] = names.map((n) => [n]);
  for (let i = 0; i < names.length; i++) for (let j = i + 1; j < names.length; j++) sets.push([names[i], names[j]]);
  if (by && by.length === 2 && !sets.some((s) => s.join() === by.join())) sets.push([...by]);
  return { kind: 'sets', sets };
}

async function checkIssues(duck: Duck, source: Source, roles: Roles, plan: CellPlan, issues: ScanIssues, warnings: string[]): Promise<void> {
  if (issues.badWeight > 0) {
    const at = await firstBadRow(duck, source, `NOT (${weightOk(roles.weight!)})`, roles.weight!, plan.where);
    throw error(`${at}column "${roles.weight}": expected a weight >= 0, got "${at.value}" (${plural(issues.badWeight, "row")} like it)`);
  }
  if (issues.badScore > 0) {
    const at = await firstBadRow(duck, source, `NULLIF(trim("${esc(roles.score!)}"), '') IS NOT NULL AND (TRY_CAST(trim("${esc(roles.score!)}") AS DOUBLE) IS NULL OR isinf(TRY_CAST(trim("${esc(roles.score!)}") AS DOUBLE)) OR isnan(TRY_CAST(trim("${esc(roles.score!)}") AS DOUBLE)))`, roles.score!, plan.where);
    throw error(`${at}column "${roles.score}": expected a number (model confidence), got "${at.value}" (${plural(issues.badScore, "row")} like it)`);
  }
  if (issues.badError > 0) {
    const e = `lower(NULLIF(trim("${esc(roles.error!)}"), ''))`;
    const at = await firstBadRow(duck, source, `${e} IS NOT NULL AND ${e} NOT IN ('1','1.0','true','t','yes','y','0','0.0','false','f','no','n')`, roles.error!, plan.where);
    throw error(`${at}column "${roles.error}": expected 0 or 1 (or true/false), got "${at.value}" (${plural(issues.badError, "row")} like it)`);
  }
  if (issues.unknownSplits.size > 0) throw unknownSplitError(source.where, plan.splitColumn, issues.unknownSplits);
  if (issues.unlabelled > 0) {
    const what = roles.error ? `an empty "${roles.error}"` : `an empty "${roles.label}" or "${roles.pred}"`;
    warnings.push(`${issues.unlabelled} rows with ${what} were left out`);
  }
}

function esc(name: string): string {
  return name.replace(/"/g, '""');
}

function weightOk(col: string): string {
  const w = `TRY_CAST(trim("${esc(col)}") AS DOUBLE)`;
  return `${w} IS NOT NULL AND ${w} >= 0 AND NOT isnan(${w}) AND NOT isinf(${w})`;
}

export type { FloorEntry };

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** Most classes counted for agreement; rarer labels count as one "other" class. */
export const MAX_CLASSES = 50;

/**
 * The classes counted for agreement: the distinct values of the label and annotator columns in the
 * first 100,000 rows (at most 50, the most frequent first).
 */
async function auditClasses(duck: Duck, columns: readonly string[], where: string | null): Promise<string[]> {
  const values = columns.map((c) => textSql(c)).join(', ');
  const rows = await duck.all(
    `SELECT v, count(*) AS n FROM (SELECT unnest([${values}]) AS v FROM (SELECT * FROM ${ROWS_VIEW} WHERE ${whereSql(where)} LIMIT 100000)) WHERE v IS NOT NULL GROUP BY v ORDER BY n DESC, v LIMIT ${MAX_CLASSES}`,
  );
  return rows.map((r) => String(r.v)).sort();
}

/**
 * Warnings for cost-table entries whose key matches no cell (judged from the cells, no extra scan;
 * an entry whose key columns no cell holds together, or that names a binned column, is not judged).
 */
function unmatchedEntries(cells: readonly Cell[], table: FloorTable, columns: readonly SliceColumn[]): string[] {
  const binned = new Set(columns.filter((c) => c.kind === 'binned').map((c) => c.name));
  return table.entries.flatMap((e) => {
    const keys = Object.entries(e.keys);
    // cells hold bin labels for binned columns, not the values an entry names: not judged
    if (keys.some(([k]) => binned.has(k))) return [];
    const judged = cells.filter((c) => keys.every(([k]) => c.key[k] !== null && c.key[k] !== undefined));
    if (judged.length === 0) return [];
    const hit = judged.some((c) => keys.every(([k, v]) => c.key[k] === v));
    return hit ? [] : [`${table.path}: line ${e.line} (${describeKey(e.keys)}) matches no row`];
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
export async function scanGrouping(duck: Duck, plan: CellPlan, by: readonly string[]): Promise<Cell[]> {
  const exact = { ...plan, columns: plan.columns.filter((c) => by.includes(c.name)) };
  const more = toCells(await duck.all(cellSql(exact, { kind: 'cross' })), exact).cells;
  const allNames = plan.columns.map((c) => c.name);
  return more.map((c) => ({ ...c, key: Object.fromEntries(allNames.map((n) => [n, c.key[n] ?? null])) }));
}
