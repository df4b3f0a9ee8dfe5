#!/usr/bin/env node
/**
 * Checks the demo's after model (DEMO_PLANTS.after in src/demo/scenario.ts) over many seeds, through the
 * built CLI (`npm run build` first):
 *
 *   node scripts/demo-compare.mjs [--seeds 10] [--first 1] [--rows 20000] [--also 24]
 *
 * For each seed it writes `floorgap demo --models 2` and reads the two CSVs back (plain JS), pairs the
 * rows by id, and per one-column slice (and the whole table) and split counts the discordant pairs: b
 * (the first model wrong, the after model right) and c (the other way). The paired change of the error
 * rate is (c − b) / n; its test is McNemar's (the score test at Δ = 0, no continuity correction), exact
 * binomial below 25 discordant pairs. q: Benjamini–Hochberg over every slice × split of the seed.
 * It prints the fix (lighting=low-angle dev), the regression (lighting=coaxial dev and train), the whole
 * table's dev change, and the other one-column slices whose dev change has p < 0.001; then a summary.
 * Not part of `npm test`.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DEMO_PLANTS } from '../dist/demo/scenario.js';

const args = process.argv.slice(2);
const raw = (name) => {
  const i = args.indexOf(`--${name}`);
  return i === -1 ? undefined : args[i + 1];
};
const opt = (name, fallback) => (raw(name) === undefined ? fallback : Number(raw(name)));
const seedCount = opt('seeds', 10);
const first = opt('first', 1);
const rows = opt('rows', 20_000);
const seeds = Array.from({ length: seedCount }, (_, i) => first + i);
if (raw('also') !== undefined && !seeds.includes(Number(raw('also')))) seeds.push(Number(raw('also')));

const COLUMNS = ['station', 'lighting', 'package', 'finish', 'shift'];
const SPLITS = ['train', 'train_dev', 'dev', 'test'];
const FIX = `${DEMO_PLANTS.after.fix.column}=${DEMO_PLANTS.after.fix.value}`;
const REGRESSION = `${DEMO_PLANTS.after.regression.column}=${DEMO_PLANTS.after.regression.value}`;
const THRESHOLD = 1e-3;

/**
 * 2·Q(|z|), the two-sided normal tail, as erfc(|z|/√2) by the Chebyshev fit of Numerical Recipes
 * (erfcc, fractional error below 1.2e-7 everywhere): enough for a script that compares p with 0.001.
 */
function twoSidedNormal(z) {
  const x = Math.abs(z) / Math.SQRT2;
  const t = 1 / (1 + 0.5 * x);
  const poly = -x * x - 1.26551223 + t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 +
    t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277))))))));
  return Math.min(1, t * Math.exp(poly));
}

/** McNemar's exact form: the two-sided binomial p of min(b, c) of b + c at 1/2 (the smaller tail doubled, capped at 1). */
function exactBinomial(b, c) {
  const n = b + c;
  const k = Math.min(b, c);
  let tail = 0;
  let term = 2 ** -n;
  for (let i = 0; i <= k; i++) {
    tail += term;
    term = (term * (n - i)) / (i + 1);
  }
  return Math.min(1, 2 * tail);
}

function mcnemar(b, c) {
  if (b + c === 0) return 1;
  if (b + c < 25) return exactBinomial(b, c);
  return twoSidedNormal((c - b) / Math.sqrt(b + c));
}

function readTable(path) {
  const lines = readFileSync(path, 'utf8').trimEnd().split('\n');
  const header = lines[0].split(',');
  return lines.slice(1).map((line) => Object.fromEntries(line.split(',').map((v, i) => [header[i], v])));
}

function benjaminiHochberg(ps) {
  const order = ps.map((p, i) => [p, i]).sort((a, b) => a[0] - b[0]);
  const q = new Array(ps.length);
  let min = 1;
  for (let r = order.length - 1; r >= 0; r--) {
    min = Math.min(min, (order[r][0] * order.length) / (r + 1));
    q[order[r][1]] = min;
  }
  return q;
}

const dir = mkdtempSync(join(tmpdir(), 'floorgap-compare-'));
const out = [];
let COUNT_OTHER = 0;
const pct = (x) => (100 * x).toFixed(2);
try {
  for (const seed of seeds) {
    const d = join(dir, String(seed));
    execFileSync(process.execPath, ['dist/cli.js', 'demo', '--out', d, '--rows', String(rows), '--seed', String(seed), '--models', '2']);
    const before = readTable(join(d, 'solder-joints.csv'));
    const after = readTable(join(d, 'solder-joints-after.csv'));
    const byId = new Map(after.map((r) => [r.id, r]));
    const cells = new Map(); // `${slice}|${split}` → { n, b, c }
    const add = (slice, split, wrongBefore, wrongAfter) => {
      const key = `${slice}|${split}`;
      const cell = cells.get(key) ?? { slice, split, n: 0, b: 0, c: 0 };
      cell.n++;
      if (wrongBefore && !wrongAfter) cell.b++;
      if (!wrongBefore && wrongAfter) cell.c++;
      cells.set(key, cell);
    };
    for (const r of before) {
      const a = byId.get(r.id);
      const wb = r.pred !== r.label;
      const wa = a.pred !== a.label;
      add('(all)', r.split, wb, wa);
      for (const col of COLUMNS) add(`${col}=${r[col]}`, r.split, wb, wa);
    }
    const list = [...cells.values()];
    for (const cell of list) {
      cell.delta = (cell.c - cell.b) / cell.n;
      cell.p = mcnemar(cell.b, cell.c);
    }
    const qs = benjaminiHochberg(list.map((c) => c.p));
    list.forEach((c, i) => (c.q = qs[i]));
    const get = (slice, split) => cells.get(`${slice}|${split}`);
    const fix = get(FIX, 'dev');
    const regDev = get(REGRESSION, 'dev');
    const regTrain = get(REGRESSION, 'train');
    const all = get('(all)', 'dev');
    const wrong = list.filter((c) => c.split === 'dev' && c.slice !== FIX && c.slice !== REGRESSION && c.slice !== '(all)');
    COUNT_OTHER = wrong.length;
    const wrongHits = wrong.filter((c) => c.p < THRESHOLD);
    const wrongQ = wrong.filter((c) => c.q <= 0.05);
    const minWrong = wrong.reduce((m, c) => (c.p < m.p ? c : m));
    const row = { seed, fix, regDev, regTrain, all, wrongHits, wrongQ, minWrong };
    out.push(row);
    const show = (c) => `${pct(c.delta)} pts (b ${c.b}, c ${c.c}) p ${c.p.toExponential(1)} q ${c.q.toExponential(1)}`;
    console.log(
      `seed ${seed}: fix ${FIX} dev ${show(fix)} · regression ${REGRESSION} dev ${show(regDev)}, train ${show(regTrain)} · all dev ${show(all)} · ` +
        `other slices, dev p < ${THRESHOLD}: ${wrongHits.map((c) => `${c.slice} ${show(c)}`).join(', ') || 'none'} (smallest ${minWrong.slice} p ${minWrong.p.toExponential(1)}${wrongQ.length ? `; q ≤ 0.05: ${wrongQ.map((c) => c.slice).join(', ')}` : ''})`,
    );
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
const count = (f) => out.filter(f).length;
console.log(`\n${out.length} seeds, ${rows} rows`);
console.log(`fix (${FIX} dev fell) with q < 0.05: ${count((r) => r.fix.delta < 0 && r.fix.q < 0.05)}; q < 0.001: ${count((r) => r.fix.delta < 0 && r.fix.q < 0.001)}; largest q ${Math.max(...out.map((r) => r.fix.q)).toExponential(1)}`);
console.log(`regression (${REGRESSION} dev rose) with q < 0.05: ${count((r) => r.regDev.delta > 0 && r.regDev.q < 0.05)}; train rose q < 0.05: ${count((r) => r.regTrain.delta > 0 && r.regTrain.q < 0.05)}; largest dev q ${Math.max(...out.map((r) => r.regDev.q)).toExponential(1)}`);
console.log(`whole table dev: rose with q < 0.05 in ${count((r) => r.all.delta > 0 && r.all.q < 0.05)}, fell with q < 0.05 in ${count((r) => r.all.delta < 0 && r.all.q < 0.05)}`);
console.log(`seeds where another one-column slice's dev change has p < ${THRESHOLD}: ${count((r) => r.wrongHits.length > 0)} (slices: ${out.reduce((s, r) => s + r.wrongHits.length, 0)} of ${out.length} × ${COUNT_OTHER} tested); q ≤ 0.05: ${count((r) => r.wrongQ.length > 0)}`);
