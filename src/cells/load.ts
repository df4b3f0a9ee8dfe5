/**
 * read → cells: opens the inputs, plans the scan from a sample (plan-scan.ts), runs the one cell query,
 * checks what it set aside (scan-checks.ts) and keeps the cells in the cache.
 */
import { readCellResult, scanCells } from './scan.js';
import type { CellPlan, Grouping, LoadOptions } from './plan.js';
import { cellQuery } from './cell-query.js';
import { hasAudit, mergeCells, runsOf, splitTotals, usedFloorEntries, type CellTable } from './cell-table.js';
import type { Duck } from '../sql/duck.js';
import type { Profile } from './profile.js';
import type { Roles } from '../read/roles.js';
import { openSource, type Source } from '../read/source.js';
import type { SliceColumn } from '../core/cell.js';
import type { Split } from '../core/split.js';
import { cacheKey, readCache, writeCache } from './cache.js';
import { describeKey, type FloorTable } from '../read/keyed-table.js';
import { locateReadError, readError } from '../read/read-errors.js';
import { error } from '../core/errors.js';
import { planScan, type ScanPlan } from './plan-scan.js';
import { checkIssues, checkLeftOut, checkSplitWeights, unmatchedEntries } from './scan-checks.js';

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

async function scanSource(duck: Duck, options: LoadOptions, source: Source): Promise<Loaded> {
  const planned = await planScan(duck, options, source);
  return scanPlanned(duck, planned);
}


/**
 * The scan of a planned load: cells, checks of the rows set aside, warnings. `compare` scans its
 * second table with the first table's plan (same columns and bins) this way.
 */
export async function scanPlanned(duck: Duck, planned: ScanPlan): Promise<Loaded> {
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

/**
 * One more GROUP BY for exactly the `by` columns (when grouping sets do not hold that grouping); the
 * cells keep every slice column in their key, null for the columns not grouped.
 */
export async function scanGrouping(duck: Duck, plan: CellPlan, by: readonly string[]): Promise<CellTable> {
  const exact: CellPlan = { ...plan, columns: plan.columns.filter((c) => by.includes(c.name)) };
  const { table } = await readCellResult(duck, cellQuery(exact, { kind: 'cross' }), exact, 1, plan.columns.map((c) => c.name));
  return table;
}
