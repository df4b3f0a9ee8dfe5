/**
 * MOVER limits for linear combinations of independent proportions (Zou & Donner 2008) and the
 * p-value that inverts them. Reference values: Newcombe 1998's Table II (two proportions, where MOVER
 * with Wilson limits is his method 10), statsmodels 0.13.5 / scipy 1.10.1 under Debian's python3
 * (script in each comment), and the score test the Wilson interval inverts.
 */
import { describe, expect, it } from 'vitest';
import { moverInterval, moverLimits, moverPValue } from '../../src/stats/mover-interval.js';
import { newcombeInterval } from '../../src/stats/newcombe-interval.js';
import { proportionTest } from '../../src/stats/proportion-test.js';
import { expectClose } from './expect-close.js';

const PUBLISHED = 1e-4; // published values are printed to 4 decimals
const LIBRARY = 1e-9; // the same formula as the reference computation: agreement to rounding
const ROOT = 1e-7; // a p-value found by root finding on both sides

/** Wilson limits per term from statsmodels, combined by Zou & Donner 2008 eqs. 6–7 in Python:
 *  def mover(terms, alpha, offset=0):
 *    for c, x, n in terms: lo, hi = proportion_confint(x, n, alpha=alpha, method='wilson'); ... */
describe('moverInterval', () => {
  it.each([
    [56, 70, 48, 80, 0.0524, 0.3339], // Newcombe 1998, Stat Med 17:873, Table II, example (a), method 10: 0.0524, 0.3339
    [9, 10, 3, 10, 0.1705, 0.809], // Newcombe 1998, Table II, example (b), method 10: 0.1705, 0.8090
    [5, 56, 0, 29, -0.0381, 0.1926], // Newcombe 1998, Table II, 5/56 − 0/29, method 10: −0.0381, 0.1926
  ])('two proportions %i/%i − %i/%i: Newcombe method 10 -> %f to %f', (x1, n1, x2, n2, lo, hi) => {
    const ci = moverInterval([
      { coef: 1, x: x1, n: n1 },
      { coef: -1, x: x2, n: n2 },
    ]);
    expectClose(ci?.lo, lo, PUBLISHED);
    expectClose(ci?.hi, hi, PUBLISHED);
  });

  it('a difference of two differences: (40/120 − 20/110) − (30/300 − 25/280)', () => {
    const terms = [
      { coef: 1, x: 40, n: 120 },
      { coef: -1, x: 20, n: 110 },
      { coef: -1, x: 30, n: 300 },
      { coef: 1, x: 25, n: 280 },
    ];
    // mover(T, 0.05) -> (0.017521010083503014, 0.2586927866318214, 0.14080086580086576)
    const ci95 = moverInterval(terms, 0.95)!;
    expectClose(ci95.lo, 0.017521010083503014, LIBRARY);
    expectClose(ci95.hi, 0.2586927866318214, LIBRARY);
    // mover(T, 0.10) -> (0.037642423611675815, 0.24012623086183654, ...)
    const ci90 = moverInterval(terms, 0.9)!;
    expectClose(ci90.lo, 0.037642423611675815, LIBRARY);
    expectClose(ci90.hi, 0.24012623086183654, LIBRARY);
  });

  it('fractional (weighted) counts, fractional coefficients and a constant', () => {
    const terms = [
      { coef: 1, x: 12.5, n: 40.2 },
      { coef: -0.3, x: 3.1, n: 60.7 },
      { coef: -0.7, x: 9.9, n: 80.4 },
    ];
    // mover(T2, 0.05, -0.05) -> (0.02055491056129946, 0.31867322996162295, 0.15942999172178646)
    const ci = moverInterval(terms, 0.95, -0.05)!;
    expectClose(ci.lo, 0.02055491056129946, LIBRARY);
    expectClose(ci.hi, 0.31867322996162295, LIBRARY);
  });

  it('equals newcombeInterval for two terms at any level, and is null without rows', () => {
    for (const c of [0.8, 0.95, 0.999]) {
      const a = moverInterval([
        { coef: 1, x: 9, n: 10 },
        { coef: -1, x: 3, n: 10 },
      ], c)!;
      const b = newcombeInterval(9, 10, 3, 10, c)!;
      expectClose(a.lo, b.lo, 1e-15); // property: both are Newcombe 1998 method 10
      expectClose(a.hi, b.hi, 1e-15);
    }
    expect(moverInterval([{ coef: 1, x: 0, n: 0 }])).toBeNull();
    expect(() => moverInterval([{ coef: 1, x: 5, n: 4 }])).toThrow(RangeError);
  });

  it('moverLimits: a coefficient of 0 adds nothing, a negative one swaps the sides', () => {
    // hand arithmetic on invented limits: 2·0.5 − 1·0.2 = 0.8; down √(4·0.1² + 0.05²), up √(4·0.2² + 0.1²)
    const ci = moverLimits([
      { coef: 2, value: 0.5, lo: 0.4, hi: 0.7 },
      { coef: -1, value: 0.2, lo: 0.1, hi: 0.25 },
      { coef: 0, value: 0.9, lo: 0, hi: 1 },
    ]);
    expectClose(ci.lo, 0.8 - Math.sqrt(0.04 + 0.0025), 1e-15);
    expectClose(ci.hi, 0.8 + Math.sqrt(0.16 + 0.01), 1e-15);
  });
});

describe('moverPValue', () => {
  it('one proportion against a constant is the score test the Wilson interval inverts', () => {
    // statsmodels proportions_ztest(30, 100, value=0.2, prop_var=0.2) -> (2.4999999999999996, 0.012419330651552277)
    expectClose(moverPValue([{ coef: 1, x: 30, n: 100 }], -0.2), 0.012419330651552277, 1e-10);
    // the same as floorgap's own score test (proportionTest's score branch)
    expectClose(moverPValue([{ coef: 1, x: 30, n: 100 }], -0.2), proportionTest(30, 100, 0.2), 1e-10);
  });

  it('two proportions: Newcombe method 10 inverted with statsmodels and scipy', () => {
    // brentq(lambda a: confint_proportions_2indep(56, 70, 48, 80, method='newcomb', compare='diff', alpha=a)[0], 1e-12, 0.5) -> 0.00813314035860681
    expectClose(moverPValue([
      { coef: 1, x: 56, n: 70 },
      { coef: -1, x: 48, n: 80 },
    ]), 0.00813314035860681, ROOT);
  });

  it('four proportions and a weighted combination, inverted with scipy', () => {
    // brentq(lambda a: mover(T, a)[0], 1e-12, 0.999) -> 0.025528265701993468
    const four = [
      { coef: 1, x: 40, n: 120 },
      { coef: -1, x: 20, n: 110 },
      { coef: -1, x: 30, n: 300 },
      { coef: 1, x: 25, n: 280 },
    ];
    expectClose(moverPValue(four), 0.025528265701993468, ROOT);
    // brentq(lambda a: mover(T2, a, -0.05)[0], 1e-12, 0.999) -> 0.022143587864601424
    const frac = [
      { coef: 1, x: 12.5, n: 40.2 },
      { coef: -0.3, x: 3.1, n: 60.7 },
      { coef: -0.7, x: 9.9, n: 80.4 },
    ];
    expectClose(moverPValue(frac, -0.05), 0.022143587864601424, ROOT);
  });

  it('the interval at confidence 1 − p has an end at 0; a negative estimate mirrors; 0 gives 1', () => {
    const terms = [
      { coef: -1, x: 40, n: 120 },
      { coef: 1, x: 20, n: 110 },
    ];
    const p = moverPValue(terms)!;
    const ci = moverInterval(terms, 1 - p)!;
    expectClose(ci.hi, 0, 1e-9); // property of the inversion
    expect(moverPValue([
      { coef: 1, x: 5, n: 10 },
      { coef: -1, x: 10, n: 20 },
    ])).toBe(1);
    expect(moverPValue([{ coef: 1, x: 3, n: 0 }])).toBeNull();
  });
});
