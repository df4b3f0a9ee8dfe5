import { describe, it, expect } from 'vitest';
import { normalCdf, normalQuantile, zForConfidence } from '../../src/stats/normal.js';
import { expectClose, expectRelClose } from './expect-close.js';

describe('zForConfidence', () => {
  it('matches scipy norm.isf(alpha / 2) for 90 %, 95 % and 99 %', () => {
    // scipy 1.10.1: scipy.stats.norm.isf((1 - 0.95) / 2) -> 1.959963984540054
    expectClose(zForConfidence(0.95), 1.959963984540054, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.isf((1 - 0.9) / 2) -> 1.6448536269514729
    expectClose(zForConfidence(0.9), 1.6448536269514729, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.isf((1 - 0.99) / 2) -> 2.5758293035489004
    expectClose(zForConfidence(0.99), 2.5758293035489004, 1e-15);
  });

  it('rejects confidence levels outside (0, 1) and NaN', () => {
    // contract (this module): RangeError for out-of-domain input
    expect(() => zForConfidence(1)).toThrow(RangeError);
    expect(() => zForConfidence(0)).toThrow(RangeError);
    expect(() => zForConfidence(95)).toThrow(/strictly between 0 and 1/);
    expect(() => zForConfidence(Number.NaN)).toThrow(/zForConfidence: confidence must be a number, got NaN/);
  });
});

describe('normalQuantile', () => {
  it('matches scipy norm.ppf in the centre and the tails', () => {
    // scipy 1.10.1: scipy.stats.norm.ppf(0.025) -> -1.9599639845400545
    expectClose(normalQuantile(0.025), -1.9599639845400545, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.ppf(0.975) -> 1.959963984540054
    expectClose(normalQuantile(0.975), 1.959963984540054, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.ppf(0.3) -> -0.5244005127080409
    expectClose(normalQuantile(0.3), -0.5244005127080409, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.ppf(0.1) -> -1.2815515655446004
    expectClose(normalQuantile(0.1), -1.2815515655446004, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.ppf(1e-10) -> -6.361340902404056
    expectRelClose(normalQuantile(1e-10), -6.361340902404056, 1e-14);
    // scipy 1.10.1: scipy.stats.norm.ppf(1e-20) -> -9.262340089798409
    expectRelClose(normalQuantile(1e-20), -9.262340089798409, 1e-14);
    // scipy 1.10.1: scipy.stats.norm.ppf(0.9999999999) -> 6.361340889697422
    // (1 - 1e-10 is not exactly representable; scipy and this module both see the rounded double)
    expectRelClose(normalQuantile(1 - 1e-10), 6.361340889697422, 1e-14);
  });

  it('returns 0 at p = 0.5 and ±Infinity at the ends', () => {
    // scipy 1.10.1: scipy.stats.norm.ppf(0.5) -> 0.0
    expect(normalQuantile(0.5)).toBe(0);
    // scipy 1.10.1: scipy.stats.norm.ppf(0) -> -inf
    expect(normalQuantile(0)).toBe(-Infinity);
    // scipy 1.10.1: scipy.stats.norm.ppf(1) -> inf
    expect(normalQuantile(1)).toBe(Infinity);
  });

  it('is the inverse of normalCdf', () => {
    // identity Φ(Φ⁻¹(p)) = p (definition of a quantile function)
    for (const p of [1e-12, 0.001, 0.2, 0.5, 0.8, 0.999]) expectRelClose(normalCdf(normalQuantile(p)), p, 1e-13);
  });

  it('rejects NaN and values outside [0, 1]', () => {
    // contract (this module): RangeError for out-of-domain input
    expect(() => normalQuantile(Number.NaN)).toThrow(/normalQuantile: p must be a number in \[0, 1\], got NaN/);
    expect(() => normalQuantile(-0.1)).toThrow(RangeError);
    expect(() => normalQuantile(1.1)).toThrow(RangeError);
  });
});

describe('normalCdf', () => {
  it('matches scipy norm.cdf', () => {
    // scipy 1.10.1: scipy.stats.norm.cdf(0) -> 0.5
    expect(normalCdf(0)).toBe(0.5);
    // scipy 1.10.1: scipy.stats.norm.cdf(-1.959963984540054) -> 0.025
    expectClose(normalCdf(-1.959963984540054), 0.025, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.cdf(1.5) -> 0.9331927987311419
    expectClose(normalCdf(1.5), 0.9331927987311419, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.cdf(3) -> 0.9986501019683699
    expectClose(normalCdf(3), 0.9986501019683699, 1e-15);
    // scipy 1.10.1: scipy.stats.norm.cdf(-5) -> 2.866515718791933e-07
    expectRelClose(normalCdf(-5), 2.866515718791933e-7, 1e-13);
    // scipy 1.10.1: scipy.stats.norm.cdf(-10) -> 7.61985302416047e-24
    expectRelClose(normalCdf(-10), 7.61985302416047e-24, 1e-13);
  });

  it('handles ±Infinity and rejects NaN', () => {
    // scipy 1.10.1: scipy.stats.norm.cdf(-inf) -> 0.0; scipy.stats.norm.cdf(inf) -> 1.0
    expect(normalCdf(-Infinity)).toBe(0);
    expect(normalCdf(Infinity)).toBe(1);
    // contract (this module): RangeError for NaN
    expect(() => normalCdf(Number.NaN)).toThrow(/normalCdf: x must be a number, got NaN/);
  });
});
