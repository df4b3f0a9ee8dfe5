import type { Interval } from './interval.js';
import { zForConfidence } from './normal.js';
import { wilsonInterval } from './wilson-interval.js';
import { assertFinite, checkCount } from './validate-input.js';

/**
 * Newcombe's hybrid score interval for the difference of two independent proportions
 * p₁ − p₂ (Newcombe 1998, Stat. Med. 17:873, method 10: "score interval for each proportion,
 * combined", without continuity correction). With (l₁, u₁) and (l₂, u₂) the Wilson score
 * intervals for p̂₁ = x₁/n₁ and p̂₂ = x₂/n₂ and d = p̂₁ − p̂₂:
 *
 *   lo = d − √((p̂₁ − l₁)² + (u₂ − p̂₂)²),   hi = d + √((u₁ − p̂₁)² + (p̂₂ − l₂)²).
 *
 * The same interval as statsmodels `confint_proportions_2indep(x1, n1, x2, n2,
 * method='newcomb', compare='diff')`. Counts may be non-integer (weighted data, see
 * `wilsonInterval`). Both ends are clamped to [−1, 1] against rounding.
 * @param x1 successes in sample 1, 0 ≤ x1 ≤ n1
 * @param n1 trials in sample 1
 * @param x2 successes in sample 2, 0 ≤ x2 ≤ n2
 * @param n2 trials in sample 2
 * @param confidence two-sided confidence level in (0, 1); default 0.95
 * @returns the interval for p₁ − p₂, or `null` when n1 ≤ 0 or n2 ≤ 0
 * @throws RangeError when an argument is NaN/infinite, a count is outside [0, n], or confidence is not in (0, 1)
 * @example
 * newcombeInterval(56, 70, 48, 80); // => { lo: 0.0524, hi: 0.3339 } (to 1e-4)
 * newcombeInterval(0, 10, 0, 20); // => { lo: -0.1611, hi: 0.2775 } (to 1e-4)
 */
export function newcombeInterval(
  x1: number,
  n1: number,
  x2: number,
  n2: number,
  confidence = 0.95,
): Interval | null {
  const fn = 'newcombeInterval';
  assertFinite(fn, 'x1', x1);
  assertFinite(fn, 'n1', n1);
  assertFinite(fn, 'x2', x2);
  assertFinite(fn, 'n2', n2);
  if (n1 <= 0 || n2 <= 0) {
    zForConfidence(confidence); // still reject a bad confidence level
    return null;
  }
  const c1 = checkCount(fn, 'x1', x1, n1);
  const c2 = checkCount(fn, 'x2', x2, n2);
  const w1 = wilsonInterval(c1, n1, confidence) as Interval;
  const w2 = wilsonInterval(c2, n2, confidence) as Interval;
  const p1 = c1 / n1;
  const p2 = c2 / n2;
  const d = p1 - p2;
  const lo = d - Math.sqrt((p1 - w1.lo) ** 2 + (w2.hi - p2) ** 2);
  const hi = d + Math.sqrt((w1.hi - p1) ** 2 + (p2 - w2.lo) ** 2);
  return { lo: Math.max(-1, lo), hi: Math.min(1, hi) };
}
