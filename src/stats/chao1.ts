import { assertFinite } from './validate-input.js';

/**
 * The bias-corrected Chao1 estimate of the number of distinct classes in a population from a sample:
 * S = D + f₁(f₁ − 1) / (2(f₂ + 1)), with D the classes seen, f₁ those seen once and f₂ those seen twice
 * (Chao 1984, "Nonparametric estimation of the number of classes in a population", Scandinavian
 * Journal of Statistics 11:265; the bias-corrected form, defined when f₂ = 0: Chao 2005, "Species
 * estimation and applications", Encyclopedia of Statistical Sciences, 2nd ed., Wiley). floorgap uses
 * it to guess, from a sample of rows, how many cells the full cross of the slice columns will have.
 * It is a lower bound in expectation: rare classes that the sample never saw are under-counted.
 * @param distinct D, classes seen in the sample
 * @param singletons f₁, classes seen exactly once
 * @param doubletons f₂, classes seen exactly twice
 * @returns the estimated number of classes (≥ D)
 * @throws RangeError when an argument is negative, not finite, or f₁ + f₂ > D
 * @example
 * chao1(100, 10, 5); // => 107.5 (100 + 10·9 / (2·6))
 * chao1(3, 3, 0); // => 6 (every class seen once: 3 + 3·2 / 2)
 */
export function chao1(distinct: number, singletons: number, doubletons: number): number {
  for (const [name, v] of [['distinct', distinct], ['singletons', singletons], ['doubletons', doubletons]] as const) {
    assertFinite('chao1', name, v);
    if (v < 0) throw new RangeError(`chao1: ${name} must be >= 0, got ${v}`);
  }
  if (singletons + doubletons > distinct) throw new RangeError(`chao1: singletons + doubletons (${singletons + doubletons}) exceed distinct (${distinct})`);
  return distinct + (singletons * (singletons - 1)) / (2 * (doubletons + 1));
}
