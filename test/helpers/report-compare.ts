import { expect } from 'vitest';

/**
 * Differences between two JSON values: numbers may differ by `rel` relative (counts are whole numbers
 * and compare exactly whatever `rel` is, since equal integers differ by 0), everything else must be equal.
 * @returns one line per difference, with its path
 */
export function jsonDifferences(a: unknown, b: unknown, rel = 1e-9, path = ''): string[] {
  if (typeof a === 'number' && typeof b === 'number') {
    if (Number.isInteger(a) && Number.isInteger(b)) return a === b ? [] : [`${path}: ${a} ≠ ${b}`];
    return Math.abs(a - b) <= rel * Math.max(1, Math.abs(a), Math.abs(b)) ? [] : [`${path}: ${a} ≠ ${b}`];
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) return [`${path}: length ${a.length} ≠ ${b.length}`];
    return a.flatMap((x, i) => jsonDifferences(x, b[i], rel, `${path}[${i}]`));
  }
  if (a !== null && b !== null && typeof a === 'object' && typeof b === 'object') {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    return [...keys].flatMap((k) => jsonDifferences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], rel, `${path}.${k}`));
  }
  return Object.is(a, b) ? [] : [`${path}: ${JSON.stringify(a)} ≠ ${JSON.stringify(b)}`];
}

/**
 * Two floorgap JSON reports are the same report: every field but `source` (where the numbers came
 * from) equal, counts exactly, rates and sums to 1e-9 relative.
 */
export function expectSameReport(actualJson: string, expectedJson: string): void {
  const a = JSON.parse(actualJson) as Record<string, unknown>;
  const b = JSON.parse(expectedJson) as Record<string, unknown>;
  delete a.source;
  delete b.source;
  expect(jsonDifferences(a, b)).toEqual([]);
  expect((a.slices as unknown[]).length).toBeGreaterThan(0);
}
