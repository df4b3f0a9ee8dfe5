import { existsSync, readFileSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { error } from '../core/errors.js';

/** The project file read from the working directory when `--config` is not given. */
export const CONFIG_FILE = 'floorgap.json';

/**
 * The options a project file may set: analysis options only (column roles, slices, floors and costs,
 * statistics, check limits) and the engine's bounded resources (threads, memory limit; see
 * cli/bounds.ts). An allow-list: anything else is an error. Never an output path, --force, --junit, an
 * input file or the output format: a project file comes with a folder (a cloned repository) and must
 * not decide what is written where.
 */
export const PROJECT_OPTIONS: ReadonlySet<string> = new Set([
  // column roles
  'label', 'pred', 'error', 'split', 'id', 'score', 'weight', 'run-column', 'run',
  // slices
  'by', 'slice-cols', 'bins', 'bin-method', 'max-cells', 'max-slices',
  // floors and costs
  'floor', 'floor-table', 'annotators', 'floor-rule', 'cost-table',
  // statistics
  'confidence', 'fdr', 'fdr-method', 'min-rows', 'floor-margin', 'min-headroom', 'curve-exponent', 'label-cost',
  // check limits
  'max-bias', 'max-variance', 'max-mismatch', 'max-dev-error', 'strict',
  // engine resources, bounded like the flags
  'threads', 'memory-limit',
]);

/** Allowed only in a file named with `--config`: SQL text, which a file found in a folder must not carry. */
export const EXPLICIT_CONFIG_OPTIONS: ReadonlySet<string> = new Set(['where']);

/** Options that name an output or allow replacing one (and their aliases), for a clearer refusal. */
const OUTPUT_OPTIONS: ReadonlySet<string> = new Set(['out', 'o', 'force', 'junit']);

/**
 * Reads a project file: a JSON object whose keys are long option names (e.g. "label", "floor-table",
 * "by"); values act as defaults that flags override. Returns {} when the default file is absent.
 * Keys must be in {@link PROJECT_OPTIONS}; "where" too is allowed in a file named with `--config`.
 * @param explicit the `--config` path (relative to `cwd`), or null for `cwd/floorgap.json`
 * @param cwd the command's working folder
 * @throws FloorgapError naming the file and the key that is not allowed
 * @example
 * // floorgap.json: { "label": "truth", "pred": "guess", "floor-table": "floors.csv" }
 * readConfig(null, '/work/project'); // => { label: 'truth', pred: 'guess', 'floor-table': 'floors.csv' }
 */
export function readConfig(explicit: string | null, cwd: string): Record<string, unknown> {
  const path = explicit ?? join(cwd, CONFIG_FILE);
  const file = resolve(cwd, path);
  if (!explicit && !existsSync(file)) return {};
  // a named pipe would wait for a writer forever, a folder fails with EISDIR: name what it is instead
  const kind = statSync(file, { throwIfNoEntry: false });
  if (kind && !kind.isFile()) throw error(`${path}: the config file is not a regular file (${kind.isDirectory() ? 'a folder' : 'a pipe, a device or a socket'})`);
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw error(`${path}: cannot read the config file (${(e as NodeJS.ErrnoException).code ?? String(e)})`, e);
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw error(`${path}: not valid JSON (${(e as Error).message}); expected an object such as {"label": "truth"}`, e);
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw error(`${path}: expected a JSON object of option names and values, e.g. {"label": "truth"}`);
  }
  for (const key of Object.keys(value)) {
    if (PROJECT_OPTIONS.has(key) || (explicit && EXPLICIT_CONFIG_OPTIONS.has(key))) continue;
    const name = JSON.stringify(key);
    if (OUTPUT_OPTIONS.has(key)) {
      throw error(`${path}: ${name} names an output or allows overwriting one, which a project file may not set${explicit ? ', even one named with --config' : ''}; give it on the command line`);
    }
    if (EXPLICIT_CONFIG_OPTIONS.has(key)) {
      throw error(`${path}: ${name} (SQL text) may not come from a project file found in the working folder; give --${key} on the command line, or name the file with --config`);
    }
    throw error(`${path}: ${name} is not an option a project file may set; it sets analysis options only (column roles, slices, floors, statistics, check limits, threads, memory limit), e.g. "label", "floor-table", "by"`);
  }
  return value as Record<string, unknown>;
}
