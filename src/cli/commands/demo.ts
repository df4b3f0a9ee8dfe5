import { writeDemo } from '../../demo/write-demo.js';
import { sanitize } from '../../terminal/sanitize.js';
import type { CliIO } from '../io.js';
import { writeOut } from '../io.js';

export interface DemoArgs {
  out: string;
  rows: number;
  seed: number;
  runs: number;
  force: boolean;
}

/** `floorgap demo`: writes the seeded solder-joint prediction table and the inspector floor table. */
export async function runDemo(args: DemoArgs, io: CliIO): Promise<number> {
  const result = await writeDemo(args.out, { rows: args.rows, seed: args.seed, runs: args.runs, overwrite: args.force });
  await writeOut(
    io,
    `wrote ${result.rows} rows to ${sanitize(result.table)} and floors to ${sanitize(result.floors)}\n` +
      `next: floorgap report ${sanitize(result.table)} --floor-table ${sanitize(result.floors)} --annotators insp_a,insp_b,insp_c\n`,
  );
  return 0;
}
