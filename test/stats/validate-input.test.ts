import { describe, it, expect } from 'vitest';
import { assertFinite, assertNotNaN, assertProbability, checkCount } from '../../src/stats/validate-input.js';

// All expectations here are this module's own contract (input validation, no published method).
describe('validate-input', () => {
  it('assertFinite accepts finite numbers and rejects NaN and ±Infinity', () => {
    expect(() => assertFinite('f', 'a', 0)).not.toThrow(); // contract: finite accepted
    expect(() => assertFinite('f', 'a', Number.NaN)).toThrow(new RangeError('f: a must be a finite number, got NaN')); // contract
    expect(() => assertFinite('f', 'a', -Infinity)).toThrow(/got -Infinity/); // contract
  });

  it('assertNotNaN accepts ±Infinity and rejects NaN', () => {
    expect(() => assertNotNaN('f', 'a', Infinity)).not.toThrow(); // contract: infinities accepted
    expect(() => assertNotNaN('f', 'a', Number.NaN)).toThrow(new RangeError('f: a must be a number, got NaN')); // contract
  });

  it('assertProbability accepts [0, 1] only', () => {
    expect(() => assertProbability('f', 'p', 0)).not.toThrow(); // contract: closed interval
    expect(() => assertProbability('f', 'p', 1)).not.toThrow(); // contract: closed interval
    expect(() => assertProbability('f', 'p', 1.000001)).toThrow(new RangeError('f: p must be a number in [0, 1], got 1.000001')); // contract
    expect(() => assertProbability('f', 'p', Number.NaN)).toThrow(RangeError); // contract
  });

  it('checkCount clamps rounding noise and rejects real out-of-range counts', () => {
    expect(checkCount('f', 'x', 3.5, 10)).toBe(3.5); // contract: in range, unchanged
    expect(checkCount('f', 'x', 10 + 1e-12, 10)).toBe(10); // contract: within 1e-9·n above n -> n
    expect(checkCount('f', 'x', -1e-12, 10)).toBe(0); // contract: within 1e-9 below 0 -> 0
    expect(() => checkCount('f', 'x', 10.001, 10)).toThrow(new RangeError('f: x must be in [0, n] = [0, 10], got 10.001')); // contract
    expect(() => checkCount('f', 'x', Number.NaN, 10)).toThrow(/f: x must be a finite number, got NaN/); // contract
  });
});
