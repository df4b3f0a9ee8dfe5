import type { Interval } from './interval.js';
import { normalCdf } from './normal.js';
import { assertFinite } from './validate-input.js';

/** The largest critical value tried: 1 − 2Φ(−8) is the last confidence level below 1 in doubles, to 15 digits. */
const MAX_Z = 8;

/**
 * The two-sided p-value that matches a family of confidence intervals (the test–interval duality; e.g.
 * Casella & Berger 2002, Statistical Inference, §9.2): 1 − the confidence level at which the interval's
 * nearer end reaches 0, i.e. 2(1 − Φ(z*)) with z* the critical value where it does. The interval's ends
 * move away from the estimate as z grows, so z* is found by bisection, as `moverPValue` does for MOVER
 * intervals of proportions; here the interval may come from anything (e.g. MOVER of two Tango
 * intervals, for a difference of two paired changes).
 * The intervals take a confidence level, which rounds to 1 beyond z = 8, so a p-value below 2Φ(−8)
 * (about 1.2e-15) is given as 0.
 * @param estimate the point estimate the intervals are built around
 * @param at the interval at a two-sided confidence level in (0, 1), or null when there is none
 * @returns p in [0, 1]; 1 when the estimate is 0; null when `at` gives no interval
 * @throws RangeError when the estimate is NaN or infinite
 * @example
 * intervalPValue(0.2, (level) => ({ lo: 0.2 - 0.1 * zForConfidence(level), hi: 0.2 + 0.1 * zForConfidence(level) })); // => 0.0455 (2Φ(−2), to 1e-4)
 */
export function intervalPValue(estimate: number, at: (confidence: number) => Interval | null): number | null {
  assertFinite('intervalPValue', 'estimate', estimate);
  if (at(0.95) === null) return null;
  if (estimate === 0) return 1;
  // the end nearer 0 as a function of z: positive while the interval excludes 0
  const gap = (z: number) => {
    const ci = at(1 - 2 * normalCdf(-z))!;
    return estimate > 0 ? ci.lo : -ci.hi;
  };
  if (gap(MAX_Z) > 0) return 0;
  let lo = 0;
  let hi = MAX_Z;
  for (let i = 0; i < 60 && hi - lo > 1e-12 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (gap(mid) > 0) lo = mid;
    else hi = mid;
  }
  return 2 * normalCdf(-(lo + hi) / 2);
}
