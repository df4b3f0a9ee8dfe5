/**
 * The regroup (roll-up + triage) on synthetic cells, repeated, for a CPU profile of where its time goes:
 *
 *   node --cpu-prof --cpu-prof-dir /tmp/fg-prof --import tsx bench/profile-regroup.ts --cells 200000 --shape audit --by board,operator --reps 10
 *
 * `--by overview` profiles the overview. The shapes are those of bench/synthetic-cells.ts. Prints the
 * median time of a regroup; the profile lands in the --cpu-prof-dir folder (open it in Chrome's
 * DevTools, or sum its self times per function).
 */
import { median } from 'simple-statistics';
import { SYNTHETIC_COLUMNS, syntheticCells, type Shape } from './synthetic-cells.js';
import { buildReport, type ReportContext } from '../src/triage/report.js';
import { DEFAULT_TRIAGE_OPTIONS } from '../src/triage/types.js';

const args = process.argv.slice(2);
const opt = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] !== undefined ? args[i + 1] : fallback;
};
const n = Number(opt('cells', '200000'));
const shape = opt('shape', 'audit') as Shape;
const byArg = opt('by', 'board,operator');
const by = byArg === 'overview' ? null : byArg.split(',');
const reps = Number(opt('reps', '10'));
const CONTEXT: ReportContext = { inputs: [], roles: {}, where: null, version: 'bench', warnings: [] };

const cells = syntheticCells(n, shape);
const times: number[] = [];
for (let r = 0; r <= reps; r++) {
  const t0 = performance.now();
  buildReport(cells, by, by ? [] : SYNTHETIC_COLUMNS, CONTEXT, DEFAULT_TRIAGE_OPTIONS);
  // the first run warms up and is not counted
  if (r > 0) times.push(performance.now() - t0);
}
console.log(`${n.toLocaleString('en')} cells, ${shape}, by ${byArg}: regroup ${median(times).toFixed(0)} ms (median of ${reps})`);
