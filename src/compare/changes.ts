/**
 * Two reports of the same slices (BEFORE and AFTER) → the change of every measure per slice: per split
 * the paired change d_s (Tango's interval, at Kish's effective counts with weights) or, for a split
 * that did not pair, the difference of the two rates (Newcombe's hybrid score interval); a measure of
 * two splits combines their intervals by MOVER; q-values over every slice × measure; verdicts and a
 * one-line reading. Pure: plain data in, plain data out.
 */
import type { Split } from '../core/split.js';
import type { Interval } from '../stats/index.js';
import {
  benjaminiHochberg,
  benjaminiYekutieli,
  binomialTestTwoSided,
  intervalPValue,
  moverLimits,
  moverPValue,
  newcombeInterval,
  pairedMeanInterval,
  tangoScoreTest,
} from '../stats/index.js';
import { sliceId } from '../triage/report.js';
import type { Report, SliceReport } from '../triage/types.js';
import type { PairedSlices, PairedSplitSums } from './paired-rollup.js';
import { MEASURES, type Change, type CompareOptions, type Comparison, type Measure, type SliceComparison, type SplitPairingInfo, type Verdict } from './types.js';

/** Fewer discordant (effective) pairs than this use the exact binomial test, as `check` does (mcnemarTest). */
const EXACT_BELOW = 25;

/** One split's change: its value, its interval at any confidence level, and its p-value. */
interface SplitChange {
  readonly value: number;
  readonly at: (confidence: number) => Interval | null;
  readonly p: number | null;
  readonly paired: boolean;
}

/**
 * The paired change of one split from its weight sums: d̂ and Tango's interval at the effective counts
 * (pairedMeanInterval); the score test at those counts (tangoScoreTest), or, below 25 discordant
 * effective pairs, the exact binomial test of b against b + c at ½ on the counts rounded to whole pairs
 * (exact for unit weights).
 * @example
 * pairedChange({ pairs: 32, sumW: 32, sumW2: 32, bSumW: 3, bSumW2: 3, cSumW: 9, cSumW2: 9 })?.p; // => 0.146 (binomial, 3 of 12)
 */
export function pairedChange(sums: PairedSplitSums): SplitChange | null {
  const first = pairedMeanInterval(sums, 0.95);
  if (first === null) return null;
  const scale = sums.sumW / sums.sumW2;
  const b = sums.bSumW * scale;
  const c = sums.cSumW * scale;
  let p: number;
  if (b + c < EXACT_BELOW) {
    const rb = Math.round(b);
    const rc = Math.round(c);
    p = binomialTestTwoSided(rb, rb + rc, 0.5);
  } else {
    p = tangoScoreTest(b, Math.min(c, first.nEff - b), first.nEff)!.p;
  }
  return { value: first.estimate, at: (level) => pairedMeanInterval(sums, level)?.interval ?? null, p, paired: true };
}

/**
 * The unpaired change of one split: after − before of the two sides' rates (effective counts), with
 * Newcombe's hybrid score interval and the p-value that inverts it (moverPValue, the same interval).
 */
function unpairedChange(before: SliceReport, after: SliceReport, split: Split): SplitChange | null {
  const a = after.error[split];
  const b = before.error[split];
  if (!a || !b || !(a.n > 0) || !(b.n > 0)) return null;
  const xa = Math.min(a.n, Math.max(0, a.value * a.n));
  const xb = Math.min(b.n, Math.max(0, b.value * b.n));
  return {
    value: a.value - b.value,
    at: (level) => newcombeInterval(xa, a.n, xb, b.n, level),
    p: moverPValue([{ coef: 1, x: xa, n: a.n }, { coef: -1, x: xb, n: b.n }]),
    paired: false,
  };
}

/** d_first − d_second, its MOVER interval at any level (Zou & Donner 2008) and the p-value that inverts it. */
function difference(first: SplitChange, second: SplitChange): SplitChange | null {
  const value = first.value - second.value;
  const at = (level: number): Interval | null => {
    const f = first.at(level);
    const s = second.at(level);
    if (!f || !s) return null;
    return moverLimits([
      { coef: 1, value: first.value, lo: f.lo, hi: f.hi },
      { coef: -1, value: second.value, lo: s.lo, hi: s.hi },
    ]);
  };
  if (at(0.95) === null) return null;
  return { value, at, p: intervalPValue(value, at), paired: first.paired && second.paired };
}

/** A slice's change of each measure before the q-values: from its splits' changes. */
function measureChanges(splits: Readonly<Partial<Record<Split, SplitChange | null>>>): Record<Measure, SplitChange | null> {
  const { train, train_dev: trainDev, dev, test } = splits;
  const diff = (a: SplitChange | null | undefined, b: SplitChange | null | undefined) => (a && b ? difference(a, b) : null);
  return {
    dev_error: dev ?? null,
    // the floor is the same on both sides and cancels
    avoidable_bias: train ?? null,
    variance: trainDev ? diff(trainDev, train) : diff(dev, train),
    mismatch: trainDev ? diff(dev, trainDev) : null,
    dev_overfit: diff(test, dev),
  };
}

const PART_NAMES: readonly [Measure, string][] = [
  ['avoidable_bias', 'bias'],
  ['variance', 'variance'],
  ['mismatch', 'mismatch'],
];

const pts = (x: number) => (Math.abs(x) * 100).toFixed(1);

/**
 * The one-line reading of a slice's changes: the parts that fell, "but" the parts that rose, then dev
 * error's verdict; a fallen part is called a working lever only when dev error improved.
 * @example
 * reading(changes, 0.02); // => 'variance fell 4.1 pts but bias rose 3.9: dev error no clear change'
 */
export function reading(change: Readonly<Record<Measure, Change | null>>, margin: number | null): string {
  const dev = change.dev_error;
  if (dev?.verdict === 'thin') return 'thin on one side: not judged';
  const fell = PART_NAMES.filter(([m]) => change[m]?.verdict === 'fell');
  const rose = PART_NAMES.filter(([m]) => change[m]?.verdict === 'rose');
  const items = [...fell, ...rose].map(([m, name], i) => `${name} ${change[m]!.verdict} ${pts(change[m]!.value)}${i === 0 ? ' pts' : ''}`);
  const moved = [items.slice(0, fell.length).join(', '), items.slice(fell.length).join(', ')].filter(Boolean).join(' but ');
  let devText: string;
  if (!dev) devText = 'no dev error to compare';
  else if (dev.verdict === 'improved' || dev.verdict === 'regressed') devText = `dev error ${dev.verdict} ${pts(dev.value)} pts`;
  else if (dev.verdict === 'within-margin') devText = `dev error within ±${pts(margin ?? 0)} pts`;
  else devText = 'dev error no clear change';
  const working = dev?.verdict === 'improved' && fell.length > 0 ? ` (${fell.map(([, n]) => n).join(' and ')} lever working)` : '';
  return moved ? `${moved}: ${devText}${working}` : `${devText}${working}`;
}

function verdictOf(measure: Measure, c: SplitChange, lo: number | null, hi: number | null, q: number | null, options: CompareOptions): Verdict {
  const clear = q !== null && q <= options.fdr && lo !== null && hi !== null && (lo > 0 || hi < 0);
  if (clear) {
    const down = c.value < 0;
    if (measure === 'dev_error') return down ? 'improved' : 'regressed';
    return down ? 'fell' : 'rose';
  }
  const m = options.margin;
  if (m !== null && lo !== null && hi !== null && lo >= -m && hi <= m) return 'within-margin';
  return 'no-clear-change';
}

/**
 * Compares two reports of the same slices. Each slice (and the overall one) is matched by its key;
 * per split its change is paired when `paired` holds sums for it and `pairing` says the split paired,
 * else unpaired. q-values by Benjamini–Hochberg (or Yekutieli) over every slice × measure whose slice
 * is thin on neither side.
 * @param paired the paired sums per slice and split (compare/paired-rollup.ts), null without an id column
 * @example
 * compareSides(before, after, paired, pairing, { confidence: 0.95, fdr: 0.05, fdrMethod: 'bh', margin: null }, []).overall.change.dev_error?.verdict; // => 'improved'
 */
export function compareSides(
  before: Report,
  after: Report,
  paired: PairedSlices | null,
  pairing: Readonly<Record<Split, SplitPairingInfo>>,
  options: CompareOptions,
  warnings: readonly string[],
): Comparison {
  const afterById = new Map([after.overall, ...after.slices].map((s) => [sliceId(s.key), s]));
  const beforeById = new Map([before.overall, ...before.slices].map((s) => [sliceId(s.key), s]));
  // slices in AFTER's order, then those BEFORE alone holds
  const ids = [...new Set([...after.slices.map((s) => sliceId(s.key)), ...before.slices.map((s) => sliceId(s.key))])];
  const overallId = sliceId({});
  type Pending = { id: string; b: SliceReport | null; a: SliceReport | null; raw: Record<Measure, SplitChange | null> | null; thin: boolean };
  const pending: Pending[] = [overallId, ...ids].map((id) => {
    const b = beforeById.get(id) ?? null;
    const a = afterById.get(id) ?? null;
    if (!b || !a) return { id, b, a, raw: null, thin: false };
    const sums = paired?.get(id) ?? {};
    const splits: Partial<Record<Split, SplitChange | null>> = {};
    for (const split of ['train', 'train_dev', 'dev', 'test'] as const) {
      if (pairing[split].method === 'paired') {
        const s = sums[split];
        splits[split] = s ? pairedChange(s) : null;
      } else if (pairing[split].method === 'unpaired') {
        splits[split] = unpairedChange(b, a, split);
      }
    }
    return { id, b, a, raw: measureChanges(splits), thin: b.focus === 'thin' || a.focus === 'thin' };
  });
  const family: (number | null)[] = [];
  for (const p of pending) for (const m of MEASURES) family.push(p.raw && !p.thin ? p.raw[m]?.p ?? null : null);
  const q = (options.fdrMethod === 'by' ? benjaminiYekutieli : benjaminiHochberg)(family);
  const compared = pending.map((p, i): SliceComparison => {
    const change = Object.fromEntries(
      MEASURES.map((m, j) => {
        const c = p.raw?.[m] ?? null;
        if (!c) return [m, null];
        const ci = c.at(options.confidence);
        const qi = q[i * MEASURES.length + j];
        const verdict: Verdict = p.thin ? 'thin' : verdictOf(m, c, ci?.lo ?? null, ci?.hi ?? null, qi, options);
        return [m, { value: c.value, lo: ci?.lo ?? null, hi: ci?.hi ?? null, p: c.p, q: qi, verdict, paired: c.paired } satisfies Change];
      }),
    ) as Record<Measure, Change | null>;
    const label = (p.a ?? p.b)!.label;
    const text = !p.b ? 'only in AFTER' : !p.a ? 'only in BEFORE' : reading(change, options.margin);
    return { key: (p.a ?? p.b)!.key, label, before: p.b, after: p.a, change, reading: text };
  });
  const order: Record<string, number> = { regressed: 0, improved: 1 };
  const slices = compared
    .slice(1)
    .map((s, i) => ({ s, i }))
    .sort((x, y) => {
      const vx = order[x.s.change.dev_error?.verdict ?? ''] ?? 2;
      const vy = order[y.s.change.dev_error?.verdict ?? ''] ?? 2;
      return vx - vy || (x.s.change.dev_error?.q ?? 2) - (y.s.change.dev_error?.q ?? 2) || x.i - y.i;
    })
    .map((x) => x.s);
  return {
    schema: 'floorgap.compare/1',
    by: after.by,
    confidence: options.confidence,
    fdr: options.fdr,
    fdr_method: options.fdrMethod,
    margin: options.margin,
    before: { inputs: before.source.inputs, run: before.run },
    after: { inputs: after.source.inputs, run: after.run },
    roles: after.source.roles,
    pairing,
    overall: compared[0],
    slices,
    warnings,
  };
}
