import { createRequire } from 'node:module';
import { sum, weightedMean } from 'simple-statistics';
import { assertFinite } from './validate-input.js';

type TQuantile = typeof import('@stdlib/stats-base-dists-t-quantile');
let tQuantileFn: TQuantile | null = null;
/** @stdlib's t quantile, loaded on first use (it takes a noticeable time to load, and only runs need it). */
function tQuantile(p: number, df: number): number {
  tQuantileFn ??= createRequire(import.meta.url)('@stdlib/stats-base-dists-t-quantile') as TQuantile;
  return tQuantileFn(p, df);
}

/**
 * A fitted power-law learning curve g(n) = a·n^(−β).
 */
export interface PowerLawFit {
  /** Scale a > 0: the fitted gap at n = 1. */
  readonly a: number;
  /** Decay exponent β (positive when the gap shrinks as n grows). */
  readonly beta: number;
  /** Lower end of the confidence interval for β; `null` with only two points (no residual degrees of freedom). */
  readonly lo: number | null;
  /** Upper end of the confidence interval for β; `null` with only two points. */
  readonly hi: number | null;
  /** Number of points used in the fit (after dropping g ≤ 0, n ≤ 0 and weight-0 points). */
  readonly points: number;
}

/**
 * Power-law learning curve g(n) = a·n^(−β) (Hestness et al. 2017, "Deep Learning Scaling is
 * Predictable, Empirically", arXiv:1712.00409: generalization error falls as a power of the
 * training-set size), fitted by weighted least squares of log g on log n,
 *
 *   log g = log a − β·log n,   minimising Σ w·(log g − log a + β·log n)².
 *
 * Weights default to 1 and are meant as inverse variances of log g (see `logGapWeight`); only
 * their ratios matter. The interval for β is β ± t_{1−α/2, k−2}·se(β), with
 * se(β)² = s²/Σ w(log n − x̄_w)² and s² = Σ w·r²/(k − 2) the weighted residual variance: the
 * same estimate and interval as statsmodels `WLS(log g, [1, log n], weights=w).fit().conf_int()`
 * and, unweighted, the same line as numpy `polyfit(log n, log g, 1)`. Sums are taken about the
 * weighted means, so the fit keeps full precision for large n; the weighted means and the sums are
 * simple-statistics' `weightedMean` and `sum`, which add their terms with compensation (Kahan–Babuška
 * summation in Neumaier's form, Neumaier 1974, ZAMM 54:39). The t quantile comes from
 * `@stdlib/stats-base-dists-t-quantile`, which matches a 40-digit mpmath inversion to 5e-16
 * relative; scipy 1.10's `t.ppf`, used by statsmodels, is off by up to 5e-9 relative at common
 * levels (e.g. p = 0.05, ν = 30), so interval ends agree with statsmodels to about 1e-9.
 * @param points the observations; points with g ≤ 0, n ≤ 0 or weight 0 are dropped (no log, no information)
 * @param confidence two-sided confidence level for the β interval, in (0, 1); default 0.95
 * @returns the fit, or `null` when fewer than two distinct n remain
 * @throws RangeError when n, g or weight is NaN/infinite, a weight is negative, or confidence is not in (0, 1)
 * @example
 * fitPowerLaw([1000, 2000, 4000, 8000, 16000].map((n) => ({ n, g: 0.5 * n ** -0.5 })));
 * // => { a: 0.5, beta: 0.5, lo: 0.5, hi: 0.5, points: 5 } (to 1e-12)
 * fitPowerLaw([{ n: 100, g: 0.1 }, { n: 400, g: 0.05 }]); // => { a: 1, beta: 0.5, lo: null, hi: null, points: 2 } (to 1e-12)
 * fitPowerLaw([{ n: 100, g: 0.1 }, { n: 100, g: 0.2 }]); // => null (one distinct n)
 */
export function fitPowerLaw(
  points: readonly { n: number; g: number; weight?: number }[],
  confidence = 0.95,
): PowerLawFit | null {
  const fn = 'fitPowerLaw';
  assertFinite(fn, 'confidence', confidence);
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`${fn}: confidence must be strictly between 0 and 1 (e.g. 0.95), got ${confidence}`);
  }
  const xs: number[] = [];
  const ys: number[] = [];
  const ws: number[] = [];
  points.forEach((point, i) => {
    assertFinite(fn, `points[${i}].n`, point.n);
    assertFinite(fn, `points[${i}].g`, point.g);
    const w = point.weight ?? 1;
    assertFinite(fn, `points[${i}].weight`, w);
    if (w < 0) throw new RangeError(`${fn}: points[${i}].weight must be >= 0, got ${w}`);
    if (point.n <= 0 || point.g <= 0 || w === 0) return;
    xs.push(Math.log(point.n));
    ys.push(Math.log(point.g));
    ws.push(w);
  });
  const k = xs.length;
  if (k < 2 || xs.every((x) => x === xs[0])) return null;

  const xBar = weightedMean(xs, ws);
  const yBar = weightedMean(ys, ws);
  const sxx = sum(xs.map((x, i) => ws[i] * (x - xBar) * (x - xBar)));
  const sxy = sum(xs.map((x, i) => ws[i] * (x - xBar) * (ys[i] - yBar)));
  const slope = sxy / sxx;
  const intercept = yBar - slope * xBar;
  const a = Math.exp(intercept);
  const beta = -slope;
  const df = k - 2;
  if (df < 1) return { a, beta, lo: null, hi: null, points: k };

  const ssr = sum(ys.map((y, i) => ws[i] * (y - intercept - slope * xs[i]) ** 2));
  const se = Math.sqrt(ssr / df / sxx);
  const t = -tQuantile((1 - confidence) / 2, df);
  return { a, beta, lo: beta - t * se, hi: beta + t * se, points: k };
}

/**
 * Weight for `fitPowerLaw` from a gap estimate and its variance, by the delta method
 * (first-order Taylor expansion, e.g. Casella & Berger 2002, Statistical Inference 2nd ed.,
 * §5.5.4): Var(log g) ≈ Var(g)/g², so the inverse variance of log g is g²/Var(g).
 * @param gap the gap estimate g
 * @param variance its variance Var(g)
 * @returns g²/Var(g); 0 when gap ≤ 0 (no logarithm) or variance ≤ 0 (no variance estimate)
 * @throws RangeError when an argument is NaN or infinite
 * @example
 * logGapWeight(0.02, 0.0001); // => 4 (to 1e-15; se(log g) ≈ 0.01/0.02 = 0.5)
 * logGapWeight(0, 0.0001); // => 0
 */
export function logGapWeight(gap: number, variance: number): number {
  assertFinite('logGapWeight', 'gap', gap);
  assertFinite('logGapWeight', 'variance', variance);
  if (gap <= 0 || variance <= 0) return 0;
  return (gap * gap) / variance;
}
