import { assertFinite } from './validate-input.js';

/**
 * Kish's effective sample size of a weighted sample, n_eff = (Σw)² / Σw² (Kish 1965, Survey
 * Sampling, Wiley; n divided by the design effect for unequal weights, Kish 1992, "Weighting for
 * unequal Pi", J. Official Statistics 8:183). With equal weights it equals the number of observations.
 * @param sumW the sum of the weights, Σw
 * @param sumW2 the sum of the squared weights, Σw²
 * @returns the effective sample size; 0 when `sumW2 <= 0` (no weighted observations). Computed as
 * Σw · (Σw / Σw²) when (Σw)² alone would overflow, so it is finite whenever n itself is a double
 * @throws RangeError when either argument is NaN or infinite
 * @example
 * kishEffectiveN(10, 10); // => 10 (ten weights of 1)
 * kishEffectiveN(3, 5); // => 1.8 (weights 1, 2)
 */
export function kishEffectiveN(sumW: number, sumW2: number): number {
  assertFinite('kishEffectiveN', 'sumW', sumW);
  assertFinite('kishEffectiveN', 'sumW2', sumW2);
  if (sumW2 <= 0) return 0;
  const n = (sumW * sumW) / sumW2;
  return Number.isFinite(n) ? n : sumW * (sumW / sumW2);
}
