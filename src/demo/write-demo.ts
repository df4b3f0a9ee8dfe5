import { promises as fs } from 'node:fs';
import { join } from 'node:path';
import { checkDestination, writeAtomic, writeReason } from '../output/write-atomic.js';
import { error } from '../core/errors.js';
import { demoFloorCsvLines, demoRowsToCsvLines } from './csv.js';
import { generateDemoRows } from './draws.js';
import { checkDemoOptions, type DemoOptions } from './scenario.js';

/** File names {@link writeDemo} writes inside its folder. */
const DEMO_TABLE_FILE = 'solder-joints.csv';
const DEMO_FLOORS_FILE = 'inspector-floors.csv';

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
 * @returns the two paths and the number of data rows written (with runs, over all runs)
 * @example
 * await writeDemo('data-samples', { ...DEMO_DEFAULTS, overwrite: true }); // regenerates the shipped sample
 */
export async function writeDemo(
  dir: string,
  options: DemoOptions & { overwrite?: boolean },
): Promise<{ table: string; floors: string; rows: number }> {
  const { rows, seed } = options;
  const generate: DemoOptions = options.runs === undefined ? { rows, seed } : { rows, seed, runs: options.runs };
  try {
    checkDemoOptions(generate);
  } catch (e) {
    throw error(`demo: ${(e as Error).message}`, e);
  }
  const table = join(dir, DEMO_TABLE_FILE);
  const floors = join(dir, DEMO_FLOORS_FILE);
  const overwrite = options.overwrite === true;

  try {
    await fs.mkdir(dir, { recursive: true });
  } catch (e) {
    throw error(`${dir}: cannot create the folder: ${writeReason(e)}`, e);
  }
  // both paths before anything is written: only absent or (with overwrite) regular files
  for (const path of [table, floors]) await checkDestination(path, { overwrite });

  let written = 0;
  await writeAtomic(
    table,
    async (put) => {
      let chunk = '';
      let first = true;
      for (const line of demoRowsToCsvLines(generateDemoRows(generate))) {
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
  // the small floors file second: when the table cannot be written, neither is
  await writeAtomic(
    floors,
    async (put) => {
      await put([...demoFloorCsvLines()].join('\n') + '\n');
    },
    { overwrite },
  );

  return { table, floors, rows: written };
}
