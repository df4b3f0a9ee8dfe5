import { normalCdf } from './normal.js';
import { assertFinite, checkCount } from './validate-input.js';

/** The result of {@link tangoScoreTest}. */
export interface TangoScoreResult {
  /** The signed score statistic: positive when the observed difference (c − b)/n is above Δ. */
  readonly z: number;
  /** z², the chi-square form on 1 degree of freedom (McNemar's statistic at Δ = 0). */
  readonly statistic: number;
  /** The two-sided p-value 2·Φ(−|z|) in [0, 1]. */
  readonly p: number;
}

/**
 * The variance of c − b under H₀ in Tango's score statistic for the difference of two paired
 * proportions (Tango 1998, "Equivalence test and confidence interval for the difference in
 * proportions for the paired-sample design", Stat. Med. 17:891), for the difference Δ = (c − b)/n of
 * the error rates after and before: n(2q̃ + Δ(1 − Δ)), with q̃ the maximum-likelihood estimate of the
 * probability of a b pair under the constraint that the difference is Δ. q̃ is the root in
 * [max(0, −Δ), (1 − Δ)/2] of 2n q² + W q − bΔ(1 − Δ) = 0, W = −(b + c) + (2n − c + b)Δ, taken as
 * (√(W² + 8n·bΔ(1 − Δ)) − W)/(4n), or as 2bΔ(1 − Δ)/(W + √(…)) when W > 0 (the same root without
 * the cancellation). The formula of {@link tangoScoreTest} and `tangoInterval`; inputs are not
 * checked (0 ≤ b, c; b + c ≤ n; n > 0; −1 ≤ Δ ≤ 1).
 * @param b pairs wrong before and right after (may be non-integer: effective counts)
 * @param c pairs right before and wrong after
 * @param n all pairs
 * @param delta the difference Δ of the null hypothesis
 * @returns the variance, ≥ 0; it is 0 only at Δ = ±1, and at Δ = 0 when b = c = 0
 * @example
 * tangoVariance(3, 9, 32, 0); // => 12 (to 1e-12; b + c, McNemar's variance)
 */
export function tangoVariance(b: number, c: number, n: number, delta: number): number {
  const k = b * delta * (1 - delta);
  const w = -(b + c) + (2 * n - c + b) * delta;
  const root = Math.sqrt(Math.max(0, w * w + 8 * n * k));
  const q = w > 0 ? (2 * k) / (w + root) : (root - w) / (4 * n);
  return Math.max(0, n * (2 * q + delta * (1 - delta)));
}

/**
 * Tango's score test of H₀: the difference of two paired proportions is Δ (Tango 1998, Stat. Med.
 * 17:891), here the change in error rate on the same rows, after − before = (c − b)/n. Only the
 * discordant pairs enter: b pairs were wrong before and right after, c right before and wrong after
 * (`mcnemarTest` names them the other way round; its statistic is symmetric in them). The statistic
 * is z(Δ) = (c − b − nΔ) / √V(Δ), V(Δ) = n(2q̃ + Δ(1 − Δ)) from {@link tangoVariance} (Tango 1998,
 * eqs. 3–5), positive when the observed difference is above Δ; the p-value is two-sided, 2·Φ(−|z|). At Δ = 0, q̃ = (b + c)/(2n) and z² =
 * (c − b)²/(b + c): McNemar's statistic without continuity correction (McNemar 1947, Psychometrika
 * 12:153), whatever n is.
 *
 * Counts may be non-integer (weighted data: see `pairedMeanInterval`). b = c = 0 at Δ = 0 gives z = 0
 * and p = 1 (no discordant pair, no evidence); a Δ the data rule out (Δ = −1 with any pair that is not
 * a b pair, Δ = 1 with any that is not a c pair) gives z = ±Infinity and p = 0.
 * @param b pairs wrong before and right after, 0 ≤ b
 * @param c pairs right before and wrong after, 0 ≤ c, b + c ≤ n
 * @param n the number of pairs; n ≤ 0 means no data
 * @param delta the difference of the null hypothesis, in [−1, 1]; default 0
 * @returns z, z² and p, or `null` when n ≤ 0
 * @throws RangeError when an argument is NaN/infinite, b or c is outside [0, n], b + c > n, or delta is outside [−1, 1]
 * @example
 * tangoScoreTest(3, 9, 32); // => { z: 1.7321, statistic: 3, p: 0.0833 } (to 1e-4)
 * tangoScoreTest(3, 9, 32, 0.1); // => { z: 0.8379, statistic: 0.7022, p: 0.4021 } (to 1e-4)
 */
export function tangoScoreTest(b: number, c: number, n: number, delta = 0): TangoScoreResult | null {
  const fn = 'tangoScoreTest';
  assertFinite(fn, 'delta', delta);
  if (delta < -1 || delta > 1) throw new RangeError(`${fn}: delta must be in [-1, 1], got ${delta}`);
  const counts = checkPairs(fn, b, c, n);
  if (counts === null) return null;
  const numerator = counts.c - counts.b - n * delta;
  const variance = tangoVariance(counts.b, counts.c, n, delta);
  // 0/0: Δ is the observed difference and the only one the data allow (b = c = 0 at Δ = 0, b = n at
  // Δ = −1, c = n at Δ = 1); x/0: Δ = ±1 and a pair rules it out
  const z = variance > 0 ? numerator / Math.sqrt(variance) : numerator === 0 ? 0 : numerator * Infinity;
  return { z, statistic: z * z, p: Math.min(1, 2 * normalCdf(-Math.abs(z))) };
}

/**
 * Checks the discordant counts of a paired table, the way {@link tangoScoreTest} and `tangoInterval`
 * do: every argument finite, b and c in [0, n] and b + c ≤ n (with `checkCount`'s rounding slack for
 * weighted counts). Plain input validation, not a published statistical method.
 * @param fn name of the calling function, used in the message
 * @param b pairs wrong before and right after
 * @param c pairs right before and wrong after
 * @param n all pairs
 * @returns b and c clamped into [0, n], or `null` when n ≤ 0 (no data)
 * @throws RangeError when a check fails
 * @example
 * checkPairs('tangoInterval', 3, 9, 32); // => { b: 3, c: 9 }
 * checkPairs('tangoInterval', 20, 20, 32); // throws RangeError: tangoInterval: b + c must be at most n = 32, got 40
 */
export function checkPairs(fn: string, b: number, c: number, n: number): { b: number; c: number } | null {
  assertFinite(fn, 'b', b);
  assertFinite(fn, 'c', c);
  assertFinite(fn, 'n', n);
  if (n <= 0) return null;
  const cb = checkCount(fn, 'b', b, n);
  const cc = checkCount(fn, 'c', c, n);
  if (cb + cc > n + 1e-9 * Math.max(1, n)) {
    throw new RangeError(`${fn}: b + c must be at most n = ${n}, got ${b + c}`);
  }
  return { b: cb, c: cc };
}
