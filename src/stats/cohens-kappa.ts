import { assertFinite } from './validate-input.js';

/**
 * Cohen's kappa, the chance-corrected agreement of two raters on a nominal scale (Cohen 1960,
 * "A coefficient of agreement for nominal scales", Educ. Psychol. Meas. 20:37), computed from
 * sufficient statistics over the items both raters rated. With N items, observed agreement
 * p_o = agree/N and chance agreement p_e = Σ_c (a_c/N)(b_c/N) from the two raters' marginals,
 *
 *   κ = (p_o − p_e) / (1 − p_e) = (N·agree − Σ_c a_c·b_c) / (N² − Σ_c a_c·b_c).
 *
 * The second form is used: for integer counts below 2²⁶ both differences are exact. It is the
 * unweighted kappa of statsmodels `cohens_kappa(table).kappa` for the two raters' contingency
 * table, with agree its trace and the marginals its row and column sums. Counts may be
 * non-integer (weighted items).
 * @param agree number of items on which both raters gave the same category, 0 ≤ agree ≤ items
 * @param items number of items both raters rated (N); 0 gives `null`
 * @param marginalsA marginalsA[c] = items rater A put in category c; must sum to `items`
 * @param marginalsB marginalsB[c] = items rater B put in category c, same category order; must sum to `items`
 * @returns κ in [−1, 1]; `null` when items = 0 or chance agreement is 1 (both raters used one
 *   and the same category for every item, so κ is 0/0)
 * @throws RangeError when a value is NaN/infinite or negative, the marginals differ in length or do
 *   not sum to `items`, or `agree` exceeds Σ_c min(a_c, b_c) (more agreement than the marginals allow)
 * @example
 * cohensKappa(35, 50, [25, 25], [30, 20]); // => 0.4 (table [[20, 5], [10, 15]])
 * cohensKappa(13, 19, [5, 8, 6], [0, 13, 6]); // => 0.4841628959276018 (statsmodels: 0.48416289592760187)
 * cohensKappa(10, 10, [10, 0], [10, 0]); // => null
 */
export function cohensKappa(
  agree: number,
  items: number,
  marginalsA: readonly number[],
  marginalsB: readonly number[],
): number | null {
  const fn = 'cohensKappa';
  assertFinite(fn, 'agree', agree);
  assertFinite(fn, 'items', items);
  if (items < 0) throw new RangeError(`${fn}: items must be >= 0, got ${items}`);
  if (marginalsA.length !== marginalsB.length) {
    throw new RangeError(
      `${fn}: marginalsA and marginalsB must list the same categories, got lengths ${marginalsA.length} and ${marginalsB.length}`,
    );
  }
  const slack = 1e-9 * Math.max(1, items);
  let sumA = 0;
  let sumB = 0;
  let chance = 0; // Σ_c a_c·b_c
  let maxAgree = 0; // Σ_c min(a_c, b_c)
  for (let c = 0; c < marginalsA.length; c++) {
    const a = marginalsA[c];
    const b = marginalsB[c];
    assertFinite(fn, `marginalsA[${c}]`, a);
    assertFinite(fn, `marginalsB[${c}]`, b);
    if (a < 0) throw new RangeError(`${fn}: marginalsA[${c}] must be >= 0, got ${a}`);
    if (b < 0) throw new RangeError(`${fn}: marginalsB[${c}] must be >= 0, got ${b}`);
    sumA += a;
    sumB += b;
    chance += a * b;
    maxAgree += Math.min(a, b);
  }
  if (Math.abs(sumA - items) > slack) {
    throw new RangeError(`${fn}: marginalsA must sum to items = ${items}, got ${sumA}`);
  }
  if (Math.abs(sumB - items) > slack) {
    throw new RangeError(`${fn}: marginalsB must sum to items = ${items}, got ${sumB}`);
  }
  if (agree < -slack || agree > maxAgree + slack) {
    throw new RangeError(
      `${fn}: agree must be in [0, Σ min(marginalsA[c], marginalsB[c])] = [0, ${maxAgree}], got ${agree}`,
    );
  }
  if (items === 0) return null;
  const denominator = items * items - chance;
  if (!(denominator > 0)) return null;
  const kappa = (items * Math.min(Math.max(agree, 0), maxAgree) - chance) / denominator;
  return Math.min(1, Math.max(-1, kappa));
}
