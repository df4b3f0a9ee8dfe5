import stdlibNormalCdf from '@stdlib/stats-base-dists-normal-cdf';
import stdlibNormalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import { assertNotNaN, assertProbability } from './validate-input.js';

/** 1/√(2π), the standard normal density at 0. */
const INV_SQRT_2PI = 0.3989422804014327;

/**
 * Standard normal quantile function (probit), Φ⁻¹(p).
 *
 * Starts from `@stdlib/stats-base-dists-normal-quantile`, which computes √2·erfinv(2p − 1)
 * (erfinv after Boost, J. Maddock). Forming 2p − 1 loses relative accuracy in the tails
 * (about 2e-9 relative error at p = 1e-10, −Infinity below p ≈ 1e-17), so for p < 0.5 the
 * start value is polished with Halley's method (the third-order Newton variant) on Φ(z) − p = 0,
 * using the erfc-based `normalCdf` which is accurate in
 * the lower tail; when the start value is infinite the start
 * z ≈ −√(t − ln(2πt)), t = −2 ln p, from the leading term of the asymptotic tail expansion
 * (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, 26.2.12), is used instead.
 * Upper-tail values use the exact symmetry Φ⁻¹(p) = −Φ⁻¹(1 − p) (1 − p is exact for p ≥ 0.5).
 * Agrees with `scipy.stats.norm.ppf` to about 1e-15 relative for 1e-300 ≤ p ≤ 1.
 * @param p probability in [0, 1]
 * @returns the z such that Φ(z) = p; −Infinity at p = 0 and +Infinity at p = 1
 * @throws RangeError when `p` is NaN or outside [0, 1]
 * @example
 * normalQuantile(0.5); // => 0
 * normalQuantile(0.025); // => -1.9599639845400545
 * normalQuantile(1e-20); // => -9.262340089798409
 */
export function normalQuantile(p: number): number {
  assertProbability('normalQuantile', 'p', p);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  return p < 0.5 ? lowerTailQuantile(p) : -lowerTailQuantile(1 - p);
}

/** Φ⁻¹(p) for 0 < p < 0.5: stdlib start value polished by Halley steps (see `normalQuantile`). */
function lowerTailQuantile(p: number): number {
  let z = stdlibNormalQuantile(p, 0, 1);
  if (!Number.isFinite(z)) {
    const t = -2 * Math.log(p);
    z = -Math.sqrt(t - Math.log(2 * Math.PI * t));
  }
  for (let i = 0; i < 4; i++) {
    const density = INV_SQRT_2PI * Math.exp(-0.5 * z * z);
    if (!(density > 0)) break; // far below p = 1e-300: density underflows; keep the estimate
    const t = (stdlibNormalCdf(z, 0, 1) - p) / density;
    const step = t / (1 + 0.5 * z * t);
    z -= step;
    if (Math.abs(step) <= 1e-15 * Math.abs(z)) break;
  }
  return z;
}

/**
 * Standard normal cumulative distribution function, Φ(x) = ½·erfc(−x/√2) (definition:
 * Abramowitz & Stegun 1964, Handbook of Mathematical Functions, 26.2.2 and 7.1.2). Delegates to
 * `@stdlib/stats-base-dists-normal-cdf`, whose erfc keeps full relative accuracy in the lower
 * tail (use Φ(−|z|) for small tail probabilities, never 1 − Φ(|z|)).
 * @param x the point at which to evaluate Φ; ±Infinity allowed
 * @returns Φ(x) in [0, 1]
 * @throws RangeError when `x` is NaN
 * @example
 * normalCdf(0); // => 0.5
 * normalCdf(-1.959963984540054); // => 0.025 (to 1e-15)
 */
export function normalCdf(x: number): number {
  assertNotNaN('normalCdf', 'x', x);
  return stdlibNormalCdf(x, 0, 1);
}

/**
 * Two-sided critical value of the standard normal distribution for a confidence level:
 * z = Φ⁻¹(1 − α/2) with α = 1 − confidence, computed as −Φ⁻¹(α/2) (the same form as
 * `scipy.stats.norm.isf(alpha / 2)`, which statsmodels' `proportion_confint` uses), e.g. the
 * 1.96 of the Wilson (1927) and Newcombe (1998) intervals.
 * @param confidence the two-sided confidence level, strictly between 0 and 1 (e.g. 0.95)
 * @returns the critical value z > 0
 * @throws RangeError when `confidence` is NaN or not strictly inside (0, 1)
 * @example
 * zForConfidence(0.95); // => 1.959963984540054
 * zForConfidence(0.99); // => 2.575829303548901 (to 1e-15)
 */
export function zForConfidence(confidence: number): number {
  assertNotNaN('zForConfidence', 'confidence', confidence);
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(
      `zForConfidence: confidence must be strictly between 0 and 1 (e.g. 0.95), got ${confidence}`,
    );
  }
  return -normalQuantile((1 - confidence) / 2);
}
