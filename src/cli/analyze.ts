import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadCellFiles } from '../engine/cells-input.js';
import { openDuck, type Duck } from '../engine/duck.js';
import { needsOneThreadFor } from '../io/read-table.js';
import { releaseTemp, trackScratch } from '../io/temp-files.js';
import { cellLimit, loadCells, withCells, type LoadHooks, type Loaded } from '../engine/load.js';
import { cacheDir, cacheKey, readCache } from '../io/cell-cache.js';
import { buildReport, type ReportContext } from '../triage/report.js';
import type { Report, TriageOptions } from '../triage/types.js';
import { VERSION } from '../version.js';
import { error } from '../util/error.js';
import type { CliIO } from './io.js';
import { list, toLoadOptions, toTriageOptions, type AnalysisArgs } from './options.js';
import { scanProgress } from './progress.js';

/** The result of the shared analysis: the report, and the cells and plan it came from. */
export interface Analysis {
  readonly report: Report;
  readonly loaded: Loaded;
  /** what buildReport was given besides the cells, so a regroup gives the same kind of report */
  readonly context: ReportContext;
  readonly options: TriageOptions;
}

/** Where progress goes and where the cache lives; without it, no progress and the cache under process.env. */
export type AnalysisIO = Pick<CliIO, 'stderr' | 'env'>;

/** Options that shape cells from rows; with --cells they have no effect. */
const ROW_OPTIONS: readonly (keyof AnalysisArgs)[] = ['where', 'label', 'pred', 'error', 'split', 'id', 'score', 'weight', 'run-column', 'slice-cols', 'floor', 'floor-table', 'annotators', 'cost-table'];

function usesCells(args: AnalysisArgs): boolean {
  return Array.isArray(args.cells) ? args.cells.length > 0 : args.cells !== undefined;
}

function cellPaths(args: AnalysisArgs, io?: AnalysisIO): string[] {
  const paths = (Array.isArray(args.cells) ? args.cells : [args.cells]).map(String).filter((p) => p !== '');
  const rows = [...(args.files ?? []), args.train, args['train-dev'], args.dev, args.test].filter((f) => f !== undefined);
  if (rows.length > 0) throw error(`--cells and prediction tables (${rows.join(', ')}) were both given; give one of them`);
  const ignored = ROW_OPTIONS.filter((k) => args[k] !== undefined);
  if (ignored.length > 0 && io) {
    io.stderr.write(`floorgap: ${ignored.map((k) => `--${k}`).join(', ')} ignored: cells already carry what the rows gave (floorgap sql takes these options)\n`);
  }
  return paths;
}

function hooksFor(args: AnalysisArgs, io?: AnalysisIO): LoadHooks {
  const env = io?.env ?? process.env;
  return {
    cache: args.cache === false ? null : { dir: cacheDir(env), cwd: process.cwd(), version: VERSION },
    onScan: io ? scanProgress(io, args.progress ?? 'auto') : undefined,
  };
}

/** cells → slices → triage: the report of loaded cells. */
function reportOf(loaded: Loaded, triageOptions: TriageOptions, where: string | null): Analysis {
  const roles: Record<string, string | null> = {
    label: loaded.roles.label,
    pred: loaded.roles.pred,
    error: loaded.roles.error,
    split: loaded.roles.split,
    id: loaded.roles.id,
    score: loaded.roles.score,
    weight: loaded.roles.weight,
    run: loaded.roles.run,
  };
  if (triageOptions.run !== null && !loaded.runs.includes(triageOptions.run)) {
    throw error(
      loaded.runs.length
        ? `--run ${triageOptions.run}: no such run; the runs are ${loaded.runs.join(', ')}`
        : `--run ${triageOptions.run}: the input has no run column (name it with --run-column)`,
    );
  }
  const context: ReportContext = {
    inputs: loaded.source.inputs.map((i) => ({ path: i.path, bytes: i.bytes, modified: i.modified, ...(i.split ? { split: i.split } : {}) })),
    roles,
    annotators: loaded.annotators,
    where,
    version: VERSION,
    warnings: loaded.warnings,
  };
  const report = buildReport(loaded.table, loaded.by, loaded.overviewColumns, context, triageOptions);
  return { report, loaded, context, options: triageOptions };
}

/**
 * read → cells → slices → triage on an open database, which keeps the `fg_rows` view afterwards, so a
 * command can go on to read rows (export, paired checks). With `--cells`, the cells come from files
 * and there is no rows view (`loaded.origin` is 'cells').
 * @param io stderr for progress and env for the cache folder; without it no progress is shown
 */
export async function analyzeWith(duck: Duck, args: AnalysisArgs, io?: AnalysisIO): Promise<Analysis> {
  const triageOptions = toTriageOptions(args);
  if (usesCells(args)) {
    const loaded = await loadCellFiles(duck, cellPaths(args, io), args.byColumns ? [...args.byColumns] : list(args.by), cellLimit(args['max-cells'] ?? 200_000));
    return reportOf(loaded, triageOptions, null);
  }
  const loadOptions = toLoadOptions(args);
  const loaded = await loadCells(duck, loadOptions, hooksFor(args, io));
  return reportOf(loaded, triageOptions, loadOptions.where);
}

/** The files a command's engine may touch besides the spill folder (see EngineAccess). */
export interface FileAccess {
  readonly read: readonly string[];
  readonly write: readonly string[];
}

/** The files an analysing command reads: its prediction tables (or cells files), floor and cost tables. */
export function analysisReads(args: AnalysisArgs): string[] {
  const cells = Array.isArray(args.cells) ? args.cells : args.cells === undefined ? [] : [args.cells];
  return [...(args.files ?? []), args.train, args['train-dev'], args.dev, args.test, args['floor-table'], args['cost-table'], ...cells]
    .filter((f): f is string => f !== undefined && f !== null)
    .map(String);
}

/**
 * Opens the engine with the user's resource settings, locked to `access` (and a spill folder of its
 * own, removed on close, also when the process is stopped).
 */
export async function openEngine(args: Pick<AnalysisArgs, 'threads' | 'memory-limit'>, access: FileAccess): Promise<Duck> {
  const spill = trackScratch(mkdtempSync(join(tmpdir(), 'floorgap-spill-')));
  const removeSpill = () => {
    rmSync(spill, { recursive: true, force: true });
    releaseTemp(spill);
  };
  let duck: Duck;
  try {
    // the engine's JSON reader rejects a byte order mark when it reads in parallel; a locked engine
    // cannot change its threads later, so it opens with one thread when any file it reads needs that
    const threads = (await needsOneThreadFor(access.read)) ? 1 : args.threads;
    duck = await openDuck({ threads, memoryLimit: args['memory-limit'] }, { ...access, spill });
  } catch (e) {
    removeSpill();
    throw e;
  }
  return {
    ...duck,
    close() {
      duck.close();
      removeSpill();
    },
  };
}

/** Opens the engine (see {@link openEngine}) and runs `use` on it, closing it afterwards. */
export async function withDuck<T>(args: Pick<AnalysisArgs, 'threads' | 'memory-limit'>, access: FileAccess, use: (duck: Duck) => Promise<T>): Promise<T> {
  const duck = await openEngine(args, access);
  try {
    return await use(duck);
  } finally {
    duck.close();
  }
}

/**
 * read → cells → slices → triage: the shared path of every analysing command. Cells cached from an
 * earlier run on the same unchanged files are used without starting the engine.
 */
export async function analyze(args: AnalysisArgs, io?: AnalysisIO): Promise<Analysis> {
  const triageOptions = toTriageOptions(args); // bad options fail before the engine starts
  if (!usesCells(args)) {
    const loadOptions = toLoadOptions(args);
    const cache = hooksFor(args, io).cache;
    const key = cache ? await cacheKey(loadOptions, cache.version, cache.cwd) : null;
    const hit = cache && key ? await readCache(cache.dir, key) : null;
    if (hit) return reportOf(withCells(hit), triageOptions, loadOptions.where);
  }
  return withDuck(args, { read: analysisReads(args), write: [] }, (duck) => analyzeWith(duck, args, io));
}
