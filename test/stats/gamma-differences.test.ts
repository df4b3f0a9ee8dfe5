import { describe, it, expect } from 'vitest';
import gammaln from '@stdlib/math-base-special-gammaln';
import { digammaDifference, lnGammaDifference } from '../../src/stats/gamma-differences.js';
import { expectRelClose } from './expect-close.js';

const PRECISE = 1e-14; // relative, against 40-digit mpmath values

describe('lnGammaDifference: mpmath 1.2.1 (mp.dps = 40) loggamma(a + d) − loggamma(a)', () => {
  it.each([
    [1, 3, 1.791759469228055], // loggamma(4) − loggamma(1) -> 1.791759469228055 (= ln 6)
    [0.5, 0.5, -0.57236494292470009], // -> -0.57236494292470009 (= −ln √π)
    [1e-6, 7, -7.2362568959549188], // -> -7.2362568959549188
    [3.7, 12.25, 26.334229094753439], // -> 26.334229094753439
    [25, 0.001, 0.0031987629179060618], // -> 0.0031987629179060618 (scipy gammaln difference: 0.0031987629179042187)
    [1e8, 3, 55.262042261857096], // -> 55.262042261857096 (scipy gammaln difference: 55.26204228401184)
    [1e8, 2.5, 46.051701878630914], // -> 46.051701878630914 (scipy gammaln difference: 46.05170178413391)
    [0.3, 1e5, 1051290.0670522516], // -> 1051290.0670522516
    [19.999, 40, 145.19282919292821], // -> 145.19282919292821 (crosses the shift threshold 20)
  ])('a = %f, d = %f -> %f', (a, d, expected) => {
    expectRelClose(lnGammaDifference(a, d), expected, PRECISE);
  });

  it('is 0 for d = 0 and keeps precision where subtracting gammaln does not', () => {
    // definition: lnΓ(a) − lnΓ(a) = 0
    expect(lnGammaDifference(3.5, 0)).toBe(0);
    // @stdlib/math-base-special-gammaln 0.3.1: gammaln(1e8 + 3) - gammaln(1e8) -> 55.26204228401184,
    // off by 2.2e-8 from the mpmath value 55.262042261857096 (see above); the series difference is not
    const naive = gammaln(1e8 + 3) - gammaln(1e8);
    expect(Math.abs(naive - 55.262042261857096)).toBeGreaterThan(1e-10);
    expectRelClose(lnGammaDifference(1e8, 3), 55.262042261857096, PRECISE);
  });

  it('rejects NaN, a ≤ 0 and d < 0', () => {
    // contract (this module): RangeError naming the function and the argument
    expect(() => lnGammaDifference(Number.NaN, 1)).toThrow(/lnGammaDifference: a must be a finite number, got NaN/);
    expect(() => lnGammaDifference(0, 1)).toThrow(/lnGammaDifference: a must be > 0, got 0/);
    expect(() => lnGammaDifference(1, -1)).toThrow(/lnGammaDifference: d must be >= 0, got -1/);
  });
});

describe('digammaDifference: mpmath 1.2.1 (mp.dps = 40) digamma(a + d) − digamma(a)', () => {
  it.each([
    [1, 3, 1.8333333333333333], // -> 1.8333333333333333 (= 1 + 1/2 + 1/3)
    [0.5, 0.5, 1.3862943611198906], // -> 1.3862943611198906 (= 2 ln 2)
    [1e-6, 7, 1000002.4499985087], // -> 1000002.4499985087
    [3.7, 12.25, 1.5706298910902259], // -> 1.5706298910902259
    [25, 0.001, 4.0809830640213115e-5], // -> 4.0809830640213115e-5 (scipy digamma difference: 4.0809830640142764e-05)
    [1e8, 3, 2.9999999700000005e-8], // -> 2.9999999700000005e-8 (scipy digamma difference: 2.999999892949745e-08)
    [1e8, 2.5, 2.4999999812500002e-8], // -> 2.4999999812500002e-8 (scipy digamma difference: 2.4999998515795596e-08)
    [0.3, 1e5, 15.015447687172528], // -> 15.015447687172528
    [19.999, 40, 1.1154985548100884], // -> 1.1154985548100884
  ])('a = %f, d = %f -> %f', (a, d, expected) => {
    expectRelClose(digammaDifference(a, d), expected, PRECISE);
  });

  it('is 0 for d = 0 and rejects bad input', () => {
    // definition: ψ(a) − ψ(a) = 0; contract (this module): RangeError for NaN, a ≤ 0, d < 0
    expect(digammaDifference(2, 0)).toBe(0);
    expect(() => digammaDifference(1, Number.NaN)).toThrow(/digammaDifference: d must be a finite number, got NaN/);
    expect(() => digammaDifference(-1, 1)).toThrow(/digammaDifference: a must be > 0/);
    expect(() => digammaDifference(1, -0.5)).toThrow(/digammaDifference: d must be >= 0/);
  });
});
