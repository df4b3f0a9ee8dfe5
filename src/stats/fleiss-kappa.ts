import { assertFinite } from './validate-input.js';

/**
 * Fleiss' kappa, the chance-corrected agreement of many raters on a nominal scale (Fleiss 1971,
 * "Measuring nominal scale agreement among many raters", Psychol. Bull. 76:378), computed from
 * sufficient statistics and generalised to a varying number of raters per item. Over the N items
 * rated by n_i ≥ 2 raters, with n_ic raters putting item i in category c:
 *
 *   P_i = Σ_c n_ic(n_ic − 1) / (n_i(n_i − 1))   (see `fleissItemAgreement`),
 *   P̄ = Σ_i P_i / N,   p_c = Σ_i n_ic / Σ_i n_i,   P_e = Σ_c p_c²,
 *   κ = (P̄ − P_e) / (1 − P_e).
 *
 * With the same number of raters for every item this is exactly Fleiss' (1971) κ, as computed
 * by statsmodels `fleiss_kappa(table, method='fleiss')`. With varying n_i, the category
 * proportions p_c pool all ratings; other generalisations (e.g. Gwet 2014, Handbook of
 * Inter-Rater Reliability, 4th ed., ch. 2) average the per-item proportions n_ic/n_i instead,
 * which gives a slightly different P_e. Items with fewer than two raters carry no agreement
 * information and must be left out of all three arguments.
 * @param sumItemAgreement Σ_i P_i over the N items, in [0, N]
 * @param items N, the number of items with at least two raters; 0 gives `null`
 * @param categoryTotals categoryTotals[c] = Σ_i n_ic over those items
 * @returns κ (at most 1; its lower bound depends on the numbers of raters); `null` when
 *   items = 0 or P_e = 1 (every rating in one category, so κ is 0/0)
 * @throws RangeError when a value is NaN/infinite or negative, `sumItemAgreement` exceeds `items`,
 *   or the category totals are all 0 while `items` > 0
 * @example
 * // 2 items, 3 raters each: counts [3, 0] and [1, 2] -> P_i = 1 and 1/3
 * fleissKappa(4 / 3, 2, [4, 2]); // => 0.25 (P̄ = 2/3, P_e = 5/9)
 * fleissKappa(0, 0, []); // => null
 */
export function fleissKappa(sumItemAgreement: number, items: number, categoryTotals: readonly number[]): number | null {
  const fn = 'fleissKappa';
  assertFinite(fn, 'sumItemAgreement', sumItemAgreement);
  assertFinite(fn, 'items', items);
  if (items < 0) throw new RangeError(`${fn}: items must be >= 0, got ${items}`);
  const slack = 1e-9 * Math.max(1, items);
  if (sumItemAgreement < -slack || sumItemAgreement > items + slack) {
    throw new RangeError(`${fn}: sumItemAgreement must be in [0, items] = [0, ${items}], got ${sumItemAgreement}`);
  }
  let total = 0;
  let sumSquares = 0;
  for (let c = 0; c < categoryTotals.length; c++) {
    const t = categoryTotals[c];
    assertFinite(fn, `categoryTotals[${c}]`, t);
    if (t < 0) throw new RangeError(`${fn}: categoryTotals[${c}] must be >= 0, got ${t}`);
    total += t;
    sumSquares += t * t;
  }
  if (items === 0) return null;
  if (!(total > 0)) {
    throw new RangeError(
      `${fn}: categoryTotals must count the ratings of the ${items} items (each has at least 2), got a total of ${total}`,
    );
  }
  // κ = (P̄·T² − Σ t_c²) / (T² − Σ t_c²): P_e = Σ t_c²/T² never leaves the integers, and
  // T² − Σ t_c² is exact for integer totals below 2²⁶
  const t2 = total * total;
  const denominator = t2 - sumSquares;
  if (!(denominator > 0)) return null;
  const meanAgreement = Math.min(Math.max(sumItemAgreement, 0), items) / items;
  return Math.min(1, (meanAgreement * t2 - sumSquares) / denominator);
}

/**
 * Fleiss' per-item agreement P_i (Fleiss 1971, Psychol. Bull. 76:378): the proportion of
 * the n_i(n_i − 1) ordered pairs of distinct raters of the item that put it in the same category,
 * P_i = Σ_c n_ic(n_ic − 1) / (n_i(n_i − 1)). Sum it over items for `fleissKappa`.
 * @param counts counts[c] = number of raters who put the item in category c (non-negative integers, Σ ≥ 2)
 * @returns P_i in [0, 1]
 * @throws RangeError when a count is NaN, negative or not an integer, or fewer than two raters rated the item
 * @example
 * fleissItemAgreement([0, 2, 6, 4, 2]); // => 0.25274725274725274 (= 46/182)
 * fleissItemAgreement([3, 0]); // => 1
 * fleissItemAgreement([1, 1]); // => 0
 */
export function fleissItemAgreement(counts: readonly number[]): number {
  const fn = 'fleissItemAgreement';
  let raters = 0;
  let pairs = 0;
  for (let c = 0; c < counts.length; c++) {
    const k = counts[c];
    assertFinite(fn, `counts[${c}]`, k);
    if (k < 0 || !Number.isInteger(k)) {
      throw new RangeError(`${fn}: counts[${c}] must be a non-negative integer, got ${k}`);
    }
    raters += k;
    pairs += k * (k - 1);
  }
  if (raters < 2) {
    throw new RangeError(
      `${fn}: an item needs at least 2 raters for pairwise agreement, got ${raters}; leave such items out`,
    );
  }
  return pairs / (raters * (raters - 1));
}
