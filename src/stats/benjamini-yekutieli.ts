import { benjaminiHochberg } from './benjamini-hochberg.js';

/**
 * Benjamini–Yekutieli adjusted p-values controlling the false discovery rate under arbitrary
 * dependence (Benjamini & Yekutieli 2001, Ann. Stat. 29:1165, Theorem 1.3): the BH step-up
 * procedure with m replaced by m·c(m), c(m) = Σᵢ₌₁ᵐ 1/i. Adjusted form as in R
 * `p.adjust(p, "BY")` and statsmodels `multipletests(p, method='fdr_by')`:
 *
 *   q₍ᵢ₎ = min(1, min over j ≥ i of c(m)·m·p₍ⱼ₎ / j) = min(1, c(m)·q_BH₍ᵢ₎),
 *
 * the second form holding because c(m) ≥ 1. Same conventions as `benjaminiHochberg`: input
 * order kept, `null` entries pass through and do not count in m, monotone, capped at 1.
 * @param p raw p-values in [0, 1], or `null` for "not tested"
 * @returns adjusted p-values in the same order, `null` where the input was `null`
 * @throws RangeError when an entry is NaN or outside [0, 1]
 * @example
 * benjaminiYekutieli([0.01, null, 0.04]); // => [0.03, null, 0.06] (c(2) = 1.5)
 */
export function benjaminiYekutieli(p: readonly (number | null)[]): (number | null)[] {
  const bh = benjaminiHochberg(p);
  const m = p.reduce<number>((count, value) => (value === null ? count : count + 1), 0);
  let c = 0;
  for (let i = m; i >= 1; i--) c += 1 / i; // smallest terms first for accuracy
  return bh.map((q) => (q === null ? null : Math.min(1, c * q)));
}
