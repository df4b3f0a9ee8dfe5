import { describe, it, expect } from 'vitest';
import { twoProportionTest } from '../../src/stats/two-proportion-test.js';
import { expectClose } from './expect-close.js';

const LIBRARY = 1e-9; // same pooled z statistic as statsmodels, so agreement is to rounding

describe('twoProportionTest: statsmodels 0.13.5 proportions_ztest([x1, x2], [n1, n2]) (pooled)', () => {
  it.each([
    // proportions_ztest([5, 12], [83, 99]) -> (-1.4078304151258787, 0.15918129181156992)
    [5, 83, 12, 99, 0.15918129181156992],
    // proportions_ztest([56, 48], [70, 80]) -> (2.6501719512585336, 0.00804508136819656)
    [56, 70, 48, 80, 0.00804508136819656],
    // proportions_ztest([9, 3], [10, 10]) -> (2.738612787525831, 0.006169899320544151)
    [9, 10, 3, 10, 0.006169899320544151],
    // proportions_ztest([0, 1], [10, 20]) -> (-0.7191949522280763, 0.472020809129022)
    [0, 10, 1, 20, 0.472020809129022],
    // weighted (non-integer) counts:
    // proportions_ztest([12.3, 5.5], [40.7, 33.2]) -> (1.3654771901963172, 0.1721031174596841)
    [12.3, 40.7, 5.5, 33.2, 0.1721031174596841],
  ])('%f/%f vs %f/%f -> %f', (x1, n1, x2, n2, expected) => {
    expectClose(twoProportionTest(x1, n1, x2, n2), expected, LIBRARY);
  });

  it('is symmetric in the two samples', () => {
    // property of the two-sided pooled z test: swapping samples flips the sign of z only
    expect(twoProportionTest(12, 99, 5, 83)).toBe(twoProportionTest(5, 83, 12, 99));
  });
});

describe('twoProportionTest: degenerate input', () => {
  it('returns 1 when the pooled proportion is 0 or 1', () => {
    // contract (this module); statsmodels 0.13.5 proportions_ztest([10, 20], [10, 20]) -> (nan, nan)
    expect(twoProportionTest(10, 10, 20, 20)).toBe(1);
    // contract (this module): both samples all failures
    expect(twoProportionTest(0, 10, 0, 20)).toBe(1);
  });

  it('returns 1 when either n <= 0', () => {
    // contract (this module): no data, no evidence
    expect(twoProportionTest(0, 0, 3, 10)).toBe(1);
    expect(twoProportionTest(3, 10, 0, -1)).toBe(1);
  });

  it('rejects NaN and out-of-range counts', () => {
    // contract (this module): RangeError with the function and argument named
    expect(() => twoProportionTest(Number.NaN, 10, 1, 10)).toThrow(/twoProportionTest: x1 must be a finite number, got NaN/);
    expect(() => twoProportionTest(1, 10, 1, Number.NaN)).toThrow(/twoProportionTest: n2 must be a finite number, got NaN/);
    expect(() => twoProportionTest(1, 10, 11, 10)).toThrow(/twoProportionTest: x2 must be in \[0, n\]/);
  });
});
