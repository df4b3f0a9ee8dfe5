import type { Argv, Options, PositionalOptions } from 'yargs';
import type { AnalysisHooks, AnalysisRequest } from '../app/analysis.js';
import { cacheDir } from '../cells/cache.js';
import { DEFAULTS } from '../core/defaults.js';
import { error } from '../core/errors.js';
import type { CliIO } from './io.js';
import { scanProgress } from './progress.js';
import type { LoadOptions } from '../cells/plan.js';
import { BIN_METHODS, type BinMethod } from '../cells/profile.js';
import type { RoleOptions } from '../read/roles.js';
import { FORMATS } from '../render/index.js';
import { DIALECTS } from '../sql/dialect.js';
import type { TriageOptions } from '../triage/types.js';

/** The commands, each taking the options {@link COMMAND_OPTIONS} lists. */
export type Command = 'report' | 'discover' | 'compare' | 'explore' | 'check' | 'export' | 'sql' | 'demo';

/** What a command may say differently about an option it shares: never its type or its default. */
type Wording = Pick<Options, 'describe' | 'group' | 'choices' | 'alias' | 'demandOption'>;

/**
 * One option as yargs takes it, declared once; `for` holds a command's own wording of it (sql speaks
 * of a sample file and a query). Defaults come from core/defaults.ts, bounds from cli/bounds.ts.
 */
export interface Declaration extends Options {
  readonly describe: string;
  /** the positional `[files..]`, not a flag */
  readonly positional?: true;
  readonly for?: Partial<Record<Command, Wording>>;
}

const PROGRESS = ['auto', 'always', 'never'] as const;

/** Every option of every command, by its long name, in no particular order (a command's list orders its help). */
export const OPTIONS = {
  files: {
    positional: true, type: 'string', array: true, describe: 'prediction table(s) with a split column',
    for: {
      sql: { describe: 'a local sample of the table (optional): columns, bins and grouping are then chosen as a local report would' },
      compare: { describe: "BEFORE AFTER: the two models' prediction tables, with the same columns" },
    },
  },
  // inputs
  train: { type: 'string', describe: 'file holding the train split', group: 'Inputs:' },
  'train-dev': { type: 'string', describe: 'file holding the train_dev split', group: 'Inputs:' },
  dev: { type: 'string', describe: 'file holding the dev split', group: 'Inputs:' },
  test: { type: 'string', describe: 'file holding the test split', group: 'Inputs:' },
  union: {
    type: 'boolean', default: false, describe: 'read inputs with different columns as one table; a column an input lacks is missing there', group: 'Inputs:',
    for: { sql: { describe: 'read sample files with different columns as one table; a column a file lacks is missing there' } },
  },
  config: { type: 'string', describe: 'project file (default: ./floorgap.json when present)', group: 'Inputs:' },
  where: {
    type: 'string', describe: 'keep rows matching a DuckDB SQL condition (columns are text)', group: 'Inputs:',
    for: { sql: { describe: 'keep rows matching an SQL condition (written into the query as given)' } },
  },
  cells: { type: 'string', array: true, describe: 'ready-made cells (from floorgap sql) instead of rows: CSV, Parquet or JSON Lines; shards are summed', group: 'Inputs:' },
  // the engine
  cache: { type: 'boolean', default: DEFAULTS.cache, describe: 'reuse the cells of an earlier run on the same unchanged files (--no-cache: scan again)', group: 'Engine:' },
  progress: {
    choices: PROGRESS, default: DEFAULTS.progress, describe: 'show progress of long scans on stderr (auto: large files only)', group: 'Engine:',
    for: { sql: { describe: 'progress of --out on stderr' } },
  },
  threads: {
    type: 'number', default: DEFAULTS.threads, describe: 'DuckDB worker threads', group: 'Engine:',
    for: { sql: { describe: 'DuckDB worker threads (sample file, --out)' } },
  },
  'memory-limit': { type: 'string', default: DEFAULTS.memoryLimit, describe: 'DuckDB memory limit', group: 'Engine:' },
  // columns
  label: { type: 'string', describe: 'column with the true class', group: 'Columns:', for: { sql: { describe: 'column with the true class (default: label)' } } },
  pred: { type: 'string', describe: 'column with the predicted class', group: 'Columns:', for: { sql: { describe: 'column with the predicted class (default: pred)' } } },
  error: { type: 'string', describe: '0/1 error column, instead of label and pred', group: 'Columns:' },
  split: { type: 'string', describe: 'column with the split', group: 'Columns:', for: { sql: { describe: 'column with the split (default: split)' } } },
  id: { type: 'string', describe: 'column with the row id', group: 'Columns:' },
  score: {
    type: 'string', describe: "column with the model's confidence in its prediction", group: 'Columns:',
    for: { sql: { describe: "column with the model's confidence (checked: a number)" } },
  },
  weight: { type: 'string', describe: 'column with the sample weight (>= 0)', group: 'Columns:' },
  'run-column': {
    type: 'string', describe: 'column naming the training run, for tables of several runs', group: 'Columns:',
    for: { sql: { describe: 'column naming the training run' } },
  },
  run: { type: 'string', describe: 'the run whose numbers are reported (default: most training rows)', group: 'Columns:' },
  // slices
  by: {
    type: 'string', describe: 'slice by these columns, comma-separated (label/pred allowed)', group: 'Slices:',
    for: { sql: { describe: 'slice by these columns, comma-separated (they join the cell columns)' } },
  },
  'slice-cols': {
    type: 'string', describe: 'candidate slice columns, comma-separated (default: detected)', group: 'Slices:',
    for: { sql: { describe: 'slice columns, comma-separated (required without a sample file)' } },
  },
  bins: {
    type: 'number', default: DEFAULTS.bins, describe: 'bins for numeric columns (about equal frequency)', group: 'Slices:',
    for: { sql: { describe: 'bins for numeric columns' } },
  },
  'bin-method': {
    choices: BIN_METHODS, default: 'quantile', group: 'Slices:',
    describe: 'how numeric columns are cut: quantile (about equal frequency) or natural (natural breaks: optimal 1-D k-means)',
    for: { sql: { describe: 'how numeric columns are cut: quantile or natural (natural breaks; needs a sample file, or --bin-edges col=e1,e2,…)' } },
  },
  'max-cells': {
    type: 'number', default: DEFAULTS.maxCells, describe: 'largest full cross of slice columns before grouping sets are used', group: 'Slices:',
    for: { sql: { describe: 'largest full cross before grouping sets (with a sample file)' } },
  },
  'max-slices': { type: 'number', default: DEFAULTS.maxSlices, describe: 'most slices one grouping may list (stops a column of ids)', group: 'Slices:' },
  // floors
  floor: { type: 'number', describe: 'human-level error for every row, a fraction (default 0)', group: 'Floors:' },
  'floor-table': {
    type: 'string', describe: 'table of floors keyed by slice columns (+ optional n)', group: 'Floors:',
    for: { sql: { describe: 'table of floors keyed by slice columns (+ optional n), inlined in the query' } },
  },
  annotators: { type: 'string', describe: 'columns of human labels from an audit, comma-separated', group: 'Floors:' },
  'floor-rule': {
    choices: ['panel', 'typical', 'best'] as const, default: DEFAULTS.floorRule, describe: 'floor from annotators: majority vote, mean single annotator, best annotator', group: 'Floors:',
  },
  // statistics
  'cost-table': {
    type: 'string', describe: 'table of label_cost per row keyed by slice columns', group: 'Statistics:',
    for: { sql: { describe: 'table of label_cost keyed by slice columns, inlined in the query', group: 'Floors:' } },
  },
  confidence: { type: 'number', default: DEFAULTS.confidence, describe: 'interval confidence level', group: 'Statistics:' },
  fdr: { type: 'number', default: DEFAULTS.fdr, describe: 'false discovery rate for a significant gap', group: 'Statistics:' },
  'fdr-method': { choices: ['bh', 'by'] as const, default: DEFAULTS.fdrMethod, describe: 'Benjamini–Hochberg or Benjamini–Yekutieli', group: 'Statistics:' },
  'min-rows': { type: 'number', default: DEFAULTS.minRows, describe: 'fewer train or dev rows make a slice thin', group: 'Statistics:' },
  'floor-margin': { type: 'number', default: DEFAULTS.floorMargin, describe: 'dev − floor at most this is at-floor (fraction)', group: 'Statistics:' },
  'min-headroom': { type: 'number', default: DEFAULTS.minHeadroom, describe: 'smallest headroom worth a flag (fraction of dev error)', group: 'Statistics:' },
  'curve-exponent': { type: 'number', default: DEFAULTS.curveExponent, describe: 'β in gap ∝ n^−β, for yield', group: 'Statistics:' },
  'label-cost': { type: 'number', default: DEFAULTS.labelCost, describe: 'cost of one new labelled row, for yield', group: 'Statistics:' },
  // check's limits
  'max-bias': { type: 'number', describe: 'largest avoidable bias a slice may have (fraction)', group: 'Limits:' },
  'max-variance': { type: 'number', describe: 'largest variance (fraction)', group: 'Limits:' },
  'max-mismatch': { type: 'number', describe: 'largest mismatch (fraction)', group: 'Limits:' },
  'max-dev-error': { type: 'number', describe: 'largest dev error (fraction)', group: 'Limits:' },
  strict: { type: 'boolean', default: false, describe: 'judge point values, not the interval lower end', group: 'Limits:' },
  baseline: { type: 'string', describe: "a saved JSON report, or the baseline model's prediction table (paired by id)", group: 'Limits:' },
  // outputs
  format: {
    alias: 'f', choices: FORMATS, default: DEFAULTS.format, describe: 'output format', group: 'Output:',
    for: { check: { choices: ['text', 'json'] }, compare: { choices: ['text', 'json'] } },
  },
  ascii: { type: 'boolean', default: false, describe: 'draw with ASCII only (no block glyphs or arrows)', group: 'Output:' },
  junit: { type: 'string', describe: 'also write a JUnit XML file (one test case per slice and limit)', group: 'Output:' },
  out: {
    alias: 'o', type: 'string', demandOption: true, describe: 'file to write: .csv (default), .jsonl/.ndjson or .parquet; F.manifest.json goes beside it', group: 'Export:',
    for: {
      sql: { demandOption: false, describe: 'run the query here over the files and write the cells (.csv, .jsonl or .parquet)', group: 'Query:' },
      demo: { alias: undefined, describe: 'folder to write the demo files into', group: undefined },
    },
  },
  force: {
    type: 'boolean', default: false, describe: 'overwrite an existing file and manifest', group: 'Export:',
    for: { sql: { describe: 'overwrite --out', group: 'Query:' }, demo: { describe: 'overwrite existing files', group: undefined } },
  },
  // export
  top: {
    type: 'number', describe: "the first N slices in the report's order, or of the discovered ones (default: the flagged slices)", group: 'Export:',
    for: { discover: { describe: `discovered slices listed (default ${DEFAULTS.top})`, group: 'Search:' } },
  },
  // compare
  margin: {
    type: 'number', describe: 'a change whose whole interval lies within ±M (fraction: 0.01 = 1 point) reads "within margin"', group: 'Statistics:',
  },
  // discover
  depth: { type: 'number', default: DEFAULTS.depth, describe: 'conditions per slice, 1 to 3 (3 needs the full cross of the slice columns)', group: 'Search:' },
  'min-lift': { type: 'number', default: DEFAULTS.minLift, describe: "smallest gap above every simpler slice's rest (fraction: 0.02 = 2 points)", group: 'Search:' },
  all: { type: 'boolean', default: false, describe: 'also list found slices explained by slices within them (explained_by)', group: 'Search:' },
  discovered: { type: 'boolean', default: false, describe: 'the slices floorgap discover finds with the same options, the Search: ones included', group: 'Export:' },
  from: { type: 'string', describe: 'the slices of a saved floorgap discover --format json result, in its order', group: 'Export:' },
  slice: { type: 'string', describe: 'a slice by its key, e.g. "station=S5,lighting=dome" (repeatable; \\, for a comma in a value)', group: 'Export:' },
  splits: { type: 'string', default: DEFAULTS.exportSplits, describe: 'splits whose rows are written: train, train_dev, dev, test', group: 'Export:' },
  'errors-only': { type: 'boolean', default: false, describe: 'only rows the model got wrong', group: 'Export:' },
  'limit-per-slice': { type: 'number', describe: 'at most N rows per slice (likely label errors first)', group: 'Export:' },
  raw: { type: 'boolean', default: false, describe: "write text as it is (no ' before formula-like cells)", group: 'Export:' },
  // sql
  table: { type: 'string', describe: 'the warehouse table the query reads, as your engine names it (e.g. lake.preds)', group: 'Query:' },
  dialect: { choices: DIALECTS, default: DEFAULTS.dialect, describe: 'SQL dialect of the query', group: 'Query:' },
  'bin-edges': {
    type: 'string', describe: 'numeric slice column and its bin edges, e.g. sharpness=0.58,0.65,0.7 (repeatable); a column alone prints a query for its edges', group: 'Query:',
  },
  classes: { type: 'string', describe: 'classes counted for annotator agreement, comma-separated (without a sample file)', group: 'Query:' },
  grouping: {
    choices: ['auto', 'cross', 'sets'] as const, default: DEFAULTS.grouping, describe: 'full cross of the slice columns, or grouping sets of columns and pairs (auto: as a local report)', group: 'Query:',
  },
  // the demo
  rows: { type: 'number', default: DEFAULTS.demoRows, describe: 'rows to generate' },
  seed: { type: 'number', default: DEFAULTS.demoSeed, describe: 'random seed' },
  runs: { type: 'number', default: DEFAULTS.demoRuns, describe: 'training runs with doubling training sizes (adds a run column)' },
  models: { type: 'number', default: DEFAULTS.demoModels, describe: "2: also write a retrained model's predictions of the same rows (solder-joints-after.csv)" },
} as const satisfies Record<string, Declaration>;

export type OptionName = keyof typeof OPTIONS;

/** The options of every analysing command (report, explore, check, export), in help order. */
const ANALYSIS: readonly OptionName[] = [
  'files',
  'train', 'train-dev', 'dev', 'test', 'union', 'config', 'where', 'cells',
  'cache', 'progress',
  'label', 'pred', 'error', 'split', 'id', 'score', 'weight', 'run-column', 'run',
  'by', 'slice-cols', 'bins', 'bin-method', 'max-cells', 'max-slices',
  'floor', 'floor-table', 'annotators', 'floor-rule',
  'cost-table', 'confidence', 'fdr', 'fdr-method', 'min-rows', 'floor-margin', 'min-headroom', 'curve-exponent', 'label-cost',
  'threads', 'memory-limit',
];

/** The options each command takes, in the order its help lists them (a group shows where it first appears). */
export const COMMAND_OPTIONS: Readonly<Record<Command, readonly OptionName[]>> = {
  report: [...ANALYSIS, 'format'],
  // the candidate columns are --slice-cols (or those detected): no --by
  discover: [...ANALYSIS.filter((o) => o !== 'by'), 'depth', 'min-lift', 'top', 'all', 'format'],
  // two tables read with one plan: no per-split files, no ready-made cells, no cache
  compare: [...ANALYSIS.filter((o) => !['train', 'train-dev', 'dev', 'test', 'cells', 'cache', 'progress'].includes(o)), 'margin', 'format'],
  explore: [...ANALYSIS, 'format', 'ascii'],
  check: [...ANALYSIS, 'max-bias', 'max-variance', 'max-mismatch', 'max-dev-error', 'strict', 'baseline', 'format', 'junit'],
  export: [...ANALYSIS, 'out', 'top', 'slice', 'discovered', 'from', 'depth', 'min-lift', 'all', 'splits', 'errors-only', 'limit-per-slice', 'raw', 'force'],
  // the options that shape cells, and where and how the query runs
  sql: [
    'files',
    'table', 'dialect', 'bin-edges', 'classes', 'grouping', 'out', 'force',
    'train', 'train-dev', 'dev', 'test', 'union', 'config', 'where',
    'label', 'pred', 'error', 'split', 'id', 'score', 'weight', 'run-column',
    'by', 'slice-cols', 'bins', 'bin-method', 'max-cells',
    'floor', 'floor-table', 'annotators', 'cost-table',
    'threads', 'memory-limit', 'progress',
  ],
  demo: ['out', 'rows', 'seed', 'runs', 'models', 'force'],
};

/**
 * An option as `command` declares it to yargs: the declaration with the command's own wording.
 * @example
 * declarationFor('threads', 'sql').describe; // => 'DuckDB worker threads (sample file, --out)'
 */
export function declarationFor(name: OptionName, command: Command): Options {
  const { for: wording, ...base } = OPTIONS[name] as Declaration;
  const merged: Record<string, unknown> = { ...base, ...wording?.[command] };
  delete merged.positional;
  for (const k of Object.keys(merged)) if (merged[k] === undefined) delete merged[k];
  return merged as Options;
}

/** Declares the options of `command` on a yargs builder, in the order of {@link COMMAND_OPTIONS}. */
export function commandOptions<T>(y: Argv<T>, command: Command): Argv<T> {
  // the parsed values are typed by each command's own interface (ReportArgs, …), not by yargs
  let b = y as unknown as Argv;
  for (const name of COMMAND_OPTIONS[command]) {
    const d = declarationFor(name, command);
    b = (OPTIONS[name] as Declaration).positional ? b.positional(name, d as PositionalOptions) : b.option(name, d);
  }
  return b as unknown as Argv<T>;
}

/** The parsed values of the options every analysing command takes. */
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
function toTriageOptions(a: AnalysisArgs): TriageOptions {
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
