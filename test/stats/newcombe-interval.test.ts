import { describe, it, expect } from 'vitest';
import { newcombeInterval } from '../../src/stats/newcombe-interval.js';
import { expectClose } from './expect-close.js';

const PUBLISHED = 1e-4; // published values are printed to 4 decimals
const LIBRARY = 1e-9; // same formula as statsmodels, so agreement is to rounding

describe('newcombeInterval: published values', () => {
  it.each([
    [56, 70, 48, 80, 0.0524, 0.3339], // Newcombe 1998, Stat Med 17:873, Table II, example (a) 56/70 − 48/80, method 10: 0.0524, 0.3339
    [9, 10, 3, 10, 0.1705, 0.809], // Newcombe 1998, Stat Med 17:873, Table II, example (b) 9/10 − 3/10, method 10: 0.1705, 0.8090
    [5, 56, 0, 29, -0.0381, 0.1926], // Newcombe 1998, Stat Med 17:873, Table II, 5/56 − 0/29, method 10: −0.0381, 0.1926
    [0, 10, 0, 20, -0.1611, 0.2775], // Newcombe 1998, Stat Med 17:873, Table II, 0/10 − 0/20, method 10: −0.1611, 0.2775
  ])('%i/%i − %i/%i at 95 %% -> %f to %f', (x1, n1, x2, n2, lo, hi) => {
    const ci = newcombeInterval(x1, n1, x2, n2);
    expectClose(ci?.lo, lo, PUBLISHED);
    expectClose(ci?.hi, hi, PUBLISHED);
  });
});

describe('newcombeInterval: statsmodels 0.13.5 confint_proportions_2indep(..., method="newcomb", compare="diff")', () => {
  it.each([
    // confint_proportions_2indep(56, 70, 48, 80, method='newcomb', compare='diff', alpha=0.05) -> (0.05243147240236498, 0.33387265403690614)
    [56, 70, 48, 80, 0.95, 0.05243147240236498, 0.33387265403690614],
    // confint_proportions_2indep(9, 10, 3, 10, method='newcomb', compare='diff', alpha=0.05) -> (0.1705227239345029, 0.809017973535488)
    [9, 10, 3, 10, 0.95, 0.1705227239345029, 0.809017973535488],
    // confint_proportions_2indep(5, 56, 0, 29, method='newcomb', compare='diff', alpha=0.05) -> (-0.038137147903536936, 0.19256001385511165)
    [5, 56, 0, 29, 0.95, -0.038137147903536936, 0.19256001385511165],
    // confint_proportions_2indep(0, 10, 0, 20, method='newcomb', compare='diff', alpha=0.05) -> (-0.1611251580528194, 0.27753279986288926)
    [0, 10, 0, 20, 0.95, -0.1611251580528194, 0.27753279986288926],
    // confint_proportions_2indep(56, 70, 48, 80, method='newcomb', compare='diff', alpha=0.1) -> (0.07656419154407207, 0.31364458358294384)
    [56, 70, 48, 80, 0.9, 0.07656419154407207, 0.31364458358294384],
    // confint_proportions_2indep(56, 70, 48, 80, method='newcomb', compare='diff', alpha=0.01) -> (0.005370869250078403, 0.3718084317757736)
    [56, 70, 48, 80, 0.99, 0.005370869250078403, 0.3718084317757736],
    // weighted (non-integer) counts:
    // confint_proportions_2indep(12.3, 40.7, 5.5, 33.2, method='newcomb', compare='diff', alpha=0.05) -> (-0.06223252648294644, 0.3140360623570558)
    [12.3, 40.7, 5.5, 33.2, 0.95, -0.06223252648294644, 0.3140360623570558],
    // confint_proportions_2indep(10, 10, 0, 20, method='newcomb', compare='diff', alpha=0.05) -> (0.6790860371419145, 1.0)
    [10, 10, 0, 20, 0.95, 0.6790860371419145, 1],
  ])('%f/%f − %f/%f at confidence %f', (x1, n1, x2, n2, confidence, lo, hi) => {
    const ci = newcombeInterval(x1, n1, x2, n2, confidence);
    expectClose(ci?.lo, lo, LIBRARY);
    expectClose(ci?.hi, hi, LIBRARY);
  });
});

describe('newcombeInterval: properties and degenerate input', () => {
  it('swapping the samples negates the interval', () => {
    // property of Newcombe 1998 method 10 (the formula is symmetric under p1 <-> p2)
    const ab = newcombeInterval(56, 70, 48, 80)!;
    const ba = newcombeInterval(48, 80, 56, 70)!;
    expectClose(ba.lo, -ab.hi, 1e-15);
    expectClose(ba.hi, -ab.lo, 1e-15);
  });

  it('stays inside [−1, 1] at the extremes', () => {
    // statsmodels 0.13.5: confint_proportions_2indep(10, 10, 0, 10, method='newcomb', compare='diff', alpha=0.05)
    //   -> (0.6075093504305241, 1.0)
    const ci = newcombeInterval(10, 10, 0, 10)!;
    expect(ci.hi).toBe(1);
    expectClose(ci.lo, 0.6075093504305241, LIBRARY);
    // statsmodels 0.13.5: confint_proportions_2indep(0, 10, 10, 10, method='newcomb', compare='diff', alpha=0.05)
    //   mirror image of the call above -> (-1.0, -0.6075093504305241)
    const mirror = newcombeInterval(0, 10, 10, 10)!;
    expect(mirror.lo).toBe(-1);
    expectClose(mirror.hi, -0.6075093504305241, LIBRARY);
  });

  it('returns null when either sample is empty', () => {
    // contract (this module): null if n1 <= 0 or n2 <= 0
    expect(newcombeInterval(0, 0, 3, 10)).toBeNull();
    expect(newcombeInterval(3, 10, 0, 0)).toBeNull();
    expect(newcombeInterval(3, 10, 0, -1)).toBeNull();
  });

  it('rejects NaN, out-of-range counts and bad confidence', () => {
    // contract (this module): RangeError with the function and argument named
    expect(() => newcombeInterval(Number.NaN, 10, 1, 10)).toThrow(/newcombeInterval: x1 must be a finite number, got NaN/);
    expect(() => newcombeInterval(1, 10, 1, Number.NaN)).toThrow(/newcombeInterval: n2 must be a finite number, got NaN/);
    expect(() => newcombeInterval(1, 10, 11, 10)).toThrow(/newcombeInterval: x2 must be in \[0, n\]/);
    expect(() => newcombeInterval(1, 10, 1, 10, 0)).toThrow(RangeError);
    expect(() => newcombeInterval(1, 0, 1, 10, 1.5)).toThrow(RangeError);
  });
});
