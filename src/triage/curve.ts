import type { SliceStats } from '../slices/rollup.js';
import { fitPowerLaw, kishEffectiveN, logGapWeight } from '../stats/index.js';
import type { Curve } from './types.js';

/** Fewest distinct training sizes for a fitted exponent. */
const MIN_CURVE_SIZES = 3;

/**
 * The slice's learning-curve exponent: fit g(n) = a · n^(−β) to its generalisation gap (dev − train)
 * against its effective training rows in each run, by least squares on logs weighted by the inverse
 * variance of each point. Fewer than three distinct sizes (or no positive gaps) fall back to the default.
 */
export function sliceCurve(perRun: readonly SliceStats[], defaultBeta: number, confidence: number): Curve {
  const points: { n: number; g: number; weight: number }[] = [];
  for (const s of perRun) {
    const t = s.splits.train;
    const d = s.splits.dev;
    if (!t || !d || t.weight <= 0 || d.weight <= 0) continue;
    const nt = kishEffectiveN(t.weight, t.weightSq);
    const nd = kishEffectiveN(d.weight, d.weightSq);
    const pt = t.errors / t.weight;
    const pd = d.errors / d.weight;
    const g = pd - pt;
    if (g <= 0) continue;
    const variance = (pd * (1 - pd)) / nd + (pt * (1 - pt)) / nt;
    points.push({ n: nt, g, weight: logGapWeight(g, variance) });
  }
  const sizes = new Set(points.map((p) => Math.round(p.n)));
  const fallback: Curve = { beta: defaultBeta, lo: null, hi: null, runs: points.length, source: 'default' };
  if (sizes.size < MIN_CURVE_SIZES) return fallback;
  const fit = fitPowerLaw(points.filter((p) => p.weight > 0), confidence);
  if (!fit) return fallback;
  return { beta: fit.beta, lo: fit.lo, hi: fit.hi, runs: fit.points, source: 'fit' };
}
