import { brentRoot } from './brent-root.js';
import type { Interval } from './interval.js';
import { zForConfidence } from './normal.js';
import { checkPairs, tangoVariance } from './tango-score-test.js';

/**
 * Tango's score confidence interval for the difference of two paired proportions (Tango 1998,
 * "Equivalence test and confidence interval for the difference in proportions for the paired-sample
 * design", Stat. Med. 17:891; the "Score" interval of Agresti & Min 2005, Stat. Med. 24:729), here
 * the change in error rate on the same rows, Δ = after − before, estimated by d = (c − b)/n: b pairs
 * were wrong before and right after, c right before and wrong after. The interval is every Δ in
 * [−1, 1] that `tangoScoreTest` does not reject at the level, |z(Δ)| ≤ z with z(Δ) = (c − b − nΔ) /
 * √(n(2q̃ + Δ(1 − Δ))) and q̃ Tango's constrained maximum-likelihood estimate of the probability of a
 * b pair (`tangoVariance`). z(Δ) falls as Δ grows, so each end is the one root of (c − b − nΔ)² −
 * z²·n(2q̃ + Δ(1 − Δ)) (z(Δ)² − z² times the variance: finite where the variance is 0) on its side of
 * d, found with `brentRoot` between d and ±1.
 *
 * Edges, in closed form (z(Δ)² by hand: with b = c = 0, q̃ = max(0, −Δ) and z(Δ)² = n|Δ|/(1 − |Δ|);
 * with b = n, q̃ = (1 − Δ)/2 and z(Δ)² = n(1 + Δ)/(1 − Δ)): b = c = 0 gives ±z²/(n + z²); b = n gives
 * [−1, −1 + 2z²/(n + z²)] and c = n its mirror image. Otherwise −1 < lo < d < hi < 1.
 *
 * Counts may be non-integer (weighted data: `pairedMeanInterval` passes effective counts). No
 * continuity correction and no skewness correction.
 * @param b pairs wrong before and right after, 0 ≤ b
 * @param c pairs right before and wrong after, 0 ≤ c, b + c ≤ n
 * @param n the number of pairs; n ≤ 0 means no data
 * @param confidence two-sided confidence level in (0, 1); default 0.95
 * @returns the interval for after − before, or `null` when n ≤ 0
 * @throws RangeError when an argument is NaN/infinite, b or c is outside [0, n], b + c > n, or confidence is not in (0, 1)
 * @example
 * tangoInterval(3, 9, 32); // => { lo: -0.0273, hi: 0.3897 } (to 1e-4)
 * tangoInterval(0, 0, 20); // => { lo: -0.1611, hi: 0.1611 } (to 1e-4)
 */
export function tangoInterval(b: number, c: number, n: number, confidence = 0.95): Interval | null {
  const fn = 'tangoInterval';
  const counts = checkPairs(fn, b, c, n);
  const z = zForConfidence(confidence);
  if (counts === null) return null;
  const z2 = z * z;
  const edge = z2 / (n + z2);
  if (counts.b === 0 && counts.c === 0) return { lo: -edge, hi: edge };
  if (counts.b === n) return { lo: -1, hi: Math.min(1, -1 + 2 * edge) };
  if (counts.c === n) return { lo: Math.max(-1, 1 - 2 * edge), hi: 1 };
  const { b: x, c: y } = counts;
  const d = (y - x) / n;
  // z(Δ)² − z², times the variance: > 0 outside the interval, < 0 at d
  const excess = (delta: number) => (y - x - n * delta) ** 2 - z2 * tangoVariance(x, y, n, delta);
  const lo = brentRoot(excess, -1, d);
  const hi = brentRoot(excess, d, 1);
  return { lo: Math.max(-1, Math.min(d, lo)), hi: Math.min(1, Math.max(d, hi)) };
}

