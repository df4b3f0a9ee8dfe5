import { describe, it, expect } from 'vitest';
import { kishEffectiveN } from '../../src/stats/kish-effective-n.js';
import { expectClose } from './expect-close.js';

describe('kishEffectiveN', () => {
  it('equals the number of observations for equal weights', () => {
    // Kish 1965 Survey Sampling / Kish 1992 J. Off. Stat. 8:183: n_eff = (Σw)²/Σw²; ten weights of 1 -> 10²/10 = 10
    expect(kishEffectiveN(10, 10)).toBe(10);
    // same formula, ten weights of 0.5: Σw = 5, Σw² = 2.5 -> 25/2.5 = 10 (scale invariance)
    expect(kishEffectiveN(5, 2.5)).toBe(10);
  });

  it('shrinks for unequal weights', () => {
    // Kish 1965 formula by hand, weights (1, 2): Σw = 3, Σw² = 5 -> 9/5 = 1.8
    expectClose(kishEffectiveN(3, 5), 1.8, 1e-15);
    // Kish 1965 formula by hand, weights (1, 1, 1, 3): Σw = 6, Σw² = 12 -> 36/12 = 3
    expectClose(kishEffectiveN(6, 12), 3, 1e-15);
  });

  it('returns 0 when there are no weighted observations', () => {
    // contract (this module): 0 when sumW2 <= 0
    expect(kishEffectiveN(0, 0)).toBe(0);
    expect(kishEffectiveN(1, -1)).toBe(0);
  });

  it('does not overflow when (Σw)² exceeds the largest double but n does not', () => {
    // Kish 1965 formula by hand: Σw = 1e160, Σw² = 1e300 -> 1e320 / 1e300 = 1e20 (1e320 alone is not a double)
    expectClose(kishEffectiveN(1e160, 1e300), 1e20, 1e8);
    // one weight of 1e154: Σw = 1e154, Σw² = 1e308 -> n = 1
    expectClose(kishEffectiveN(1e154, 1e308), 1, 1e-12);
  });

  it('rejects NaN and infinite input', () => {
    // contract (this module): RangeError for NaN/infinite input
    expect(() => kishEffectiveN(Number.NaN, 1)).toThrow(/kishEffectiveN: sumW must be a finite number, got NaN/);
    expect(() => kishEffectiveN(1, Number.NaN)).toThrow(RangeError);
    expect(() => kishEffectiveN(Infinity, 1)).toThrow(RangeError);
  });
});
