/**
 * The benchmark's prediction table: the demo generator's rows (split, station, package, sharpness,
 * label, pred, score, with their planted gaps) plus four more metadata columns drawn from a side
 * stream, so that the table has six slice columns of 5 to 50 values and one numeric column. The added
 * columns nest the way line metadata does: a board carries one package (8 boards per package), the
 * pick-and-place nozzle follows the package, an operator works on one line (4 per line); lines are
 * skewed (Zipf-like). Our own scenario, like the demo's.
 *
 * | column | values |
 * |---|---|
 * | station | 6 (demo) |
 * | package | 6 (demo) |
 * | board | 48, nested in package |
 * | nozzle | 6, one per package |
 * | line | 5, skewed |
 * | operator | 20, nested in line |
 * | sharpness | numeric (demo) |
 */
import { createWriteStream } from 'node:fs';
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { demoFloorCsvLines } from '../src/demo/csv.js';
import { generateDemoRows } from '../src/demo/draws.js';
import { DEMO_PACKAGES } from '../src/demo/scenario.js';
import { Random } from '../src/demo/random.js';
import { openDuck } from '../src/sql/duck.js';
import { literal } from '../src/sql/quote.js';

export const BENCH_COLUMNS = ['id', 'split', 'station', 'package', 'board', 'nozzle', 'line', 'operator', 'sharpness', 'label', 'pred', 'score'] as const;

function cumulative(k: number, s: number): number[] {
  const w = Array.from({ length: k }, (_, i) => 1 / (i + 1) ** s);
  const total = w.reduce((a, b) => a + b, 0);
  let c = 0;
  return w.map((x) => (c += x / total));
}

/**
 * Writes `DIR/bench.csv`, `DIR/bench.parquet` (the same rows; numbers typed as DOUBLE, as a Parquet
 * file written by a pipeline would hold them) and `DIR/floors.csv` (the demo's per-package floors).
 */
export async function writeBenchTable(dir: string, rows: number, seed = 1): Promise<{ csv: string; parquet: string; floors: string }> {
  const csv = join(dir, 'bench.csv');
  const parquet = join(dir, 'bench.parquet');
  const floors = join(dir, 'floors.csv');
  const rng = new Random(seed * 7919 + 17);
  const lines = cumulative(5, 0.8);
  const boards = cumulative(8, 0.8);
  const operators = cumulative(4, 0.3);
  const pick = (c: readonly number[]) => {
    const u = rng.uniform();
    let i = 0;
    while (i < c.length - 1 && u >= c[i]) i++;
    return i;
  };
  const out = createWriteStream(csv);
  const write = (chunk: string) => new Promise<void>((resolve) => (out.write(chunk) ? resolve() : out.once('drain', () => resolve())));
  await write(BENCH_COLUMNS.join(',') + '\n');
  let chunk = '';
  for (const r of generateDemoRows({ rows, seed })) {
    const p = DEMO_PACKAGES.indexOf(r.package);
    const line = pick(lines);
    const board = `B${String(p * 8 + pick(boards) + 1).padStart(2, '0')}`;
    const operator = `OP${String(line * 4 + pick(operators) + 1).padStart(2, '0')}`;
    chunk += `${r.id},${r.split},${r.station},${r.package},${board},N${p + 1},L${line + 1},${operator},${r.sharpness.toFixed(3)},${r.label},${r.pred},${r.score.toFixed(3)}\n`;
    if (chunk.length >= 1 << 20) {
      await write(chunk);
      chunk = '';
    }
  }
  await write(chunk);
  await new Promise<void>((resolve, reject) => out.end((e?: Error | null) => (e ? reject(e) : resolve())));
  const duck = await openDuck({ threads: 2 });
  try {
    await duck.run(
      `COPY (SELECT * REPLACE (CAST(sharpness AS DOUBLE) AS sharpness, CAST(score AS DOUBLE) AS score) FROM read_csv(${literal(csv)}, header = true, all_varchar = true)) TO ${literal(parquet)} (FORMAT parquet)`,
    );
  } finally {
    duck.close();
  }
  await writeFile(floors, [...demoFloorCsvLines()].join('\n') + '\n');
  return { csv, parquet, floors };
}
