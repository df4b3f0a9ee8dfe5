import { openDuck, type Duck } from '../engine/duck.js';
import { loadCells, type Loaded } from '../engine/load.js';
import { buildReport, type ReportContext } from '../triage/report.js';
import type { Report, TriageOptions } from '../triage/types.js';
import { VERSION } from '../version.js';
import { error } from '../util/error.js';
import { toLoadOptions, toTriageOptions, type AnalysisArgs } from './options.js';

/** The result of the shared analysis: the report, and the cells and plan it came from. */
export interface Analysis {
  readonly report: Report;
  readonly loaded: Loaded;
  /** what buildReport was given besides the cells, so a regroup gives the same kind of report */
  readonly context: ReportContext;
  readonly options: TriageOptions;
}

/**
 * read → cells → slices → triage on an open database, which keeps the `fg_rows` view afterwards, so a
 * command can go on to read rows (export, paired checks).
 */
export async function analyzeWith(duck: Duck, args: AnalysisArgs): Promise<Analysis> {
  const triageOptions = toTriageOptions(args);
  const loadOptions = toLoadOptions(args);
  const loaded = await loadCells(duck, loadOptions);
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
    where: loadOptions.where,
    version: VERSION,
    warnings: loaded.warnings,
  };
  const report = buildReport(loaded.cells, loaded.by, loaded.overviewColumns, context, triageOptions);
  return { report, loaded, context, options: triageOptions };
}

/** Opens the engine with the user's resource settings and runs `use` on it, closing it afterwards. */
export async function withDuck<T>(args: Pick<AnalysisArgs, 'threads' | 'memory-limit'>, use: (duck: Duck) => Promise<T>): Promise<T> {
  const duck = await openDuck({ threads: args.threads, memoryLimit: args['memory-limit'] });
  try {
    return await use(duck);
  } finally {
    duck.close();
  }
}

/** read → cells → slices → triage: the shared path of every analysing command. */
export function analyze(args: AnalysisArgs): Promise<Analysis> {
  toTriageOptions(args); // bad options fail before the engine starts
  return withDuck(args, (duck) => analyzeWith(duck, args));
}
