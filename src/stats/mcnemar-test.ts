import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import { binomialTestTwoSided } from './binomial-test.js';
import { normalCdf } from './normal.js';
import { assertFinite, assertNotNaN } from './validate-input.js';

/** Default for `exactBelow`: the exact test is used while b + c < 25. */
const DEFAULT_EXACT_BELOW = 25;

/** The result of `mcnemarTest`. */
export interface McNemarResult {
  /** (b − c)² / (b + c) in the chi-square branch; `null` in the exact branch (no test statistic). */
  readonly statistic: number | null;
  /** The two-sided p-value in [0, 1]. */
  readonly p: number;
  /** Which branch produced `p`. */
  readonly method: 'exact' | 'chi-square';
}

/**
 * McNemar's test of H₀: the chance of being right is the same before and now, for paired binary
 * outcomes (McNemar 1947, "Note on the sampling error of the difference between correlated
 * proportions or percentages", Psychometrika 12:153; see also Agresti 2002, Categorical Data
 * Analysis 2nd ed., §10.1). Only the discordant pairs carry information: b = pairs right before
 * and wrong now, c = pairs wrong before and right now. Under H₀, given b + c, b ~ Binomial(b + c, ½).
 *
 * - Exact branch (b + c < exactBelow, default 25): the exact two-sided binomial test
 *   `binomialTestTwoSided(b, b + c, 0.5)`. For p0 = ½ the distribution is symmetric, so this is
 *   2·P(X ≤ min(b, c)) capped at 1 — statsmodels `mcnemar(table, exact=True)` and R
 *   `binom.test(b, b + c)`. `statistic` is `null`.
 * - Chi-square branch (b + c ≥ exactBelow): χ² = (b − c)² / (b + c) with 1 degree of freedom and
 *   no continuity correction — statsmodels `mcnemar(table, exact=False, correction=False)` and R
 *   `mcnemar.test(table, correct = FALSE)`. The upper tail is 1 − `@stdlib` chi-square CDF while
 *   that CDF is ≤ ½ (the subtraction then loses at most one bit); beyond that it is 2·Φ(−√χ²),
 *   exact for 1 degree of freedom (χ²₁ is the square of a standard normal Z, so P(χ²₁ > x) =
 *   P(|Z| > √x)) and accurate down to the smallest doubles, where 1 − CDF would round to 0.
 *
 * b + c = 0 (no discordant pairs, no evidence) gives p = 1: exact branch with `statistic` null by
 * default, or `statistic` 0 when exactBelow = 0 forces the chi-square branch.
 * @param b number of pairs right before and wrong now, a non-negative integer
 * @param c number of pairs wrong before and right now, a non-negative integer
 * @param options exactBelow: use the exact test while b + c < exactBelow, a number ≥ 0
 *   (default 25; 0 always uses the chi-square statistic, Infinity always the exact test)
 * @returns the test statistic (or `null`), the two-sided p-value and the branch used
 * @throws RangeError when b or c is NaN, infinite, negative or not an integer, or exactBelow is NaN or negative
 * @example
 * mcnemarTest(150, 86); // => { statistic: 17.35593220338983, p: 3.0992934410452284e-5, method: 'chi-square' }
 * mcnemarTest(10, 3); // => { statistic: null, p: 0.09228515625, method: 'exact' }
 * mcnemarTest(0, 0); // => { statistic: null, p: 1, method: 'exact' }
 */
export function mcnemarTest(b: number, c: number, options?: { exactBelow?: number }): McNemarResult {
  const fn = 'mcnemarTest';
  checkPairCount(fn, 'b', b);
  checkPairCount(fn, 'c', c);
  const exactBelow = options?.exactBelow ?? DEFAULT_EXACT_BELOW;
  assertNotNaN(fn, 'exactBelow', exactBelow);
  if (exactBelow < 0) throw new RangeError(`${fn}: exactBelow must be >= 0, got ${exactBelow}`);
  const n = b + c;
  if (n < exactBelow) {
    return { statistic: null, p: binomialTestTwoSided(b, n, 0.5), method: 'exact' };
  }
  if (n === 0) return { statistic: 0, p: 1, method: 'chi-square' };
  const statistic = ((b - c) * (b - c)) / n;
  return { statistic, p: chiSquareOneDfUpperTail(statistic), method: 'chi-square' };
}

/** Throws unless `value` is a count of pairs: a finite, non-negative integer. */
function checkPairCount(fn: string, name: string, value: number): void {
  assertFinite(fn, name, value);
  if (!Number.isInteger(value) || value < 0) {
    throw new RangeError(`${fn}: ${name} must be a non-negative integer (a count of pairs), got ${value}`);
  }
}

/** P(χ²₁ > x) for x ≥ 0: 1 − CDF while the CDF is ≤ ½, else 2·Φ(−√x) (see `mcnemarTest`). */
function chiSquareOneDfUpperTail(x: number): number {
  const lower = chisquareCdf(x, 1);
  if (lower <= 0.5) return 1 - lower;
  return Math.min(1, 2 * normalCdf(-Math.sqrt(x)));
}
