/**
 * Every default value of floorgap, in one place: the option table of the CLI (cli/options.ts) shows
 * and applies these, and the layers below fall back on the same values when a caller leaves one out
 * (the engine's threads and memory, the floor of the cell cap, the slice cap, the sample of the
 * pre-pass, triage's thresholds, the demo). Each numeric default lies within its option's bounds
 * (cli/bounds.ts; held by test/cli/options.test.ts). Boolean flags are off unless given, except
 * `--cache`.
 */
import { cpus } from 'node:os';

export const DEFAULTS = {
  // the engine: polite on a shared training box
  /** `--threads`: 2, or 1 on a one-core machine */
  threads: Math.max(1, Math.min(2, cpus().length)),
  /** `--memory-limit`, given to DuckDB as it is */
  memoryLimit: '2GB',
  /** `--cache`: reuse the cells of an earlier run on the same files */
  cache: true,
  /** `--progress` */
  progress: 'auto',

  // slices
  /** `--bins`: bins of a numeric slice column */
  bins: 5,
  /** `--max-cells`: largest full cross before grouping sets; 5 × this (at least 5 × the default) caps the cells a scan keeps */
  maxCells: 200_000,
  /** `--max-slices`: most slices one grouping may list */
  maxSlices: 10_000,
  /** rows the pre-pass samples (candidate columns, bin edges, the slice count): the first 100,000 */
  sampleRows: 100_000,

  // triage (src/triage/types.ts DEFAULT_TRIAGE_OPTIONS)
  confidence: 0.95,
  fdr: 0.05,
  fdrMethod: 'bh',
  minRows: 30,
  floorMargin: 0.01,
  minHeadroom: 0.001,
  curveExponent: 0.5,
  labelCost: 1,
  floorRule: 'panel',

  // discover (src/discover/types.ts DISCOVER_DEFAULTS)
  /** `--depth`: conditions per discovered slice */
  depth: 2,
  /** `--min-lift`: the smallest lift over every parent's rest, as a fraction of error (2 points) */
  minLift: 0.02,
  /** `--top`: discovered slices listed */
  top: 20,

  // outputs
  /** `--format` of report, explore and check */
  format: 'text',
  /** `export --splits` */
  exportSplits: 'train,dev',
  /** `sql --dialect` */
  dialect: 'ansi',
  /** `sql --grouping` */
  grouping: 'auto',

  // the demo (its shipped sample in data-samples/ is generated with these)
  demoRows: 20_000,
  demoSeed: 24,
  demoRuns: 1,
  demoModels: 1,
} as const;
