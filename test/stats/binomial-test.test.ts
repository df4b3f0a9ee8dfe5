import { describe, it, expect } from 'vitest';
import { binomialTestTwoSided } from '../../src/stats/binomial-test.js';
import { expectClose, expectRelClose } from './expect-close.js';

const LIBRARY = 1e-9; // same "minlike" definition as scipy, so agreement is to rounding

describe('binomialTestTwoSided: scipy 1.10.1 binomtest(k, n, p).pvalue', () => {
  it.each([
    [682, 925, 0.75, 0.38249155957485176], // binomtest(682, 925, 0.75).pvalue -> 0.38249155957485176 (also R ?binom.test example: 0.3825)
    [3, 10, 0.5, 0.34375], // binomtest(3, 10, 0.5).pvalue -> 0.34375
    [3, 10, 0.1, 0.0701908264], // binomtest(3, 10, 0.1).pvalue -> 0.0701908264
    [0, 10, 0.1, 0.6125795109999999], // binomtest(0, 10, 0.1).pvalue -> 0.6125795109999999
    [7, 20, 0.1, 0.002386089408966118], // binomtest(7, 20, 0.1).pvalue -> 0.002386089408966118
    [1, 40, 0.1, 0.1799901199800285], // binomtest(1, 40, 0.1).pvalue -> 0.1799901199800285
    [2, 10, 0.3, 0.7331720679999996], // binomtest(2, 10, 0.3).pvalue -> 0.7331720679999996
    [10, 10, 0.5, 0.001953125], // binomtest(10, 10, 0.5).pvalue -> 0.001953125
    [5, 5, 0.5, 0.0625], // binomtest(5, 5, 0.5).pvalue -> 0.0625
    [4, 100, 0.01, 0.018374036444649678], // binomtest(4, 100, 0.01).pvalue -> 0.018374036444649678
    [0, 50, 0.02, 0.6283982856253909], // binomtest(0, 50, 0.02).pvalue -> 0.6283982856253909
    [1, 8, 0.05, 0.3365795687109375], // binomtest(1, 8, 0.05).pvalue -> 0.3365795687109375
    [0, 8, 0.05, 1], // binomtest(0, 8, 0.05).pvalue -> 1.0
    [48, 50, 0.95, 1], // binomtest(48, 50, 0.95).pvalue -> 1.0
    [50, 100, 0.5, 1], // binomtest(50, 100, 0.5).pvalue -> 1.0 (x equals n·p0)
    [3, 1000, 0.001, 0.080209342840201], // binomtest(3, 1000, 0.001).pvalue -> 0.080209342840201
    [2, 1000000, 0.000001, 0.26424111765708447], // binomtest(2, 1000000, 1e-06).pvalue -> 0.26424111765708447
  ])('binomtest(%i, %i, %f) -> %f', (x, n, p0, expected) => {
    expectClose(binomialTestTwoSided(x, n, p0), expected, LIBRARY);
  });

  it('keeps relative accuracy for tiny p-values (upper and lower tails)', () => {
    // scipy 1.10.1: binomtest(9, 10, 0.3).pvalue -> 0.00014368589999999996
    expectRelClose(binomialTestTwoSided(9, 10, 0.3), 0.00014368589999999996, 1e-9);
    // scipy 1.10.1: binomtest(60, 100, 0.96).pvalue -> 1.5279450001964013e-29
    expectRelClose(binomialTestTwoSided(60, 100, 0.96), 1.5279450001964013e-29, 1e-9);
    // scipy 1.10.1: binomtest(40, 100, 0.04).pvalue -> 1.527945000196346e-29
    expectRelClose(binomialTestTwoSided(40, 100, 0.04), 1.527945000196346e-29, 1e-9);
  });
});

describe('binomialTestTwoSided: degenerate input', () => {
  it('p0 = 0 and p0 = 1 give 1 for the only possible outcome and 0 otherwise', () => {
    // scipy 1.10.1: binomtest(0, 50, 0.0).pvalue -> 1.0
    expect(binomialTestTwoSided(0, 50, 0)).toBe(1);
    // scipy 1.10.1: binomtest(1, 50, 0.0).pvalue -> 0.0
    expect(binomialTestTwoSided(1, 50, 0)).toBe(0);
    // scipy 1.10.1: binomtest(50, 50, 1.0).pvalue -> 1.0
    expect(binomialTestTwoSided(50, 50, 1)).toBe(1);
    // scipy 1.10.1: binomtest(49, 50, 1.0).pvalue -> 0.0
    expect(binomialTestTwoSided(49, 50, 1)).toBe(0);
  });

  it('n = 0 gives 1 (no data, no evidence)', () => {
    // contract (this module); scipy 1.10.1 binomtest(0, 0, 0.3) raises "n must be an integer not less than 1"
    expect(binomialTestTwoSided(0, 0, 0.3)).toBe(1);
  });

  it('is symmetric under x -> n − x, p0 -> 1 − p0', () => {
    // property of the binomial distribution: X ~ Bin(n, p) <=> n − X ~ Bin(n, 1 − p)
    expectClose(binomialTestTwoSided(7, 20, 0.1), binomialTestTwoSided(13, 20, 0.9), 1e-12);
  });

  it('rejects NaN, non-integers and out-of-range values', () => {
    // contract (this module): RangeError with the function and argument named
    expect(() => binomialTestTwoSided(Number.NaN, 10, 0.5)).toThrow(/binomialTestTwoSided: x must be a finite number, got NaN/);
    expect(() => binomialTestTwoSided(1, 10, Number.NaN)).toThrow(/p0 must be a number in \[0, 1\], got NaN/);
    expect(() => binomialTestTwoSided(1.5, 10, 0.5)).toThrow(/x must be an integer in \[0, n\]/);
    expect(() => binomialTestTwoSided(1, 10.5, 0.5)).toThrow(/n must be a non-negative integer/);
    expect(() => binomialTestTwoSided(11, 10, 0.5)).toThrow(RangeError);
    expect(() => binomialTestTwoSided(-1, 10, 0.5)).toThrow(RangeError);
    expect(() => binomialTestTwoSided(1, 10, 1.2)).toThrow(RangeError);
  });
});
