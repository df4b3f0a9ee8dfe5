import { describe, it, expect } from 'vitest';
import { proportionTest } from '../../src/stats/proportion-test.js';
import { expectClose, expectRelClose } from './expect-close.js';

const LIBRARY = 1e-9; // same test statistic as the reference library, so agreement is to rounding

describe('proportionTest: score branch (n·p0 ≥ 5 and n·(1 − p0) ≥ 5)', () => {
  it.each([
    // statsmodels 0.13.5: proportions_ztest(30, 100, value=0.2, prop_var=0.2) -> (2.4999999999999996, 0.012419330651552277)
    [30, 100, 0.2, 0.012419330651552277],
    // statsmodels 0.13.5: proportions_ztest(55, 100, value=0.5, prop_var=0.5) -> (1.0000000000000009, 0.3173105078629137)
    [55, 100, 0.5, 0.3173105078629137],
    // statsmodels 0.13.5: proportions_ztest(30, 100, value=0.3, prop_var=0.3) -> (0.0, 1.0)
    [30, 100, 0.3, 1],
    // weighted (non-integer) counts are used as is in the score branch:
    // statsmodels 0.13.5: proportions_ztest(12.4, 57.3, value=0.3, prop_var=0.3) -> (-1.380856520542572, 0.16732308091879233)
    [12.4, 57.3, 0.3, 0.16732308091879233],
  ])('x=%f n=%f p0=%f -> %f', (x, n, p0, expected) => {
    expectClose(proportionTest(x, n, p0), expected, LIBRARY);
  });
});

describe('proportionTest: exact binomial branch', () => {
  it('uses the exact test when n·p0 < 5', () => {
    // scipy 1.10.1: binomtest(3, 10, 0.1).pvalue -> 0.0701908264   (n·p0 = 1)
    expectClose(proportionTest(3, 10, 0.1), 0.0701908264, LIBRARY);
    // scipy 1.10.1: binomtest(5, 83, 0.05).pvalue -> 0.6106545036782358   (n·p0 = 4.15)
    // (the score test would give statsmodels proportions_ztest(5, 83, value=0.05, prop_var=0.05) -> p 0.6685870382092176)
    expectClose(proportionTest(5, 83, 0.05), 0.6106545036782358, LIBRARY);
  });

  it('uses the exact test when n·(1 − p0) < 5', () => {
    // scipy 1.10.1: binomtest(60, 100, 0.96).pvalue -> 1.5279450001964013e-29   (n·(1 − p0) = 4)
    // (the score test would give statsmodels proportions_ztest(60, 100, value=0.96, prop_var=0.96) -> p 2.235280084059189e-75)
    expectRelClose(proportionTest(60, 100, 0.96), 1.5279450001964013e-29, 1e-9);
  });

  it('uses the exact test when p0 = 0 or p0 = 1', () => {
    // scipy 1.10.1: binomtest(1, 50, 0.0).pvalue -> 0.0
    expect(proportionTest(1, 50, 0)).toBe(0);
    // scipy 1.10.1: binomtest(0, 50, 0.0).pvalue -> 1.0
    expect(proportionTest(0, 50, 0)).toBe(1);
    // scipy 1.10.1: binomtest(49, 50, 1.0).pvalue -> 0.0
    expect(proportionTest(49, 50, 1)).toBe(0);
    // scipy 1.10.1: binomtest(50, 50, 1.0).pvalue -> 1.0
    expect(proportionTest(50, 50, 1)).toBe(1);
  });

  it('rounds weighted x and n to integers in the exact branch', () => {
    // documented rounding: x = 2.4 -> 2, n = 30.6 -> 31 (n·p0 = 3.06 < 5)
    // scipy 1.10.1: binomtest(2, 31, 0.1).pvalue -> 0.7647552389542022
    expectClose(proportionTest(2.4, 30.6, 0.1), 0.7647552389542022, LIBRARY);
    // documented rounding: x = 0.4 -> 0, n = 7.6 -> 8; scipy 1.10.1: binomtest(0, 8, 0.0).pvalue -> 1.0
    expect(proportionTest(0.4, 7.6, 0)).toBe(1);
    // documented rounding: x = 0.6 -> 1, n = 7.6 -> 8; scipy 1.10.1: binomtest(1, 8, 0.0).pvalue -> 0.0
    expect(proportionTest(0.6, 7.6, 0)).toBe(0);
  });
});

describe('proportionTest: degenerate input', () => {
  it('returns 1 when n <= 0', () => {
    // contract (this module): no data, no evidence against H0
    expect(proportionTest(0, 0, 0.3)).toBe(1);
    expect(proportionTest(0, -2, 0.3)).toBe(1);
  });

  it('returns values in [0, 1]', () => {
    // contract (this module): p-values are probabilities
    for (const [x, n, p0] of [[0, 1000, 0.5], [1000, 1000, 0.5], [0.3, 2.2, 0.9], [17, 40, 0.42]]) {
      const p = proportionTest(x, n, p0);
      expect(p).toBeGreaterThanOrEqual(0);
      expect(p).toBeLessThanOrEqual(1);
    }
  });

  it('rejects NaN and out-of-range values', () => {
    // contract (this module): RangeError with the function and argument named
    expect(() => proportionTest(Number.NaN, 10, 0.5)).toThrow(/proportionTest: x must be a finite number, got NaN/);
    expect(() => proportionTest(1, Number.NaN, 0.5)).toThrow(/proportionTest: n must be a finite number, got NaN/);
    expect(() => proportionTest(1, 10, Number.NaN)).toThrow(/proportionTest: p0 must be a number in \[0, 1\], got NaN/);
    expect(() => proportionTest(1, 10, -0.1)).toThrow(RangeError);
    expect(() => proportionTest(12, 10, 0.5)).toThrow(RangeError);
  });
});
