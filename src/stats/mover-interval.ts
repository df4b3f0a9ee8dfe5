import type { Interval } from './interval.js';
import { normalCdf, zForConfidence } from './normal.js';
import { wilsonLimits } from './wilson-interval.js';
import { assertFinite, checkCount } from './validate-input.js';

/** One term of a linear combination of independent proportions: `coef` × x/n (x, n may be effective counts). */
export interface ProportionTerm {
  readonly coef: number;
  readonly x: number;
  readonly n: number;
}

/** An estimate with its own confidence limits, for {@link moverLimits}. */
export interface LimitedEstimate {
  readonly coef: number;
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
}

/**
 * MOVER ("method of variance estimates recovery"; Zou & Donner 2008, Stat. Med. 27:1693, eqs. 6–7)
 * limits for a linear combination θ = Σ cᵢθᵢ of independent estimates, each with its own limits
 * (lᵢ, uᵢ) at the same confidence level:
 *
 *   L = θ̂ − √(Σ_{cᵢ>0} cᵢ²(θ̂ᵢ − lᵢ)² + Σ_{cᵢ<0} cᵢ²(uᵢ − θ̂ᵢ)²),
 *   U = θ̂ + √(Σ_{cᵢ>0} cᵢ²(uᵢ − θ̂ᵢ)² + Σ_{cᵢ<0} cᵢ²(θ̂ᵢ − lᵢ)²).
 *
 * With two proportions, coefficients +1 and −1 and Wilson limits this is Newcombe's hybrid score
 * interval (Newcombe 1998, Stat. Med. 17:873, method 10). Inputs are not checked.
 * @param parts the estimates, their coefficients and limits
 * @param offset a constant added to θ (no uncertainty), default 0
 * @returns the limits of θ
 * @example
 * moverLimits([{ coef: 1, value: 0.8, lo: 0.6918, hi: 0.8770 }, { coef: -1, value: 0.6, lo: 0.4905, hi: 0.7004 }]); // => { lo: 0.0524, hi: 0.3339 } (to 1e-4)
 */
export function moverLimits(parts: readonly LimitedEstimate[], offset = 0): Interval {
  let est = offset;
  let down = 0;
  let up = 0;
  for (const { coef, value, lo, hi } of parts) {
    est += coef * value;
    const below = coef * coef * (value - lo) ** 2;
    const above = coef * coef * (hi - value) ** 2;
    if (coef > 0) {
      down += below;
      up += above;
    } else if (coef < 0) {
      down += above;
      up += below;
    }
  }
  return { lo: est - Math.sqrt(down), hi: est + Math.sqrt(up) };
}

function check(fn: string, terms: readonly ProportionTerm[], offset: number): void {
  assertFinite(fn, 'offset', offset);
  terms.forEach((t, i) => {
    assertFinite(fn, `terms[${i}].coef`, t.coef);
    assertFinite(fn, `terms[${i}].x`, t.x);
    assertFinite(fn, `terms[${i}].n`, t.n);
    if (t.n > 0) checkCount(fn, `terms[${i}].x`, t.x, t.n);
  });
}

function limitsAt(terms: readonly ProportionTerm[], z: number, offset: number): Interval {
  return moverLimits(
    terms.map((t) => {
      const w = wilsonLimits(t.x, t.n, z);
      return { coef: t.coef, value: t.x / t.n, lo: w.lo, hi: w.hi };
    }),
    offset,
  );
}

/**
 * MOVER interval (Zou & Donner 2008, see {@link moverLimits}) for a linear combination of independent
 * proportions Σ cᵢ xᵢ/nᵢ + offset, from the Wilson score interval of each (Wilson 1927): the interval
 * of a difference of two differences, e.g. how much more a slice's gap exceeds the gap of the rows
 * around it (Newcombe 2001, Stat. Med. 20:2885, builds the same interval for an additive interaction).
 * @param terms the proportions and their coefficients; weighted data: x = p̂·n_eff, n = n_eff
 * @param confidence two-sided confidence level in (0, 1); default 0.95
 * @param offset a constant added to the combination (an exact floor), default 0
 * @returns the interval, or null when a term has n ≤ 0
 * @throws RangeError when a value is NaN or infinite, a count is outside [0, n] or confidence is not in (0, 1)
 * @example
 * moverInterval([{ coef: 1, x: 56, n: 70 }, { coef: -1, x: 48, n: 80 }]); // => { lo: 0.0524, hi: 0.3339 } (to 1e-4)
 */
export function moverInterval(terms: readonly ProportionTerm[], confidence = 0.95, offset = 0): Interval | null {
  check('moverInterval', terms, offset);
  const z = zForConfidence(confidence);
  if (terms.some((t) => !(t.n > 0))) return null;
  return limitsAt(terms, z, offset);
}

/**
 * The two-sided p-value that matches {@link moverInterval}: 1 − the confidence level at which the
 * interval's nearer end reaches 0, i.e. 2(1 − Φ(z*)) with z* the critical value at which it does (the
 * interval is inverted into a test; its ends move away from the estimate as z grows, so z* is found by
 * bisection). 1 when the estimate is 0.
 * @param terms as for {@link moverInterval}
 * @param offset as for {@link moverInterval}
 * @returns p in (0, 1], or null when a term has n ≤ 0
 * @example
 * moverPValue([{ coef: 1, x: 56, n: 70 }, { coef: -1, x: 48, n: 80 }]); // => 0.0081 (to 1e-4)
 */
export function moverPValue(terms: readonly ProportionTerm[], offset = 0): number | null {
  check('moverPValue', terms, offset);
  if (terms.some((t) => !(t.n > 0))) return null;
  const est = terms.reduce((a, t) => a + (t.coef * t.x) / t.n, offset);
  if (est === 0) return 1;
  // the end nearer 0 as a function of z: positive while the interval excludes 0
  const gap = (z: number) => {
    const ci = limitsAt(terms, z, offset);
    return est > 0 ? ci.lo : -ci.hi;
  };
  let lo = 0;
  let hi = 1;
  while (gap(hi) > 0) {
    lo = hi;
    hi *= 2;
    if (hi > 64) return 0; // beyond z = 64 the p-value is below 1e-890: 0 in doubles
  }
  for (let i = 0; i < 60 && hi - lo > 1e-12 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (gap(mid) > 0) lo = mid;
    else hi = mid;
  }
  return 2 * normalCdf(-(lo + hi) / 2);
}
