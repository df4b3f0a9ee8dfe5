import type { Argv } from 'yargs';
import type { AnalysisHooks, AnalysisRequest } from '../app/analysis.js';
import { cacheDir } from '../cells/cache.js';
import { error } from '../core/errors.js';
import type { CliIO } from './io.js';
import { scanProgress } from './progress.js';
import { DEFAULT_MEMORY_LIMIT, DEFAULT_THREADS } from '../sql/duck.js';
import type { LoadOptions } from '../cells/load.js';
import { BIN_METHODS, type BinMethod } from '../cells/profile.js';
import type { RoleOptions } from '../read/roles.js';
import { DEFAULT_TRIAGE_OPTIONS, type TriageOptions } from '../triage/types.js';

/** Options every analysing command takes: inputs, roles, slicing, floors, statistics, engine. */
export function analysisOptions<T>(y: Argv<T>) {
  return y
    .positional('files', { type: 'string', array: true, describe: 'prediction table(s) with a split column' })
    .option('train', { type: 'string', describe: 'file holding the train split', group: 'Inputs:' })
    .option('train-dev', { type: 'string', describe: 'file holding the train_dev split', group: 'Inputs:' })
    .option('dev', { type: 'string', describe: 'file holding the dev split', group: 'Inputs:' })
    .option('test', { type: 'string', describe: 'file holding the test split', group: 'Inputs:' })
    .option('union', { type: 'boolean', default: false, describe: 'read inputs with different columns as one table; a column an input lacks is missing there', group: 'Inputs:' })
    .option('config', { type: 'string', describe: 'project file (default: ./floorgap.json when present)', group: 'Inputs:' })
    .option('where', { type: 'string', describe: 'keep rows matching a DuckDB SQL condition (columns are text)', group: 'Inputs:' })
    .option('cells', { type: 'string', array: true, describe: 'ready-made cells (from floorgap sql) instead of rows: CSV, Parquet or JSON Lines; shards are summed', group: 'Inputs:' })
    .option('cache', { type: 'boolean', default: true, describe: 'reuse the cells of an earlier run on the same unchanged files (--no-cache: scan again)', group: 'Engine:' })
    .option('progress', { choices: ['auto', 'always', 'never'] as const, default: 'auto' as const, describe: 'show progress of long scans on stderr (auto: large files only)', group: 'Engine:' })
    .option('label', { type: 'string', describe: 'column with the true class', group: 'Columns:' })
    .option('pred', { type: 'string', describe: 'column with the predicted class', group: 'Columns:' })
    .option('error', { type: 'string', describe: '0/1 error column, instead of label and pred', group: 'Columns:' })
    .option('split', { type: 'string', describe: 'column with the split', group: 'Columns:' })
    .option('id', { type: 'string', describe: 'column with the row id', group: 'Columns:' })
    .option('score', { type: 'string', describe: "column with the model's confidence in its prediction", group: 'Columns:' })
    .option('weight', { type: 'string', describe: 'column with the sample weight (>= 0)', group: 'Columns:' })
    .option('run-column', { type: 'string', describe: 'column naming the training run, for tables of several runs', group: 'Columns:' })
    .option('run', { type: 'string', describe: 'the run whose numbers are reported (default: most training rows)', group: 'Columns:' })
    .option('by', { type: 'string', describe: 'slice by these columns, comma-separated (label/pred allowed)', group: 'Slices:' })
    .option('slice-cols', { type: 'string', describe: 'candidate slice columns, comma-separated (default: detected)', group: 'Slices:' })
    .option('bins', { type: 'number', default: 5, describe: 'bins for numeric columns (about equal frequency)', group: 'Slices:' })
    .option('bin-method', { choices: BIN_METHODS, default: 'quantile' as BinMethod, describe: 'how numeric columns are cut: quantile (about equal frequency) or natural (natural breaks: optimal 1-D k-means)', group: 'Slices:' })
    .option('max-cells', { type: 'number', default: 200_000, describe: 'largest full cross of slice columns before grouping sets are used', group: 'Slices:' })
    .option('max-slices', { type: 'number', default: 10_000, describe: 'most slices one grouping may list (stops a column of ids)', group: 'Slices:' })
    .option('floor', { type: 'number', describe: 'human-level error for every row, a fraction (default 0)', group: 'Floors:' })
    .option('floor-table', { type: 'string', describe: 'table of floors keyed by slice columns (+ optional n)', group: 'Floors:' })
    .option('annotators', { type: 'string', describe: 'columns of human labels from an audit, comma-separated', group: 'Floors:' })
    .option('floor-rule', { choices: ['panel', 'typical', 'best'] as const, default: DEFAULT_TRIAGE_OPTIONS.floorRule, describe: 'floor from annotators: majority vote, mean single annotator, best annotator', group: 'Floors:' })
    .option('cost-table', { type: 'string', describe: 'table of label_cost per row keyed by slice columns', group: 'Statistics:' })
    .option('confidence', { type: 'number', default: DEFAULT_TRIAGE_OPTIONS.confidence, describe: 'interval confidence level', group: 'Statistics:' })
    .option('fdr', { type: 'number', default: DEFAULT_TRIAGE_OPTIONS.fdr, describe: 'false discovery rate for a significant gap', group: 'Statistics:' })
    .option('fdr-method', { choices: ['bh', 'by'] as const, default: DEFAULT_TRIAGE_OPTIONS.fdrMethod, describe: 'Benjamini–Hochberg or Benjamini–Yekutieli', group: 'Statistics:' })
    .option('min-rows', { type: 'number', default: DEFAULT_TRIAGE_OPTIONS.minRows, describe: 'fewer train or dev rows make a slice thin', group: 'Statistics:' })
    .option('floor-margin', { type: 'number', default: DEFAULT_TRIAGE_OPTIONS.floorMargin, describe: 'dev − floor at most this is at-floor (fraction)', group: 'Statistics:' })
    .option('min-headroom', { type: 'number', default: DEFAULT_TRIAGE_OPTIONS.minHeadroom, describe: 'smallest headroom worth a flag (fraction of dev error)', group: 'Statistics:' })
    .option('curve-exponent', { type: 'number', default: DEFAULT_TRIAGE_OPTIONS.curveExponent, describe: 'β in gap ∝ n^−β, for yield', group: 'Statistics:' })
    .option('label-cost', { type: 'number', default: DEFAULT_TRIAGE_OPTIONS.labelCost, describe: 'cost of one new labelled row, for yield', group: 'Statistics:' })
    .option('threads', { type: 'number', default: DEFAULT_THREADS, describe: 'DuckDB worker threads', group: 'Engine:' })
    .option('memory-limit', { type: 'string', default: DEFAULT_MEMORY_LIMIT, describe: 'DuckDB memory limit', group: 'Engine:' });
}

/** The parsed values of {@link analysisOptions}. */
export interface AnalysisArgs {
  files?: string[];
  train?: string;
  'train-dev'?: string;
  dev?: string;
  test?: string;
  /** --union: inputs with different columns are read as one table */
  union?: boolean;
  where?: string;
  label?: string;
  pred?: string;
  error?: string;
  split?: string;
  id?: string;
  score?: string;
  weight?: string;
  'run-column'?: string;
  run?: string;
  annotators?: string;
  'floor-rule': 'panel' | 'typical' | 'best';
  'cost-table'?: string;
  by?: string;
  /**
   * the grouping as column names, set by a command that knows it as a list (export's named slices);
   * used instead of `by` and never split on commas, so a column whose name holds one stays whole
   */
  byColumns?: readonly string[];
  'slice-cols'?: string;
  bins: number;
  /** --bin-method (undefined counts as quantile) */
  'bin-method'?: BinMethod;
  'max-cells': number;
  'max-slices': number;
  floor?: number;
  'floor-table'?: string;
  confidence: number;
  fdr: number;
  'fdr-method': 'bh' | 'by';
  'min-rows': number;
  'floor-margin': number;
  'min-headroom': number;
  'curve-exponent': number;
  'label-cost': number;
  threads: number;
  'memory-limit': string;
  /** ready-made cells files, instead of rows */
  cells?: string[];
  /** false with --no-cache (undefined counts as true) */
  cache?: boolean;
  progress?: 'auto' | 'always' | 'never';
}

/**
 * A comma-separated option as a list, or null when absent or empty.
 * @example
 * list('station, lighting'); // => ['station', 'lighting']
 */
export function list(value: string | undefined | string[]): string[] | null {
  if (value === undefined) return null;
  const text = Array.isArray(value) ? value.join(',') : String(value);
  const items = text.split(',').map((s) => s.trim()).filter(Boolean);
  return items.length ? items : null;
}

/** Converts parsed flags to engine options (their bounds are checked before any command runs: cli/bounds.ts). */
export function toLoadOptions(a: AnalysisArgs): LoadOptions {
  const roles: RoleOptions = {};
  for (const r of ['label', 'pred', 'error', 'split', 'id', 'score', 'weight'] as const) if (a[r] !== undefined) roles[r] = String(a[r]);
  if (a['run-column'] !== undefined) roles.run = String(a['run-column']);
  return {
    source: {
      files: (a.files ?? []).map(String),
      perSplit: { train: a.train, train_dev: a['train-dev'], dev: a.dev, test: a.test },
      union: a.union === true,
    },
    roles,
    where: a.where ?? null,
    by: a.byColumns ? [...a.byColumns] : list(a.by),
    sliceCols: list(a['slice-cols']),
    bins: a.bins,
    binMethod: a['bin-method'] ?? 'quantile',
    maxCells: a['max-cells'],
    maxSlices: a['max-slices'],
    floor: a.floor ?? null,
    floorTable: a['floor-table'] ?? null,
    annotators: list(a.annotators),
    costTable: a['cost-table'] ?? null,
  };
}

/** Converts parsed flags to triage options. */
export function toTriageOptions(a: AnalysisArgs): TriageOptions {
  return {
    confidence: a.confidence,
    fdr: a.fdr,
    fdrMethod: a['fdr-method'],
    minRows: a['min-rows'],
    floorMargin: a['floor-margin'],
    minHeadroom: a['min-headroom'],
    curveExponent: a['curve-exponent'],
    labelCost: a['label-cost'],
    floorRule: a['floor-rule'],
    run: a.run ?? null,
  };
}

/** Options that shape cells from rows; with --cells they have no effect. */
const ROW_OPTIONS: readonly (keyof AnalysisArgs)[] = ['where', 'label', 'pred', 'error', 'split', 'id', 'score', 'weight', 'run-column', 'slice-cols', 'floor', 'floor-table', 'annotators', 'cost-table'];

function cellsPaths(args: AnalysisArgs): string[] {
  return (Array.isArray(args.cells) ? args.cells : args.cells === undefined ? [] : [args.cells]).map(String).filter((p) => p !== '');
}

/**
 * The analysis the flags ask for: rows or cells files, triage options, engine resources, the cache.
 * With --cells, options that shape cells from rows are named on `warn` as ignored.
 * @param io the environment (cache folder), the working folder, and where a warning goes
 */
export function analysisRequest(args: AnalysisArgs, io: Pick<CliIO, 'env' | 'cwd'> & { readonly stderr?: CliIO['stderr'] }): AnalysisRequest {
  const triage = toTriageOptions(args);
  const engine = { threads: args.threads, memoryLimit: args['memory-limit'] };
  const cache = args.cache === false ? null : { dir: cacheDir(io.env), cwd: io.cwd };
  if (args.cells !== undefined) {
    const rows = [...(args.files ?? []), args.train, args['train-dev'], args.dev, args.test].filter((f) => f !== undefined);
    if (rows.length > 0) throw error(`--cells and prediction tables (${rows.join(', ')}) were both given; give one of them`);
    const ignored = ROW_OPTIONS.filter((k) => args[k] !== undefined);
    if (ignored.length > 0) {
      io.stderr?.write(`floorgap: ${ignored.map((k) => `--${k}`).join(', ')} ignored: cells already carry what the rows gave (floorgap sql takes these options)\n`);
    }
    const by = args.byColumns ? [...args.byColumns] : list(args.by);
    return { input: { kind: 'cells', paths: cellsPaths(args), by, maxCells: args['max-cells'] }, triage, engine, cache };
  }
  return { input: { kind: 'rows', load: toLoadOptions(args) }, triage, engine, cache };
}

/** The hooks of an analysis run from the command line: progress of long scans on stderr. */
export function analysisHooks(args: AnalysisArgs, io: Pick<CliIO, 'stderr' | 'env'>): AnalysisHooks {
  return { onScan: scanProgress(io, args.progress ?? 'auto') };
}
