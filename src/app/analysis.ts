/**
 * The analysis every command and the explorer run: read → cells → slices → triage, on an engine locked
 * to the command's own files. It takes a typed request (the CLI turns flags into one) and plain hooks,
 * and never touches the process.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { loadCellFiles } from '../cells/cells-file.js';
import { openDuck, type Duck } from '../sql/duck.js';
import { needsOneThreadFor } from '../read/table.js';
import { releaseTemp, trackScratch } from '../output/temp-files.js';
import { loadCells, type LoadHooks, type Loaded } from '../cells/load.js';
import { cellLimit, type LoadOptions } from '../cells/plan.js';
import { cacheKey, readCache } from '../cells/cache.js';
import { buildReport, type ReportContext } from '../triage/report.js';
import type { Report, TriageOptions } from '../triage/types.js';
import { VERSION } from '../core/version.js';
import { error } from '../core/errors.js';

/** The result of the shared analysis: the report, and the cells and plan it came from. */
export interface Analysis {
  readonly report: Report;
  readonly loaded: Loaded;
  /** what buildReport was given besides the cells, so a regroup gives the same kind of report */
  readonly context: ReportContext;
  readonly options: TriageOptions;
}

/** The engine's resources. */
export interface EngineSettings {
  readonly threads: number;
  readonly memoryLimit: string;
}

/** What to analyse: rows (prediction tables) or ready-made cells files, and how. */
export interface AnalysisRequest {
  readonly input:
    | { readonly kind: 'rows'; readonly load: LoadOptions }
    | { readonly kind: 'cells'; readonly paths: readonly string[]; readonly by: readonly string[] | null; readonly maxCells: number };
  readonly triage: TriageOptions;
  readonly engine: EngineSettings;
  /**
   * where cached cells of the same unchanged files are read and written (cells/cache.ts: cacheDir), and
   * the folder relative input paths are taken from; null: no cache
   */
  readonly cache: { readonly dir: string; readonly cwd: string } | null;
}

/** What the analysis may use besides the request: a watcher of long scans. */
export interface AnalysisHooks {
  readonly onScan?: LoadHooks['onScan'];
}

function loadHooks(request: AnalysisRequest, hooks: AnalysisHooks): LoadHooks {
  return { cache: request.cache ? { ...request.cache, version: VERSION } : null, onScan: hooks.onScan };
}

/** Loaded cells with what a report or a search needs besides them. */
export interface Prepared {
  readonly loaded: Loaded;
  readonly context: ReportContext;
  readonly options: TriageOptions;
}

/** cells → slices → triage: the report of loaded cells (compare builds each side's this way). */
export function reportOf(loaded: Loaded, triageOptions: TriageOptions, where: string | null): Analysis {
  const p = prepare(loaded, triageOptions, where);
  const report = buildReport(loaded.table, loaded.by, loaded.overviewColumns, p.context, triageOptions);
  return { ...p, report };
}

/** The context of loaded cells (inputs, roles, warnings), after checking that a named run exists. */
function prepare(loaded: Loaded, triageOptions: TriageOptions, where: string | null): Prepared {
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
  return { loaded, context, options: triageOptions };
}

/**
 * read → cells → slices → triage on an open database, which keeps the `fg_rows` view afterwards, so a
 * command can go on to read rows (export, paired checks). With cells files, there is no rows view
 * (`loaded.origin` is 'cells').
 */
export async function analyzeWith(duck: Duck, request: AnalysisRequest, hooks: AnalysisHooks = {}): Promise<Analysis> {
  const { input } = request;
  if (input.kind === 'cells') {
    const loaded = await loadCellFiles(duck, input.paths, input.by, cellLimit(input.maxCells));
    return reportOf(loaded, request.triage, null);
  }
  const loaded = await loadCells(duck, input.load, loadHooks(request, hooks));
  return reportOf(loaded, request.triage, input.load.where);
}

/** The files a command's engine may touch besides the spill folder (see EngineAccess). */
export interface FileAccess {
  readonly read: readonly string[];
  readonly write: readonly string[];
}

/** The files an analysis reads: its prediction tables (or cells files), floor and cost tables. */
export function analysisReads(request: AnalysisRequest): string[] {
  const { input } = request;
  if (input.kind === 'cells') return [...input.paths];
  const { source, floorTable, costTable } = input.load;
  return [...source.files, ...Object.values(source.perSplit), floorTable, costTable ?? null].filter((f): f is string => typeof f === 'string');
}

/**
 * Opens the engine with the given resources, locked to `access` (and a spill folder of its own,
 * removed on close, also when the process is stopped).
 */
export async function openEngine(engine: EngineSettings, access: FileAccess): Promise<Duck> {
  const spill = trackScratch(mkdtempSync(join(tmpdir(), 'floorgap-spill-')));
  const removeSpill = () => {
    rmSync(spill, { recursive: true, force: true });
    releaseTemp(spill);
  };
  let duck: Duck;
  try {
    // the engine's JSON reader rejects a byte order mark when it reads in parallel; a locked engine
    // cannot change its threads later, so it opens with one thread when any file it reads needs that
    const threads = (await needsOneThreadFor(access.read)) ? 1 : engine.threads;
    duck = await openDuck({ threads, memoryLimit: engine.memoryLimit }, { ...access, spill });
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

/** Opens the engine (see {@link openEngine}) and runs `work` on it, closing it afterwards. */
export async function withDuck<T>(engine: EngineSettings, access: FileAccess, work: (duck: Duck) => Promise<T>): Promise<T> {
  const duck = await openEngine(engine, access);
  try {
    return await work(duck);
  } finally {
    duck.close();
  }
}

/**
 * read → cells → slices → triage: the shared path of every analysing command. Cells cached from an
 * earlier run on the same unchanged files are used without starting the engine.
 */
export async function analyze(request: AnalysisRequest, hooks: AnalysisHooks = {}): Promise<Analysis> {
  const p = await loadPrepared(request, hooks);
  return { ...p, report: buildReport(p.loaded.table, p.loaded.by, p.loaded.overviewColumns, p.context, p.options) };
}

/**
 * read → cells, with the context a report or a search needs (no report is built): cached cells of
 * the same unchanged files are used without starting the engine.
 */
export async function loadPrepared(request: AnalysisRequest, hooks: AnalysisHooks = {}): Promise<Prepared> {
  const { input } = request;
  if (input.kind === 'rows') {
    const cache = loadHooks(request, hooks).cache;
    const key = cache ? await cacheKey(input.load, cache.version, cache.cwd) : null;
    const hit = cache && key ? await readCache(cache.dir, key) : null;
    if (hit) return prepare(hit, request.triage, input.load.where);
  }
  return withDuck(request.engine, { read: analysisReads(request), write: [] }, async (duck) => {
    if (input.kind === 'cells') return prepare(await loadCellFiles(duck, input.paths, input.by, cellLimit(input.maxCells)), request.triage, null);
    return prepare(await loadCells(duck, input.load, loadHooks(request, hooks)), request.triage, input.load.where);
  });
}
