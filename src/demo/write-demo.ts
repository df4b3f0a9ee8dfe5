import { promises as fs } from 'node:fs';
import { join } from 'node:path';
import { checkDestination, writeAtomic, writeReason } from '../output/write-atomic.js';
import { error } from '../core/errors.js';
import { demoFloorCsvLines, demoRowsToCsvLines } from './csv.js';
import { generateDemoAfterRows, generateDemoRows } from './draws.js';
import { checkDemoOptions, type DemoOptions, type DemoRow } from './scenario.js';

/** File names {@link writeDemo} writes inside its folder. */
const DEMO_TABLE_FILE = 'solder-joints.csv';
const DEMO_FLOORS_FILE = 'inspector-floors.csv';
/** The after model's table, written with `models: 2`. */
const DEMO_AFTER_FILE = 'solder-joints-after.csv';

/** Lines are gathered into chunks of about this many characters before each write. */
const CHUNK_CHARS = 64 * 1024;

/**
 * Writes the demo prediction table `DIR/solder-joints.csv` and the inspector floor table
 * `DIR/inspector-floors.csv`, each atomically. Rows are streamed in ~64 KB chunks, so memory stays
 * flat for any row count. A missing `dir` is created. Without `overwrite`, an existing file of
 * either name stops it before anything is written; with it, only regular files are replaced (see
 * checkDestination).
 *
 * `rows` is the size of the run-independent dataset (every example once, see {@link DemoOptions.rows});
 * with `runs = R ≥ 2` the table holds R training runs of it (train rows halving towards run 1, the
 * other splits repeated in full), so more lines than `rows` are written.
 *
 * With `models: 2` it also writes `DIR/solder-joints-after.csv`: the same rows with the after model's
 * predictions (see DEMO_PLANTS.after in scenario.ts), after the first table and before the floors; the
 * first table is the same bytes as with `models: 1`. Each file is written whole or not at all; a
 * failure leaves the files written before it.
 * @returns the paths (`after` only with two models) and the number of data rows of the first table
 *   (with runs, over all runs)
 * @example
 * await writeDemo('data-samples', { ...DEMO_DEFAULTS, overwrite: true }); // regenerates the shipped sample
 */
export async function writeDemo(
  dir: string,
  options: DemoOptions & { overwrite?: boolean },
): Promise<{ table: string; floors: string; rows: number; after?: string }> {
  const { rows, seed } = options;
  const generate: DemoOptions = options.runs === undefined ? { rows, seed } : { rows, seed, runs: options.runs };
  const models = options.models ?? 1;
  try {
    checkDemoOptions({ ...generate, models });
  } catch (e) {
    throw error(`demo: ${(e as Error).message}`, e);
  }
  const table = join(dir, DEMO_TABLE_FILE);
  const floors = join(dir, DEMO_FLOORS_FILE);
  const after = models === 2 ? join(dir, DEMO_AFTER_FILE) : null;
  const overwrite = options.overwrite === true;

  try {
    await fs.mkdir(dir, { recursive: true });
  } catch (e) {
    throw error(`${dir}: cannot create the folder: ${writeReason(e)}`, e);
  }
  // both paths before anything is written: only absent or (with overwrite) regular files
  for (const path of after === null ? [table, floors] : [table, after, floors]) await checkDestination(path, { overwrite });

  const written = await writeTable(table, generateDemoRows(generate), overwrite);
  if (after !== null) await writeTable(after, generateDemoAfterRows(generate), overwrite);
  // the small floors file second: when the table cannot be written, neither is
  await writeAtomic(
    floors,
    async (put) => {
      await put([...demoFloorCsvLines()].join('\n') + '\n');
    },
    { overwrite },
  );

  return after === null ? { table, floors, rows: written } : { table, floors, rows: written, after };
}

/** Writes `rows` as a CSV table at `path` atomically, in chunks; returns the number of data rows. */
async function writeTable(path: string, rows: Iterable<DemoRow>, overwrite: boolean): Promise<number> {
  let written = 0;
  await writeAtomic(
    path,
    async (put) => {
      let chunk = '';
      let first = true;
      for (const line of demoRowsToCsvLines(rows)) {
        if (first) first = false;
        else written++;
        chunk += line + '\n';
        if (chunk.length >= CHUNK_CHARS) {
          await put(chunk);
          chunk = '';
        }
      }
      if (chunk.length > 0) await put(chunk);
    },
    { overwrite },
  );
  return written;
}
