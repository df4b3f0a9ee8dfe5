import { describe, it, expect } from 'vitest';
import { brentRoot } from '../../src/stats/brent-root.js';
import { expectClose } from './expect-close.js';

describe('brentRoot: scipy 1.10.1 brentq(f, lo, hi, xtol=1e-15)', () => {
  it.each([
    ['x² − 2 on [0, 2]', (x: number) => x * x - 2, 0, 2, 1.414213562373095], // brentq(lambda x: x*x - 2, 0, 2, xtol=1e-15) -> 1.414213562373095
    ['cos x − x on [0, 1]', (x: number) => Math.cos(x) - x, 0, 1, 0.7390851332151607], // brentq(lambda x: math.cos(x) - x, 0, 1, xtol=1e-15) -> 0.7390851332151607
    ['x³ − 2x − 5 on [2, 3]', (x: number) => x ** 3 - 2 * x - 5, 2, 3, 2.094551481542327], // brentq(lambda x: x**3 - 2*x - 5, 2, 3, xtol=1e-15) -> 2.094551481542327
    ['eˣ − 1e-10 on [−30, 0]', (x: number) => Math.exp(x) - 1e-10, -30, 0, -23.025850929940457], // brentq(..., -30, 0, xtol=1e-18) -> -23.025850929940457 (= ln 1e-10)
  ])('%s', (_, f, lo, hi, expected) => {
    expectClose(brentRoot(f, lo, hi), expected, 4e-16 * Math.max(1, Math.abs(expected)));
    // the bracket may be given in either order
    expectClose(brentRoot(f, hi, lo), expected, 4e-16 * Math.max(1, Math.abs(expected)));
  });

  it('returns an end point that is already a root, and honours a tolerance', () => {
    // contract (this module)
    expect(brentRoot((x) => x - 1, 1, 5)).toBe(1);
    expect(brentRoot((x) => x - 5, 1, 5)).toBe(5);
    expect(Math.abs(brentRoot((x) => x * x - 2, 0, 2, 1e-3) - Math.SQRT2)).toBeLessThanOrEqual(2e-3);
  });

  it('rejects a bracket without a sign change', () => {
    // contract (this module): RangeError naming both function values
    expect(() => brentRoot((x) => x * x + 1, -1, 1)).toThrow(/brentRoot: f\(lo\) and f\(hi\) must have opposite signs/);
    expect(() => brentRoot(() => Number.NaN, -1, 1)).toThrow(RangeError);
  });
});
