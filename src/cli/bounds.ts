/**
 * Bounds of every numeric option, in one table, checked once for every command before anything runs
 * (before the engine opens, before the screen changes), whether the value came from a flag or from a
 * project file. An unbounded option is a way to exhaust the machine: `--threads 100000` started tens of
 * thousands of threads, `--bins 10000000` grew memory until the kernel stopped it.
 */
import { cpus, totalmem } from 'node:os';
import { COST_EXPECTED, COST_RANGE } from '../read/keyed-table.js';
import { DEMO_MAX_MODELS, DEMO_MAX_RUNS } from '../demo/scenario.js';
import { error } from '../core/errors.js';

/** A numeric option's domain: whole or real, and its ends (open ends exclude the value). */
export interface NumberBound {
  readonly integer: boolean;
  readonly min: number;
  readonly max: number;
  readonly openMin?: boolean;
  readonly openMax?: boolean;
  /** why the bound is what it is, when it is not obvious */
  readonly why?: string;
  /** the expected value in words, where another message already says it (cost tables) */
  readonly expected?: string;
}

const CORES = Math.max(1, cpus().length);

/** Most DuckDB worker threads: 4 × the machine's cores (at least 4). */
export const MAX_THREADS = Math.max(4, 4 * CORES);
/** Most bins of a numeric slice column. */
const MAX_BINS = 1000;
/** Largest `--max-cells`; the cell cap is 5 × this (about 1 GB of cells). */
const MAX_MAX_CELLS = 2_000_000;
/** Largest `--max-slices`. */
const MAX_MAX_SLICES = 200_000;

const fraction = (open: boolean): NumberBound => ({ integer: false, min: 0, max: 1, openMin: open, openMax: open });
const whole = (min: number, max: number, why?: string): NumberBound => ({ integer: true, min, max, ...(why ? { why } : {}) });
const limit: NumberBound = { integer: false, min: -1, max: 1 };

/** Every numeric option of every command, by its long name. */
export const NUMBER_BOUNDS: Readonly<Record<string, NumberBound>> = {
  threads: whole(1, MAX_THREADS, `4 × this machine's ${CORES} core${CORES === 1 ? '' : 's'}`),
  bins: whole(2, MAX_BINS),
  'max-cells': whole(1, MAX_MAX_CELLS, 'the cell cap is 5 × --max-cells'),
  'max-slices': whole(1, MAX_MAX_SLICES),
  'min-rows': whole(1, 1e12),
  top: whole(1, 1_000_000),
  depth: whole(1, 3, 'conditions per discovered slice'),
  'min-lift': fraction(false),
  'limit-per-slice': whole(1, 1e12),
  floor: fraction(false),
  confidence: fraction(true),
  fdr: fraction(true),
  'floor-margin': fraction(false),
  margin: fraction(false),
  'min-headroom': fraction(false),
  'curve-exponent': { integer: false, min: 0, max: 10, openMin: true },
  'label-cost': { integer: false, min: COST_RANGE.min, max: COST_RANGE.max, expected: COST_EXPECTED },
  'max-bias': limit,
  'max-variance': limit,
  'max-mismatch': limit,
  'max-dev-error': limit,
  rows: whole(1, 100_000_000),
  seed: whole(0, 2 ** 31 - 1),
  runs: whole(1, DEMO_MAX_RUNS, 'each run doubles the training rows'),
  models: whole(1, DEMO_MAX_MODELS, 'the first model and the after model'),
};

function describeBound(b: NumberBound): string {
  if (b.integer) return `a whole number from ${b.min.toLocaleString('en-US')} to ${b.max.toLocaleString('en-US')}`;
  if (b.min === 0 && b.max === 1) return b.openMin && b.openMax ? 'a fraction strictly between 0 and 1 (e.g. 0.05)' : 'a fraction in [0, 1] (e.g. 0.02 for 2 %)';
  const lo = `${b.openMin ? '>' : '>='} ${b.min}`;
  const hi = `${b.openMax ? '<' : '<='} ${b.max.toLocaleString('en-US')}`;
  return `a number ${lo} and ${hi}`;
}

/**
 * The value as a number within its bound, or a one-line error naming where it came from.
 * @param shown how the option is named in the message (`--bins 1e308`, `floorgap.json "bins": 1e308`)
 * @example
 * boundedNumber(NUMBER_BOUNDS.bins, 5, '--bins 5'); // => 5
 * boundedNumber(NUMBER_BOUNDS.bins, 1e308, '--bins 1e308'); // throws: expected a whole number from 2 to 1,000
 */
export function boundedNumber(b: NumberBound, value: unknown, shown: string): number {
  const v = typeof value === 'string' && value.trim() !== '' ? Number(value) : value;
  const ok =
    typeof v === 'number' &&
    Number.isFinite(v) &&
    (!b.integer || Number.isInteger(v)) &&
    (b.openMin ? v > b.min : v >= b.min) &&
    (b.openMax ? v < b.max : v <= b.max);
  if (!ok) throw error(`${shown}: expected ${b.expected ?? describeBound(b)}${b.why ? ` (${b.why})` : ''}`);
  return v as number;
}

const UNITS: Readonly<Record<string, number>> = {
  b: 1,
  kb: 1e3,
  mb: 1e6,
  gb: 1e9,
  tb: 1e12,
  kib: 2 ** 10,
  mib: 2 ** 20,
  gib: 2 ** 30,
  tib: 2 ** 40,
};

/** Smallest `--memory-limit`: below it the engine cannot hold a scan's working set. */
const MIN_MEMORY_BYTES = 64e6;

/**
 * Parses `--memory-limit`: a size with a unit (B, KB, MB, GB, TB, KiB, MiB, GiB, TiB), between 64 MB
 * and the machine's memory. Returns the text, which DuckDB is given as it is.
 * @example
 * memoryLimit('2GB', '--memory-limit 2GB'); // => '2GB'
 * memoryLimit('abc', '--memory-limit abc'); // throws
 */
export function memoryLimit(value: unknown, shown: string, machineBytes = totalmem()): string {
  const text = String(value ?? '').trim();
  const m = /^(\d+(?:\.\d+)?)\s*([a-z]+)$/i.exec(text);
  const unit = m ? UNITS[m[2].toLowerCase()] : undefined;
  const bytes = m && unit !== undefined ? Number(m[1]) * unit : NaN;
  if (!Number.isFinite(bytes) || bytes < MIN_MEMORY_BYTES || bytes > machineBytes) {
    const gb = (machineBytes / 1e9).toFixed(1);
    throw error(`${shown}: expected a size such as 2GB or 512MB, from 64MB to this machine's memory (${gb}GB)`);
  }
  return text;
}

/** How an option and its value are named in a message: `--bins 1e308`, or the project file's entry. */
export type ShowOption = (name: string, value: unknown) => string;

const asFlag: ShowOption = (name, value) => `--${name} ${String(value)}`;

/**
 * Checks (and converts to numbers) every numeric option present in the parsed arguments, and the
 * memory limit.
 * @param shown names an option and its value in messages (see cli/index.ts: the text as typed, or the
 * project file's entry)
 */
export function checkBounds(args: Record<string, unknown>, shown: ShowOption = asFlag): void {
  for (const [name, bound] of Object.entries(NUMBER_BOUNDS)) {
    const v = args[name];
    if (v === undefined) continue;
    args[name] = boundedNumber(bound, v, shown(name, v));
  }
  if (args['memory-limit'] !== undefined) args['memory-limit'] = memoryLimit(args['memory-limit'], shown('memory-limit', args['memory-limit']));
  const bins = args.bins as number | undefined;
  const maxSlices = args['max-slices'] as number | undefined;
  if (bins !== undefined && maxSlices !== undefined && bins > maxSlices) {
    throw error(`--bins ${bins}: more bins than --max-slices ${maxSlices} lets one grouping list; expected at most ${maxSlices}`);
  }
}
