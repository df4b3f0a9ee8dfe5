import { describe, expect, it } from 'vitest';
import {
  bytes,
  count,
  levelPercent,
  NULL_MARK,
  percent,
  plainNumber,
  points,
  pointsInterval,
  pValue,
  signedPoints,
} from '../../src/render/format.js';

describe('format', () => {
  it('shows fractions as points with one decimal', () => {
    expect(points(0.07)).toBe('7.0');
    expect(points(0.0833)).toBe('8.3');
    expect(points(0.0042, 2)).toBe('0.42');
    expect(points(-0.0001)).toBe('0.0'); // no "-0.0"
  });

  it('signs gaps with ASCII + and -', () => {
    expect(signedPoints(0.07)).toBe('+7.0');
    expect(signedPoints(-0.005)).toBe('-0.5');
    expect(signedPoints(0)).toBe('0.0');
    expect(signedPoints(0.0001)).toBe('0.0');
  });

  it('shows percentages, intervals and levels', () => {
    expect(percent(0.25)).toBe('25.0%');
    expect(pointsInterval(0.044, 0.052)).toBe('[4.4, 5.2]');
    expect(pointsInterval(-0.009, 0.017, true)).toBe('[-0.9, +1.7]');
    expect(levelPercent(0.95)).toBe('95%');
    expect(levelPercent(0.995)).toBe('99.5%');
  });

  it('shows p-values with three decimals and <0.001 below', () => {
    expect(pValue(0.0004)).toBe('<0.001');
    expect(pValue(0.032)).toBe('0.032');
    expect(pValue(1)).toBe('1.000');
  });

  it('groups thousands in counts', () => {
    expect(count(0)).toBe('0');
    expect(count(999)).toBe('999');
    expect(count(12345)).toBe('12,345');
    expect(count(1234567)).toBe('1,234,567');
  });

  it('shows file sizes in decimal units', () => {
    expect(bytes(512)).toBe('512 B');
    expect(bytes(1_482_113)).toBe('1.5 MB');
    expect(bytes(999_999)).toBe('1.0 MB');
  });

  it('shows — for null and non-finite values, and an empty string in machine output', () => {
    for (const f of [points, signedPoints, percent, pValue, count, bytes]) {
      expect(f(null)).toBe(NULL_MARK);
      expect(f(Number.NaN)).toBe(NULL_MARK);
    }
    expect(pointsInterval(null, 0.1)).toBe(NULL_MARK);
    expect(plainNumber(Number.POSITIVE_INFINITY)).toBe('');
    expect(plainNumber(-0.5)).toBe('-0.5');
  });
});
