import { describe, expect, it } from 'vitest';
import { intervalPValue, moverPValue, newcombeInterval, tangoInterval, zForConfidence } from '../../src/stats/index.js';
import { expectClose } from './expect-close.js';

describe('intervalPValue', () => {
  it('inverts a Wald-like interval: estimate 2 standard errors from 0 gives 2Φ(−2)', () => {
    const p = intervalPValue(0.2, (level) => ({ lo: 0.2 - 0.1 * zForConfidence(level), hi: 0.2 + 0.1 * zForConfidence(level) }));
    // scipy 1.17.1: 2 * norm.sf(2) → 0.04550026389635839
    expectClose(p, 0.04550026389635839, 1e-10);
  });

  it("inverting Tango's interval at Δ = 0 gives Tango's score test, McNemar's statistic without correction", () => {
    const p = intervalPValue((20 - 12) / 300, (level) => tangoInterval(12, 20, 300, level));
    // scipy 1.17.1: chi2.sf((20 - 12)**2 / 32, 1) → 0.15729920705028105
    expectClose(p, 0.15729920705028105, 1e-9);
  });

  it("inverting Newcombe's interval gives moverPValue (the same interval, built from Wilson limits)", () => {
    const p = intervalPValue(56 / 70 - 48 / 80, (level) => newcombeInterval(56, 70, 48, 80, level));
    const mover = moverPValue([{ coef: 1, x: 56, n: 70 }, { coef: -1, x: 48, n: 80 }]);
    // moverPValue's own example (to 1e-4): 0.0081
    expectClose(p, mover!, 1e-9);
    expectClose(p, 0.0081, 1e-4);
  });

  it('an estimate of 0 gives 1, no interval gives null, a far estimate gives 0', () => {
    expect(intervalPValue(0, () => ({ lo: -1, hi: 1 }))).toBe(1);
    expect(intervalPValue(0.1, () => null)).toBeNull();
    // ends at 0.5 ± 0.001·z never reach 0 below z = 8: p below 2Φ(−8), given as 0
    expect(intervalPValue(0.5, (level) => ({ lo: 0.5 - 0.001 * zForConfidence(level), hi: 0.5 + 0.001 * zForConfidence(level) }))).toBe(0);
    expect(() => intervalPValue(Number.NaN, () => ({ lo: 0, hi: 1 }))).toThrow(RangeError);
  });
});
