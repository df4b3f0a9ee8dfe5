import { binomialTestTwoSided } from './binomial-test.js';
import { normalCdf } from './normal.js';
import { assertFinite, assertProbability, checkCount } from './validate-input.js';

/**
 * Two-sided test of one proportion against a fixed value, H₀: p = p0.
 *
 * - Score branch (default): the one-sample score z test (Wilson 1927, J. Am. Stat. Assoc.
 *   22:209 — the test the Wilson interval inverts; see also Agresti 2013, Categorical Data
 *   Analysis 3rd ed., ch. 1), z = (p̂ − p0) / √(p0(1 − p0)/n), p = 2·Φ(−|z|). Equals R
 *   `prop.test(x, n, p0, correct = FALSE)$p.value` and statsmodels
 *   `proportions_ztest(x, n, value=p0, prop_var=p0)`.
 * - Exact branch: when p0 = 0, p0 = 1, n·p0 < 5 or n·(1 − p0) < 5 (the common rule of thumb for
 *   when the normal approximation is adequate) the exact two-sided binomial test
 *   `binomialTestTwoSided` is used instead. It needs integer counts, so for weighted data
 *   (x = p̂·n_eff, n = n_eff non-integer) both x and n are rounded to the nearest integer
 *   (`Math.round`, halves up) before testing; rounding x and n separately keeps 0 ≤ x ≤ n.
 *   For example x = 0.4, n = 7.6, p0 = 0 is tested as 0 of 8 and gives 1.
 *
 * The score branch accepts non-integer x and n unchanged (it depends on x only through p̂ = x/n).
 * @param x number of successes (may be non-integer), 0 ≤ x ≤ n
 * @param n number of trials (may be non-integer); n ≤ 0 (no data) gives 1
 * @param p0 hypothesised proportion in [0, 1]
 * @returns the two-sided p-value in [0, 1]
 * @throws RangeError when an argument is NaN/infinite, x is outside [0, n], or p0 is outside [0, 1]
 * @example
 * proportionTest(30, 100, 0.2); // => 0.012419330651552287 (score branch)
 * proportionTest(3, 10, 0.1); // => 0.07019082639999996 (exact branch)
 * proportionTest(1, 50, 0); // => 0 (exact branch: a success is impossible under p0 = 0)
 */
export function proportionTest(x: number, n: number, p0: number): number {
  const fn = 'proportionTest';
  assertFinite(fn, 'x', x);
  assertFinite(fn, 'n', n);
  assertProbability(fn, 'p0', p0);
  if (n <= 0) return 1;
  const xc = checkCount(fn, 'x', x, n);
  if (p0 === 0 || p0 === 1 || n * p0 < 5 || n * (1 - p0) < 5) {
    const ni = Math.round(n);
    const xi = Math.min(Math.round(xc), ni);
    return binomialTestTwoSided(xi, ni, p0);
  }
  const z = (xc / n - p0) / Math.sqrt((p0 * (1 - p0)) / n);
  return Math.min(1, 2 * normalCdf(-Math.abs(z)));
}
