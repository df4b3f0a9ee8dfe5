import { describe, it, expect } from 'vitest';
import { wilsonInterval } from '../../src/stats/wilson-interval.js';
import { expectClose } from './expect-close.js';

const PUBLISHED = 1e-4; // published values are printed to 4 decimals
const LIBRARY = 1e-9; // same formula as statsmodels, so agreement is to rounding

describe('wilsonInterval: published values', () => {
  // Newcombe 1998, Stat Med 17:857, Table II, method 3 (score interval without continuity
  // correction); the same as R prop.test(x, n, correct = FALSE)$conf.int.
  it.each([
    [81, 263, 0.2553, 0.3662], // Newcombe 1998 (17:857) Table II, 81/263, method 3: 0.2553, 0.3662
    [15, 148, 0.0624, 0.1605], // Newcombe 1998 (17:857) Table II, 15/148, method 3: 0.0624, 0.1605
    [0, 20, 0, 0.1611], // Newcombe 1998 (17:857) Table II, 0/20, method 3: 0, 0.1611
    [1, 29, 0.0061, 0.1718], // Newcombe 1998 (17:857) Table II, 1/29, method 3: 0.0061, 0.1718
  ])('%i/%i at 95 %% -> %f to %f', (x, n, lo, hi) => {
    const ci = wilsonInterval(x, n);
    expectClose(ci?.lo, lo, PUBLISHED);
    expectClose(ci?.hi, hi, PUBLISHED);
  });
});

describe('wilsonInterval: statsmodels 0.13.5 proportion_confint(..., method="wilson")', () => {
  it.each([
    // proportion_confint(81, 263, alpha=0.05, method='wilson') -> (0.2552885198782742, 0.36620957698280004)
    [81, 263, 0.95, 0.2552885198782742, 0.36620957698280004],
    // proportion_confint(15, 148, alpha=0.05, method='wilson') -> (0.06238639953073628, 0.16048724172330803)
    [15, 148, 0.95, 0.06238639953073628, 0.16048724172330803],
    // proportion_confint(1, 29, alpha=0.05, method='wilson') -> (0.006113214292762667, 0.17175521879320294)
    [1, 29, 0.95, 0.006113214292762667, 0.17175521879320294],
    // proportion_confint(81, 263, alpha=0.1, method='wilson') -> (0.2633136171884814, 0.35656634960848815)
    [81, 263, 0.9, 0.2633136171884814, 0.35656634960848815],
    // proportion_confint(81, 263, alpha=0.01, method='wilson') -> (0.24013690268760773, 0.38528250231822986)
    [81, 263, 0.99, 0.24013690268760773, 0.38528250231822986],
    // weighted (non-integer) counts, x = p̂·n_eff:
    // proportion_confint(12.5, 37.25, alpha=0.05, method='wilson') -> (0.20575234780966944, 0.4961321714658846)
    [12.5, 37.25, 0.95, 0.20575234780966944, 0.4961321714658846],
    // proportion_confint(3.7, 9.3, alpha=0.1, method='wilson') -> (0.18737930236424188, 0.6543604733264736)
    [3.7, 9.3, 0.9, 0.18737930236424188, 0.6543604733264736],
    // proportion_confint(0.4, 2.6, alpha=0.05, method='wilson') -> (0.013511801625282593, 0.7070483928733242)
    [0.4, 2.6, 0.95, 0.013511801625282593, 0.7070483928733242],
  ])('x=%f n=%f confidence=%f', (x, n, confidence, lo, hi) => {
    const ci = wilsonInterval(x, n, confidence);
    expectClose(ci?.lo, lo, LIBRARY);
    expectClose(ci?.hi, hi, LIBRARY);
  });
});

describe('wilsonInterval: edges and degenerate input', () => {
  it('x = 0 gives lo exactly 0', () => {
    // statsmodels 0.13.5: proportion_confint(0, 20, alpha=0.05, method='wilson') -> (0.0, 0.1611251580528194)
    const ci = wilsonInterval(0, 20);
    expect(ci?.lo).toBe(0);
    expectClose(ci?.hi, 0.1611251580528194, LIBRARY);
  });

  it('x = n gives hi exactly 1', () => {
    // statsmodels 0.13.5: proportion_confint(20, 20, alpha=0.05, method='wilson') -> (0.8388748419471804, 0.9999999999999999)
    const ci = wilsonInterval(20, 20);
    expectClose(ci?.lo, 0.8388748419471804, LIBRARY);
    expect(ci?.hi).toBe(1);
    // statsmodels 0.13.5: proportion_confint(50, 50, alpha=0.01, method='wilson') -> (0.882847908282372, 1.0)
    const ci99 = wilsonInterval(50, 50, 0.99);
    expectClose(ci99?.lo, 0.882847908282372, LIBRARY);
    expect(ci99?.hi).toBe(1);
  });

  it('returns null when n <= 0', () => {
    // contract (this module): no data -> no interval
    expect(wilsonInterval(0, 0)).toBeNull();
    expect(wilsonInterval(0, -3)).toBeNull();
  });

  it('treats a weighted count a rounding error above n as n', () => {
    // contract (this module, validate-input.checkCount): |x − n| ≤ 1e-9·n is clamped
    // statsmodels 0.13.5: proportion_confint(8, 8, alpha=0.05, method='wilson') lower bound is the
    // same as for x = 8.000000000001 to 1e-9: -> (0.6755924351162885, 1.0)
    const ci = wilsonInterval(8.000000000001, 8);
    expectClose(ci?.lo, 0.6755924351162885, LIBRARY);
    expect(ci?.hi).toBe(1);
  });

  it('nests 90 % inside 95 % inside 99 % and contains p̂', () => {
    // property of the Wilson interval (Wilson 1927): width increases with z
    const c90 = wilsonInterval(7, 31, 0.9)!;
    const c95 = wilsonInterval(7, 31, 0.95)!;
    const c99 = wilsonInterval(7, 31, 0.99)!;
    expect(c99.lo).toBeLessThan(c95.lo);
    expect(c95.lo).toBeLessThan(c90.lo);
    expect(c90.lo).toBeLessThan(7 / 31);
    expect(c90.hi).toBeGreaterThan(7 / 31);
    expect(c90.hi).toBeLessThan(c95.hi);
    expect(c95.hi).toBeLessThan(c99.hi);
  });

  it('rejects NaN, infinite, out-of-range x and bad confidence', () => {
    // contract (this module): RangeError with the function and argument named
    expect(() => wilsonInterval(Number.NaN, 10)).toThrow(/wilsonInterval: x must be a finite number, got NaN/);
    expect(() => wilsonInterval(1, Number.NaN)).toThrow(/wilsonInterval: n must be a finite number, got NaN/);
    expect(() => wilsonInterval(1, Infinity)).toThrow(RangeError);
    expect(() => wilsonInterval(11, 10)).toThrow(/x must be in \[0, n\] = \[0, 10\], got 11/);
    expect(() => wilsonInterval(-1, 10)).toThrow(RangeError);
    expect(() => wilsonInterval(1, 10, 1)).toThrow(RangeError);
    expect(() => wilsonInterval(1, 10, Number.NaN)).toThrow(RangeError);
    expect(() => wilsonInterval(0, 0, 2)).toThrow(RangeError); // bad confidence rejected even without data
  });
});
