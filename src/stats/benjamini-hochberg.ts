import { assertProbability } from './validate-input.js';

/**
 * Benjamini–Hochberg adjusted p-values (q-values) controlling the false discovery rate under
 * independence or positive dependence (Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57:289,
 * step-up procedure; adjusted form as in R `p.adjust(p, "BH")` and statsmodels
 * `multipletests(p, method='fdr_bh')`). With the m non-null p-values sorted ascending,
 * p₍₁₎ ≤ … ≤ p₍ₘ₎,
 *
 *   q₍ᵢ₎ = min(1, min over j ≥ i of m·p₍ⱼ₎ / j).
 *
 * Rejecting every hypothesis with q ≤ α is the BH procedure at FDR level α. Results are in the
 * input order; `null` entries (untested hypotheses) pass through as `null` and do not count in
 * m. The adjusted values are monotone in the raw p-values and never exceed 1. Ties get equal
 * q-values.
 * @param p raw p-values in [0, 1], or `null` for "not tested"
 * @returns q-values in the same order, `null` where the input was `null`
 * @throws RangeError when an entry is NaN or outside [0, 1]
 * @example
 * benjaminiHochberg([0.01, null, 0.04, 0.03]); // => [0.03, null, 0.04, 0.04]
 */
export function benjaminiHochberg(p: readonly (number | null)[]): (number | null)[] {
  const tested: number[] = [];
  p.forEach((value, index) => {
    if (value === null) return;
    assertProbability('benjaminiHochberg', `p[${index}]`, value);
    tested.push(index);
  });
  const out: (number | null)[] = p.map(() => null);
  const m = tested.length;
  if (m === 0) return out;
  const order = tested.sort((a, b) => (p[a] as number) - (p[b] as number));
  let running = 1;
  for (let rank = m; rank >= 1; rank--) {
    const index = order[rank - 1];
    running = Math.min(running, ((p[index] as number) * m) / rank);
    // q ≥ p holds exactly (m/rank ≥ 1), but p·m/rank can round one step below p
    out[index] = Math.max(running, p[index] as number);
  }
  return out;
}
