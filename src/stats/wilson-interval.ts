import type { Interval } from './interval.js';
import { zForConfidence } from './normal.js';
import { assertFinite, checkCount } from './validate-input.js';

/**
 * Wilson score confidence interval for a binomial proportion, without continuity correction
 * (Wilson 1927, J. Am. Stat. Assoc. 22:209; method 3 of Newcombe 1998, Stat. Med. 17:857).
 * With p̂ = x/n and z = zForConfidence(confidence):
 *
 *   centre = (p̂ + z²/(2n)) / (1 + z²/n),
 *   half-width = z·√(p̂(1 − p̂)/n + z²/(4n²)) / (1 + z²/n).
 *
 * The same interval as R `prop.test(x, n, correct = FALSE)$conf.int` and statsmodels
 * `proportion_confint(x, n, method='wilson')`.
 *
 * Weighted data: `x` may be non-integer; pass x = p̂·n_eff and n = n_eff (e.g. Kish's effective
 * n) — the formula depends on x only through p̂ = x/n. Edges are exact: x = 0 gives lo = 0 and
 * x = n gives hi = 1; both ends are clamped to [0, 1] and to either side of p̂ against rounding. The
 * lower end is computed as p̂² / ((1 + z²/n) · hi), the same value as centre − half-width (their
 * product is p̂² / (1 + z²/n)) without its cancellation for tiny p̂.
 * @param x number of successes (may be non-integer), 0 ≤ x ≤ n
 * @param n number of trials (may be non-integer); n ≤ 0 means no data
 * @param confidence two-sided confidence level in (0, 1); default 0.95
 * @returns the interval, or `null` when n ≤ 0
 * @throws RangeError when an argument is NaN/infinite, x is outside [0, n], or confidence is not in (0, 1)
 * @example
 * wilsonInterval(81, 263); // => { lo: 0.2553, hi: 0.3662 } (to 1e-4)
 * wilsonInterval(0, 20); // => { lo: 0, hi: 0.1611 } (to 1e-4)
 * wilsonInterval(0, 0); // => null
 */
export function wilsonInterval(x: number, n: number, confidence = 0.95): Interval | null {
  assertFinite('wilsonInterval', 'n', n);
  assertFinite('wilsonInterval', 'x', x);
  const z = zForConfidence(confidence);
  if (n <= 0) return null;
  return wilsonLimits(checkCount('wilsonInterval', 'x', x, n), n, z);
}

/**
 * The Wilson limits for a critical value z instead of a confidence level (the formula of
 * {@link wilsonInterval}, which calls it): for inverting an interval into a p-value, where z varies.
 * Inputs are not checked: 0 ≤ x ≤ n, n > 0, z ≥ 0.
 * @param x successes (may be non-integer)
 * @param n trials, n > 0
 * @param z the critical value (1.959963984540054 for 95 %)
 * @returns the interval
 * @example
 * wilsonLimits(81, 263, 1.959963984540054); // => { lo: 0.2553, hi: 0.3662 } (to 1e-4)
 */
export function wilsonLimits(x: number, n: number, z: number): Interval {
  const p = x / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n))) / denom;
  const hi = x === n ? 1 : Math.min(1, Math.max(p, centre + half));
  // lo · hi = p̂² / (1 + z²/n) exactly; dividing avoids centre − half, which loses every digit when p̂
  // is far below z²/n (a weighted error of 1e-18)
  const lo = x === 0 ? 0 : Math.max(0, Math.min(p, (p * p) / (denom * hi)));
  return { lo, hi };
}
