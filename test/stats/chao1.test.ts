import { describe, expect, it } from 'vitest';
import { chao1 } from '../../src/stats/chao1.js';

describe('chao1 (bias-corrected Chao1 estimate of the number of classes)', () => {
  it('adds f1(f1 − 1) / (2(f2 + 1)) to the classes seen', () => {
    // hand arithmetic on invented numbers: 100 + 10·9 / (2·6) = 100 + 7.5
    expect(chao1(100, 10, 5)).toBe(107.5);
    // hand arithmetic: 40 + 12·11 / (2·4) = 40 + 16.5
    expect(chao1(40, 12, 3)).toBe(56.5);
  });

  it('is defined without doubletons (the bias-corrected form)', () => {
    // hand arithmetic: every class seen once, 3 + 3·2 / 2 = 6
    expect(chao1(3, 3, 0)).toBe(6);
  });

  it('equals the classes seen when none was seen once (the sample saw them all)', () => {
    // hand arithmetic: f1 = 0 adds nothing
    expect(chao1(25, 0, 4)).toBe(25);
    expect(chao1(0, 0, 0)).toBe(0);
  });

  it('rejects counts that cannot come from a sample', () => {
    expect(() => chao1(-1, 0, 0)).toThrow(RangeError);
    expect(() => chao1(5, 4, 2)).toThrow(/exceed distinct/);
    expect(() => chao1(Number.NaN, 0, 0)).toThrow(RangeError);
  });
});
