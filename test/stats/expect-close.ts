import { expect } from 'vitest';

/**
 * Asserts |actual − expected| ≤ tolerance, with a message showing both values and the gap.
 * @param actual the computed value (null/undefined fails the check)
 * @param expected the reference value
 * @param tolerance the largest accepted absolute difference
 */
export function expectClose(actual: number | null | undefined, expected: number, tolerance: number): void {
  expect(actual, 'value is missing').toBeTypeOf('number');
  const a = actual as number;
  const gap = Math.abs(a - expected);
  expect(gap, `expected ${a} to be within ${tolerance} of ${expected} (gap ${gap})`).toBeLessThanOrEqual(tolerance);
}

/**
 * Asserts |actual − expected| ≤ relative·|expected|, for values far below 1 (tail probabilities).
 * @param actual the computed value
 * @param expected the reference value (non-zero)
 * @param relative the largest accepted relative difference
 */
export function expectRelClose(actual: number | null | undefined, expected: number, relative: number): void {
  expectClose(actual, expected, relative * Math.abs(expected));
}
