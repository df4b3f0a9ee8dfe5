import { writeDemo } from '../../demo/write-demo.js';
import { sanitize } from '../../terminal/sanitize.js';
import type { CliIO } from '../io.js';
import { writeOut } from '../io.js';

export interface DemoArgs {
  out: string;
  rows: number;
  seed: number;
  runs: number;
  models: number;
  force: boolean;
}

/** `floorgap demo`: writes the seeded solder-joint prediction table and the inspector floor table. */
export async function runDemo(args: DemoArgs, io: CliIO): Promise<number> {
  const result = await writeDemo(args.out, { rows: args.rows, seed: args.seed, runs: args.runs, models: args.models, overwrite: args.force });
  const after = result.after === undefined ? '' : `, the after model's predictions of the same rows to ${sanitize(result.after)},`;
  await writeOut(
    io,
    `wrote ${result.rows} rows to ${sanitize(result.table)}${after} and floors to ${sanitize(result.floors)}\n` +
      `next: floorgap report ${sanitize(result.table)} --floor-table ${sanitize(result.floors)} --annotators insp_a,insp_b,insp_c\n`,
  );
  return 0;
}
