import type { Interval } from './interval.js';
import { zForConfidence } from './normal.js';
import { tangoInterval } from './tango-interval.js';
import { assertFinite } from './validate-input.js';

/**
 * The weight sums of one split's paired rows, each pair with weight w > 0 and difference
 * D = e_after − e_before ∈ {−1, 0, 1}: over all pairs, over the b pairs (D = −1: wrong before, right
 * after) and over the c pairs (D = 1: right before, wrong after).
 */
export interface PairedWeightSums {
  /** Σw over all pairs. */
  readonly sumW: number;
  /** Σw² over all pairs. */
  readonly sumW2: number;
  /** Σw over the b pairs. */
  readonly bSumW: number;
  /** Σw² over the b pairs. */
  readonly bSumW2: number;
  /** Σw over the c pairs. */
  readonly cSumW: number;
  /** Σw² over the c pairs. */
  readonly cSumW2: number;
}

/** The result of {@link pairedMeanInterval}. */
export interface PairedMean {
  /** d̂ = Σw·D / Σw, the weighted change in error rate, after − before. */
  readonly estimate: number;
  /** Σw²(D − d̂)² / (Σw)², the linearization (sandwich) variance of d̂; the interval does not use it. */
  readonly variance: number;
  /** Kish's effective number of pairs, (Σw)² / Σw². */
  readonly nEff: number;
  /** Tango's score interval at the effective counts. */
  readonly interval: Interval;
}

/**
 * The weighted mean of paired differences d̂ = Σw·D / Σw (D = e_after − e_before per pair: the change
 * in weighted error rate on the same rows) with a score interval: Tango's interval for paired
 * proportions (Tango 1998, Stat. Med. 17:891; `tangoInterval`) at Kish's effective counts (Kish 1965,
 * Survey Sampling, Wiley): n_eff = (Σw)²/Σw² pairs, of which b_eff = n_eff·Σ_b w/Σw and c_eff =
 * n_eff·Σ_c w/Σw are discordant, so that (c_eff − b_eff)/n_eff = d̂. It is how the other intervals of
 * floorgap treat weighted rows (a Wilson interval at x = p̂·n_eff, n = n_eff). n_eff is computed as
 * Σw·(Σw/Σw²) and the counts as Σ_b w·(Σw/Σw²), so equal weights give n, b and c exactly and the
 * interval is exactly `tangoInterval(b, c, n)` (`kishEffectiveN` divides (Σw)² by Σw², which can
 * differ in the last bit once (Σw)² passes 2⁵³).
 *
 * `variance` is Σw²(D − d̂)²/(Σw)², the linearization (sandwich) variance of a weighted mean, a
 * ratio estimator (Cochran 1977, Sampling Techniques, ch. 6) with the weights taken as fixed, for
 * display or a Wald interval. The score interval does not use it: with few discordant pairs it is
 * unstable (one discordant pair of tiny weight gives a variance near 0, as if there were far more
 * pairs than there are), whereas n_eff never exceeds the number of pairs. With equal weights it is
 * (p̂_b + p̂_c − d̂²)/n, the score interval's own variance at d̂.
 * @param sums the weight sums of the pairs (see {@link PairedWeightSums}), all finite and ≥ 0, with the
 *   b and c sums at most the sums over all pairs
 * @param confidence two-sided confidence level in (0, 1); default 0.95
 * @returns the estimate, its variance, n_eff and the interval, or `null` when Σw ≤ 0 or Σw² ≤ 0 (no
 *   weighted pairs)
 * @throws RangeError when a sum is NaN, infinite or negative, a b or c sum exceeds the sum over all
 *   pairs, or confidence is not in (0, 1)
 * @example
 * pairedMeanInterval({ sumW: 32, sumW2: 32, bSumW: 3, bSumW2: 3, cSumW: 9, cSumW2: 9 }); // => { estimate: 0.1875, variance: 0.0106201171875, nEff: 32, interval: { lo: -0.0271, hi: 0.3897 } } (interval to 1e-4)
 */
export function pairedMeanInterval(sums: PairedWeightSums, confidence = 0.95): PairedMean | null {
  const fn = 'pairedMeanInterval';
  const { sumW, sumW2 } = sums;
  for (const name of ['sumW', 'sumW2', 'bSumW', 'bSumW2', 'cSumW', 'cSumW2'] as const) {
    assertFinite(fn, name, sums[name]);
    if (sums[name] < 0) throw new RangeError(`${fn}: ${name} must be >= 0, got ${sums[name]}`);
  }
  if (!(sumW > 0 && sumW2 > 0)) {
    zForConfidence(confidence); // still reject a bad confidence level
    return null;
  }
  // a part's sum may exceed the whole's by rounding (1e-9 relative, as checkCount allows)
  const part = (name: string, whole: 'sumW' | 'sumW2', value: number): number => {
    if (value > sums[whole] * (1 + 1e-9)) {
      throw new RangeError(`${fn}: ${name} must be at most ${whole} = ${sums[whole]}, got ${value}`);
    }
    return Math.min(value, sums[whole]);
  };
  const wb = part('bSumW', 'sumW', sums.bSumW);
  // within the rounding slack b + c may still pass the whole: c gives way, so that b_eff + c_eff ≤ n_eff
  const wc = Math.min(part('cSumW', 'sumW', sums.cSumW), sumW - wb);
  const w2b = part('bSumW2', 'sumW2', sums.bSumW2);
  const w2c = part('cSumW2', 'sumW2', sums.cSumW2);
  part('bSumW + cSumW', 'sumW', sums.bSumW + sums.cSumW);
  part('bSumW2 + cSumW2', 'sumW2', w2b + w2c);
  const estimate = (wc - wb) / sumW;
  const concordant = Math.max(0, sumW2 - w2b - w2c);
  const spread = estimate * estimate * concordant + (1 - estimate) ** 2 * w2c + (1 + estimate) ** 2 * w2b;
  const variance = spread / sumW / sumW;
  const scale = sumW / sumW2;
  const nEff = sumW * scale;
  const interval = tangoInterval(wb * scale, wc * scale, nEff, confidence) as Interval;
  return { estimate, variance, nEff, interval };
}
