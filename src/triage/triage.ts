import { sum } from 'simple-statistics';
import type { SliceStats, SplitSums } from '../slices/rollup.js';
import type { Split } from '../core/split.js';
import { SPLITS } from '../core/split.js';
import {
  benjaminiHochberg,
  benjaminiYekutieli,
  kishEffectiveN,
  newcombeInterval,
  proportionTest,
  twoProportionTest,
  wilsonInterval,
} from '../stats/index.js';
import type { AnnotatorFloor } from './annotator-floor.js';
import { agreementOf, LOW_AGREEMENT } from './agreement.js';
import type { Agreement, Curve, FloorSource, Focus, Gap, Headroom, Rate, SliceFloor, SliceReport, TriageOptions } from './types.js';

/** What triage knows about a slice beyond its sums: an annotator floor and a learning curve. */
export interface SliceExtras {
  readonly annotatorFloor: AnnotatorFloor | null;
  readonly curve: Curve | null;
}

/** A proportion as the tests see it: x successes of n (effective) rows. */
export interface Prop {
  readonly p: number;
  readonly n: number;
}

/**
 * The split's weighted error rate and Kish n; null without weight, and null (never a crash) for sums no
 * valid weights give: a Σw, Σw² or Σw·error that is not finite, or a Kish n that is not a finite
 * positive number.
 */
function prop(s: SplitSums | undefined): Prop | null {
  if (!s || !(s.weight > 0)) return null;
  if (![s.weight, s.weightSq, s.errors].every(Number.isFinite)) return null;
  const n = kishEffectiveN(s.weight, s.weightSq);
  if (!(n > 0 && Number.isFinite(n))) return null;
  return { p: s.errors / s.weight, n };
}

function rate(pr: Prop | null, confidence: number): Rate | null {
  if (!pr) return null;
  const ci = wilsonInterval(pr.p * pr.n, pr.n, confidence)!;
  return { value: pr.p, lo: ci.lo, hi: ci.hi, n: pr.n };
}

/** Difference a − b of two independent proportions, with Newcombe's interval and the pooled z test. */
function diff(a: Prop | null, b: Prop | null, confidence: number): Gap | null {
  if (!a || !b) return null;
  const ci = newcombeInterval(a.p * a.n, a.n, b.p * b.n, b.n, confidence);
  return {
    value: a.p - b.p,
    lo: ci ? ci.lo : null,
    hi: ci ? ci.hi : null,
    p: twoProportionTest(a.p * a.n, a.n, b.p * b.n, b.n),
    q: null,
  };
}

/**
 * The slice's floor: weighted mean floor of its train rows. When floor-table entries carry `n`, the
 * floor's effective sample size is 1 / Σ_k π_k² / n_k, with π_k the share of the slice's train weight
 * that took entry k (entries without n count as exact); a single entry gives n_k.
 */
function sliceFloor(stats: SliceStats, confidence: number): SliceFloor {
  const train = stats.splits.train;
  const dev = stats.splits.dev;
  const parts = stats.floorParts.length > 0 ? stats.floorParts : stats.devFloorParts;
  const w = sum(parts.map((p) => p.weight));
  const value = train && train.weight > 0 ? train.floorSum / train.weight : dev && dev.weight > 0 ? dev.floorSum / dev.weight : 0;
  const devValue = dev && dev.weight > 0 ? dev.floorSum / dev.weight : null;
  let inv = 0;
  let uncertain = false;
  for (const part of parts) {
    if (part.n === null || part.weight <= 0) continue;
    uncertain = true;
    const pi = part.weight / w;
    inv += (pi * pi) / part.n;
  }
  // entries with n whose share is so small that Σ π² / n is not above 1 / (largest double) leave the
  // floor as good as exact (its n is not a double): no interval then
  const n = uncertain && inv > 0 && Number.isFinite(1 / inv) ? 1 / inv : null;
  const ci = n !== null ? wilsonInterval(value * n, n, confidence) : null;
  const entries = new Set(parts.filter((p) => p.weight > 0).map((p) => p.entry));
  const hasDefault = entries.has(-1);
  const hasTable = [...entries].some((e) => e >= 0);
  const source: FloorSource = hasTable ? (hasDefault ? 'mixed' : 'table') : 'default';
  return { value, dev: devValue, lo: ci ? ci.lo : null, hi: ci ? ci.hi : null, n, source, rule: null, raw: null, audited: null };
}

/** Everything computed for one slice before the family-wide FDR step: its decomposition. */
export interface Draft {
  stats: SliceStats;
  label: string;
  rows: Record<Split, number | null>;
  share: number;
  floor: SliceFloor;
  error: Record<Split, Rate | null>;
  gaps: { avoidable_bias: Gap | null; variance: Gap | null; mismatch: Gap | null; dev_overfit: Gap | null };
  headroom: Headroom | null;
  thin: boolean;
  cost: number;
  curve: Curve;
  agreement: Agreement | null;
}

/** "col=value · col=value"; "overall" for the empty key. */
function sliceLabel(key: Readonly<Record<string, string>>): string {
  const parts = Object.entries(key).map(([k, v]) => `${k}=${v}`);
  return parts.length ? parts.join(' · ') : 'overall';
}

/**
 * One slice's decomposition before the family-wide FDR step (q is null): rates, floor, gaps with
 * intervals and p-values, headroom and the thin rule. `devTotal` is the overall dev weight, `present`
 * the splits the data holds.
 * @example
 * draft(stats, 20000, new Set(['train', 'dev']), DEFAULT_TRIAGE_OPTIONS, null).gaps.variance?.value; // => dev − train error
 */
export function draft(stats: SliceStats, devTotal: number, present: ReadonlySet<Split>, o: TriageOptions, extras: SliceExtras | null): Draft {
  const c = o.confidence;
  const props = Object.fromEntries(SPLITS.map((s) => [s, present.has(s) ? prop(stats.splits[s]) : null])) as Record<Split, Prop | null>;
  const rows = Object.fromEntries(SPLITS.map((s) => [s, present.has(s) ? stats.splits[s]?.rows ?? 0 : null])) as Record<Split, number | null>;
  const error = Object.fromEntries(SPLITS.map((s) => [s, rate(props[s], c)])) as Record<Split, Rate | null>;
  // precedence: floor table > annotators > --floor
  let floor = sliceFloor(stats, c);
  const af = extras?.annotatorFloor ?? null;
  if (floor.source === 'default' && af) {
    floor = { value: af.value, dev: null, lo: af.lo, hi: af.hi, n: af.n, source: 'annotators', rule: o.floorRule, raw: af.raw, audited: af.audited };
  }
  const share = devTotal > 0 ? (stats.splits.dev?.weight ?? 0) / devTotal : 0;
  const train = props.train;
  let bias: Gap | null = null;
  if (train) {
    if (floor.n === null) {
      const ci = wilsonInterval(train.p * train.n, train.n, c)!;
      bias = { value: train.p - floor.value, lo: ci.lo - floor.value, hi: ci.hi - floor.value, p: proportionTest(train.p * train.n, train.n, floor.value), q: null };
    } else {
      bias = diff(train, { p: floor.value, n: floor.n }, c);
    }
  }
  // a slice without train_dev rows is decomposed as data without train_dev: variance = dev − train, no mismatch
  const hasTrainDev = present.has('train_dev') && props.train_dev !== null;
  const variance = hasTrainDev ? diff(props.train_dev, train, c) : diff(props.dev, train, c);
  const mismatch = hasTrainDev ? diff(props.dev, props.train_dev, c) : null;
  const devOverfit = present.has('test') ? diff(props.test, props.dev, c) : null;
  let headroom: Headroom | null = null;
  if (bias && variance && props.dev && (!hasTrainDev || mismatch)) {
    const hb = share * bias.value;
    const hv = share * variance.value;
    const hm = mismatch ? share * mismatch.value : null;
    headroom = { total: hb + hv + (hm ?? 0), bias: hb, variance: hv, mismatch: hm };
  }
  // a slice whose train or dev rows all weigh 0 has no rate there: as thin as one without rows
  const thin = (rows.train ?? 0) < o.minRows || (rows.dev ?? 0) < o.minRows || !props.train || !props.dev;
  const trainSums = stats.splits.train;
  // mean cost of a row: cost-table rows at their cost, the rest at --label-cost
  const cost = trainSums && trainSums.weight > 0 ? (trainSums.costSum + (trainSums.weight - trainSums.costWeight) * o.labelCost) / trainSums.weight : o.labelCost;
  const curve = extras?.curve ?? { beta: o.curveExponent, lo: null, hi: null, runs: 0, source: 'default' as const };
  return {
    cost,
    curve,
    agreement: agreementOf(stats.audit),
    stats,
    label: sliceLabel(stats.key),
    rows,
    share,
    floor,
    error,
    gaps: { avoidable_bias: bias, variance, mismatch, dev_overfit: devOverfit },
    headroom,
    thin,
  };
}

/** A gap counts when its q ≤ fdr and its interval excludes 0 on the side of its value. */
export function significant(g: Gap | null, fdr: number): boolean {
  if (!g || g.q === null || g.lo === null || g.hi === null) return false;
  if (g.q > fdr) return false;
  return g.value > 0 ? g.lo > 0 : g.value < 0 ? g.hi < 0 : false;
}

/**
 * The focus: the first rule that applies — thin; below-floor; the significant positive part with the
 * largest headroom (bias, variance, mismatch); at-floor; unclear.
 */
function chooseFocus(d: Pick<Draft, 'thin' | 'gaps' | 'headroom' | 'floor' | 'error'>, o: TriageOptions): Focus {
  if (d.thin) return 'thin';
  const bias = d.gaps.avoidable_bias;
  if (bias && bias.hi !== null && bias.hi < 0) return 'below-floor';
  const candidates: { focus: Focus; part: number }[] = [];
  const h = d.headroom;
  if (h) {
    if (significant(bias, o.fdr) && bias!.value > 0) candidates.push({ focus: 'bias', part: h.bias });
    if (significant(d.gaps.variance, o.fdr) && d.gaps.variance!.value > 0) candidates.push({ focus: 'variance', part: h.variance });
    if (significant(d.gaps.mismatch, o.fdr) && d.gaps.mismatch!.value > 0 && h.mismatch !== null) candidates.push({ focus: 'mismatch', part: h.mismatch });
  }
  if (candidates.length > 0) return candidates.reduce((a, b) => (b.part > a.part ? b : a)).focus;
  const dev = d.error.dev;
  if (dev && dev.value - d.floor.value <= o.floorMargin) return 'at-floor';
  return 'unclear';
}

/**
 * Yield: points of overall dev error recovered per 1,000 more labelled rows in the slice, per unit of
 * labelling cost, if its generalisation gap shrinks as n^−β (common practice):
 * share × (variance + mismatch)₊ × (1 − (n/(n+1000))^β) / cost, with n the slice's effective train rows.
 */
export function sliceYield(share: number, variance: number, mismatch: number | null, nTrain: number, beta: number, cost: number): number {
  const gap = Math.max(0, variance + (mismatch ?? 0));
  // a curve that does not fall (β ≤ 0) recovers nothing
  const shrink = Math.max(0, 1 - Math.pow(nTrain / (nTrain + 1000), beta));
  return (share * gap * shrink) / cost;
}

/**
 * New labelled rows that halve the slice's generalisation gap under g ∝ n^−β:
 * (n/(n+Δ))^β = 1/2 ⇒ Δ = n (2^(1/β) − 1); null when β ≤ 0, and when the curve is so flat
 * (β below about 1/1024) that Δ is beyond the largest double.
 * @example
 * labelsToHalve(4000, 0.5); // => 12000
 */
export function labelsToHalve(nTrain: number, beta: number): number | null {
  if (!(beta > 0) || !(nTrain > 0)) return null;
  const rows = nTrain * (Math.pow(2, 1 / beta) - 1);
  return Number.isFinite(rows) ? rows : null;
}

function withQ(g: Gap | null, q: number | null): Gap | null {
  return g ? { ...g, q } : null;
}

/**
 * triage: slice statistics + options → the ranked slice reports. `overall` is its own family for the
 * FDR step; the slices form one family of their bias, variance and mismatch tests (thin slices are left
 * out, their q is null); dev-overfit tests form a family of their own.
 */
export function triage(
  slices: readonly SliceStats[],
  overall: SliceStats,
  options: TriageOptions,
  extras: (s: SliceStats) => SliceExtras | null = () => null,
): { overall: SliceReport; slices: SliceReport[] } {
  const present = new Set(SPLITS.filter((s) => (overall.splits[s]?.rows ?? 0) > 0));
  const hasRuns = options.run !== null;
  const devTotal = overall.splits.dev?.weight ?? 0;
  const adjust = options.fdrMethod === 'by' ? benjaminiYekutieli : benjaminiHochberg;
  const finish = (drafts: Draft[], isOverall: boolean): SliceReport[] => {
    const family: (number | null)[] = [];
    const overfit: (number | null)[] = [];
    for (const d of drafts) {
      const inFamily = isOverall || !d.thin;
      for (const g of [d.gaps.avoidable_bias, d.gaps.variance, d.gaps.mismatch]) family.push(inFamily && g ? g.p : null);
      overfit.push(inFamily && d.gaps.dev_overfit ? d.gaps.dev_overfit.p : null);
    }
    const q = adjust(family);
    const qo = adjust(overfit);
    const reports = drafts.map((d, i) => {
      const gaps = {
        avoidable_bias: withQ(d.gaps.avoidable_bias, q[3 * i]),
        variance: withQ(d.gaps.variance, q[3 * i + 1]),
        mismatch: withQ(d.gaps.mismatch, q[3 * i + 2]),
        dev_overfit: withQ(d.gaps.dev_overfit, qo[i]),
      };
      const focus = chooseFocus({ ...d, thin: isOverall ? false : d.thin, gaps }, options);
      let yieldValue: number | null = null;
      if ((focus === 'variance' || focus === 'mismatch') && gaps.variance && d.error.train) {
        yieldValue = sliceYield(d.share, gaps.variance.value, gaps.mismatch?.value ?? null, d.error.train.n, d.curve.beta, d.cost);
      }
      const generalisation = gaps.variance ? gaps.variance.value + (gaps.mismatch?.value ?? 0) : 0;
      const toHalve = generalisation > 0 && d.error.train ? labelsToHalve(d.error.train.n, d.curve.beta) : null;
      const part = d.headroom ? (focus === 'bias' ? d.headroom.bias : focus === 'variance' ? d.headroom.variance : focus === 'mismatch' ? d.headroom.mismatch ?? 0 : 0) : 0;
      // worth acting on: the lever's own part and the slice's whole gain both reach min-headroom
      // (a slice whose dev error already sits at its floor has nothing to give back)
      const flagged =
        (focus === 'bias' || focus === 'variance' || focus === 'mismatch') &&
        part >= options.minHeadroom &&
        (d.headroom?.total ?? 0) >= options.minHeadroom;
      const report: SliceReport = {
        key: d.stats.key,
        label: d.label,
        rows: d.rows,
        share: d.share,
        floor: d.floor,
        error: d.error,
        gaps,
        headroom: d.headroom,
        yield: yieldValue,
        cost: d.cost,
        labels_to_halve: toHalve,
        curve: d.curve,
        agreement: d.agreement,
        focus,
        flagged,
        rank: 0,
        hints: hintsFor(d, overallFloor, overallKappa, hasRuns),
      };
      return report;
    });
    return reports;
  };
  const overallDraft = draft(overall, devTotal, present, options, extras(overall));
  let overallFloor: number | null = null;
  let overallKappa: number | null = null;
  const [overallReport] = finish([overallDraft], true);
  overallFloor = overallDraft.floor.value;
  overallKappa = overallDraft.agreement?.kappa ?? null;
  const reports = finish(slices.map((s) => draft(s, devTotal, present, options, extras(s))), false);
  reports.sort(compareSlices);
  return { overall: { ...overallReport, rank: 0 }, slices: reports.map((r, i) => ({ ...r, rank: i + 1 })) };
}

/** The report's order: flagged first, then by yield (missing last), then headroom, then label. */
function compareSlices(a: SliceReport, b: SliceReport): number {
  if (a.flagged !== b.flagged) return a.flagged ? -1 : 1;
  const ya = a.yield;
  const yb = b.yield;
  if (ya !== null || yb !== null) {
    if (ya === null) return 1;
    if (yb === null) return -1;
    if (yb !== ya) return yb - ya;
  }
  const ha = a.headroom?.total ?? -Infinity;
  const hb = b.headroom?.total ?? -Infinity;
  if (hb !== ha) return hb - ha;
  return a.label < b.label ? -1 : a.label > b.label ? 1 : 0;
}

/** Agreement this far below the data's overall kappa counts as low in a slice (a heuristic of ours). */
const KAPPA_DROP = 0.05;

/**
 * Notes for the reader: labels that are likely noisy (kappa below 0.6, or 0.05 below the overall kappa,
 * with a floor above the overall floor), and a learning curve that could not be fitted from the runs.
 */
function hintsFor(d: Draft, overallFloor: number | null, overallKappa: number | null, hasRuns: boolean): string[] {
  const hints: string[] = [];
  const k = d.agreement?.kappa;
  const lowAgreement = k !== null && k !== undefined && (k < LOW_AGREEMENT || (overallKappa !== null && k < overallKappa - KAPPA_DROP));
  if (lowAgreement && overallFloor !== null && d.floor.value > overallFloor) {
    hints.push(
      `annotators agree little here (${d.agreement!.method} kappa ${k.toFixed(2)}) and the floor is high: the labels are likely noisy; relabelling with adjudication may lower the floor itself`,
    );
  }
  if (hasRuns && d.curve.source === 'default') {
    hints.push(`learning curve: fewer than 3 runs of different size with a positive dev − train gap; yield uses the default exponent ${d.curve.beta}`);
  }
  return hints;
}
