import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { error } from '../util/error.js';

/** The project file read from the working directory when `--config` is not given. */
export const CONFIG_FILE = 'floorgap.json';

/**
 * Reads a project file: a JSON object whose keys are long option names (e.g. "label", "floor-table",
 * "by"); values act as defaults that flags override. Returns {} when the default file is absent.
 * @example
 * // floorgap.json: { "label": "truth", "pred": "guess", "floor-table": "floors.csv" }
 * readConfig(null, '/work/project'); // => { label: 'truth', pred: 'guess', 'floor-table': 'floors.csv' }
 */
export function readConfig(explicit: string | null, cwd: string): Record<string, unknown> {
  const path = explicit ?? join(cwd, CONFIG_FILE);
  if (!explicit && !existsSync(path)) return {};
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
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
  return value as Record<string, unknown>;
}
