import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import binomialPmf from '@stdlib/stats-base-dists-binomial-pmf';
import { assertFinite, assertProbability } from './validate-input.js';

/** Relative tolerance for "as or less likely than the observed outcome", as in R's binom.test. */
const RELATIVE_ERROR = 1 + 1e-7;

/**
 * Exact two-sided binomial test of H₀: p = p0, with the two-sided p-value defined by the
 * likelihood ("minlike", "method of small p-values") convention — named and discussed in Fay
 * 2010, R Journal 2(1):53, "Two-sided exact tests and matching confidence intervals for discrete
 * data" — as implemented by R `binom.test` and `scipy.stats.binomtest(k, n, p).pvalue`: the total
 * probability, under Binomial(n, p0), of all outcomes k with P(X = k) ≤ P(X = x)·(1 + 1e-7).
 *
 * Since the pmf is non-increasing on [⌈n·p0⌉, n] and non-decreasing on [0, ⌊n·p0⌋], the
 * opposite tail is located by binary search (O(log n) pmf evaluations, as scipy does), and
 * upper tails are computed as lower tails of Binomial(n, 1 − p0), never as 1 − cdf, so small
 * p-values keep full relative accuracy. p0 = 0 and p0 = 1 are degenerate: the p-value is 1 when
 * x is the only possible outcome and 0 otherwise (as in R).
 * @param x observed number of successes, an integer in [0, n]
 * @param n number of trials, a non-negative integer (n = 0 gives 1)
 * @param p0 hypothesised success probability in [0, 1]
 * @returns the two-sided p-value in [0, 1]
 * @throws RangeError when an argument is NaN/infinite, x or n is not an integer, x is outside [0, n], or p0 is outside [0, 1]
 * @example
 * binomialTestTwoSided(682, 925, 0.75); // => 0.3824915595748538
 * binomialTestTwoSided(3, 10, 0.5); // => 0.34375
 */
export function binomialTestTwoSided(x: number, n: number, p0: number): number {
  const fn = 'binomialTestTwoSided';
  assertFinite(fn, 'x', x);
  assertFinite(fn, 'n', n);
  assertProbability(fn, 'p0', p0);
  if (!Number.isInteger(n) || n < 0) {
    throw new RangeError(`${fn}: n must be a non-negative integer, got ${n}`);
  }
  if (!Number.isInteger(x) || x < 0 || x > n) {
    throw new RangeError(`${fn}: x must be an integer in [0, n] = [0, ${n}], got ${x}`);
  }
  if (p0 === 0) return x === 0 ? 1 : 0;
  if (p0 === 1) return x === n ? 1 : 0;
  const m = n * p0;
  if (x === m) return 1;
  const threshold = binomialPmf(x, n, p0) * RELATIVE_ERROR;
  let pValue: number;
  if (x < m) {
    // Opposite (upper) tail: the smallest k in [ceil(m), n] with pmf(k) <= threshold.
    const k = firstAtOrBelow(Math.ceil(m), n, (i) => binomialPmf(i, n, p0) <= threshold);
    pValue = binomialCdf(x, n, p0) + upperTail(k, n, p0);
  } else {
    // Opposite (lower) tail: the largest k in [0, floor(m)] with pmf(k) <= threshold.
    const k = lastAtOrBelow(0, Math.floor(m), (i) => binomialPmf(i, n, p0) <= threshold);
    pValue = (k >= 0 ? binomialCdf(k, n, p0) : 0) + upperTail(x, n, p0);
  }
  return Math.min(1, Math.max(0, pValue));
}

/** P(X ≥ k) for X ~ Binomial(n, p), as P(Y ≤ n − k) for Y ~ Binomial(n, 1 − p); 0 when k > n. */
function upperTail(k: number, n: number, p: number): number {
  if (k > n) return 0;
  if (k <= 0) return 1;
  return binomialCdf(n - k, n, 1 - p);
}

/** Smallest i in [lo, hi] with pred(i) true, for pred false…false true…true; hi + 1 if none. */
function firstAtOrBelow(lo: number, hi: number, pred: (i: number) => boolean): number {
  let a = lo;
  let b = hi + 1;
  while (a < b) {
    const mid = Math.floor((a + b) / 2);
    if (pred(mid)) b = mid;
    else a = mid + 1;
  }
  return a;
}

/** Largest i in [lo, hi] with pred(i) true, for pred true…true false…false; lo − 1 if none. */
function lastAtOrBelow(lo: number, hi: number, pred: (i: number) => boolean): number {
  let a = lo - 1;
  let b = hi;
  while (a < b) {
    const mid = Math.ceil((a + b) / 2);
    if (pred(mid)) a = mid;
    else b = mid - 1;
  }
  return a;
}
