import { normalCdf } from './normal.js';
import { assertFinite, checkCount } from './validate-input.js';

/**
 * Pooled two-proportion z test, two-sided, of H₀: p₁ = p₂ for independent samples (Fleiss,
 * Levin & Paik 2003, Statistical Methods for Rates and Proportions 3rd ed., Wiley, ch. 2; the
 * square root of Pearson's χ² for the 2×2 table without continuity correction): with pooled
 * p̄ = (x₁ + x₂)/(n₁ + n₂),
 *
 *   z = (p̂₁ − p̂₂) / √(p̄(1 − p̄)(1/n₁ + 1/n₂)),   p = 2·Φ(−|z|).
 *
 * Equals statsmodels `proportions_ztest([x1, x2], [n1, n2])` and R
 * `prop.test(c(x1, x2), c(n1, n2), correct = FALSE)$p.value`. Counts may be non-integer
 * (weighted data: x = p̂·n_eff, n = n_eff).
 * @param x1 successes in sample 1, 0 ≤ x1 ≤ n1
 * @param n1 trials in sample 1
 * @param x2 successes in sample 2, 0 ≤ x2 ≤ n2
 * @param n2 trials in sample 2
 * @returns the two-sided p-value in [0, 1]; 1 when n1 ≤ 0 or n2 ≤ 0 (no data), or when the
 *   pooled proportion is 0 or 1 (both samples all failures or all successes: no evidence of a difference)
 * @throws RangeError when an argument is NaN/infinite or a count is outside [0, n]
 * @example
 * twoProportionTest(5, 83, 12, 99); // => 0.15918129181156995
 * twoProportionTest(0, 10, 0, 20); // => 1
 */
export function twoProportionTest(x1: number, n1: number, x2: number, n2: number): number {
  const fn = 'twoProportionTest';
  assertFinite(fn, 'x1', x1);
  assertFinite(fn, 'n1', n1);
  assertFinite(fn, 'x2', x2);
  assertFinite(fn, 'n2', n2);
  if (n1 <= 0 || n2 <= 0) return 1;
  const c1 = checkCount(fn, 'x1', x1, n1);
  const c2 = checkCount(fn, 'x2', x2, n2);
  const pooled = (c1 + c2) / (n1 + n2);
  if (pooled <= 0 || pooled >= 1) return 1;
  const se = Math.sqrt(pooled * (1 - pooled) * (1 / n1 + 1 / n2));
  const z = (c1 / n1 - c2 / n2) / se;
  return Math.min(1, 2 * normalCdf(-Math.abs(z)));
}
