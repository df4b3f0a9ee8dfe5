/**
 * Discovered slices for `export`: a saved discovery's shape, its conditions against the input's cells,
 * and the reason beside each exported row. The documents and numbers are invented in the test; the
 * corpus's discovery-*.json files go through the CLI in test/e2e/bad-input.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { checkDiscovery, checkDiscoveryCells, checkDiscoveryColumns, discoveredReason, exportSlicesOf, type SavedDiscovery } from '../../src/app/discovered.js';
import type { CellTable } from '../../src/cells/cell-table.js';
import type { DiscoveredSlice } from '../../src/discover/types.js';
import { FloorgapError } from '../../src/core/errors.js';

const slice = (over: Record<string, unknown> = {}) => ({
  label: 'station=S2 · lighting=dome',
  rank: 1,
  conditions: { station: 'S2', lighting: 'dome' },
  part: 'bias',
  gaps: { avoidable_bias: { value: 0.123 }, variance: null, mismatch: null },
  lift: { value: 0.101, over: { station: 'S2' } },
  q: 0.0004,
  explained_by: [],
  ...over,
});
const doc = (slices: unknown[] = [slice()], more: Record<string, unknown> = {}) => ({ schema: 'floorgap.discover/1', settings: { depth: 2 }, run: null, slices, ...more });

function message(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(FloorgapError);
    return (e as Error).message;
  }
  throw new Error('expected a FloorgapError');
}

describe('checkDiscovery', () => {
  it('takes a discovery with the fields export reads, slices in their saved order', () => {
    const second = slice({ label: 'package=QFN', rank: 2, conditions: { package: 'QFN' } });
    expect(checkDiscovery('d.json', doc([slice(), second])).slices.map((s) => s.label)).toEqual(['station=S2 · lighting=dome', 'package=QFN']);
  });

  it('names the field that is wrong and what it holds', () => {
    const cases: [unknown, string][] = [
      [[], 'd.json: a JSON document (an array); expected a discovery saved with floorgap discover --format json (schema floorgap.discover/1)'],
      [{ slices: [] }, 'd.json: a JSON document (an object without a "schema" key); expected a discovery saved with floorgap discover --format json (schema floorgap.discover/1)'],
      [doc([], { settings: 3 }), 'd.json: settings: expected the search settings (an object), got 3'],
      [doc([], { slices: {} }), 'd.json: slices: expected an array, got an object'],
      [doc([slice({ conditions: {} })]), 'd.json: slices[0].conditions: expected at least one condition, got "an empty object"'],
      [doc([slice({ conditions: { station: 2 } })]), 'd.json: slices[0].conditions["station"]: expected a string, got 2'],
      [doc([slice({ rank: -1 })]), 'd.json: slices[0].rank: expected a whole number ≥ 0, got -1'],
      [doc([slice(), slice({ gaps: { avoidable_bias: { value: '0.1' } } })]), 'd.json: slices[1].gaps.avoidable_bias.value: expected a number, got "0.1"'],
      [doc([slice({ lift: { value: 0.1, over: [] } })]), 'd.json: slices[0].lift.over: expected an object of column values, got an array'],
      [doc([slice({ q: null })]), 'd.json: slices[0].q: expected a number, got null'],
      [doc([slice({ explained_by: 'station=S2' })]), 'd.json: slices[0].explained_by: expected an array of slice labels, got "station=S2"'],
    ];
    for (const [value, want] of cases) expect(message(() => checkDiscovery('d.json', value))).toBe(want);
  });
});

describe('the conditions against the input', () => {
  const saved = checkDiscovery('d.json', doc()) as SavedDiscovery;
  const cells = { columns: ['station', 'lighting'], dicts: [['S1', 'S2'], ['dome', 'ring']] } as unknown as CellTable;

  it('a column the input does not have, as --slice names it', () => {
    expect(message(() => checkDiscoveryColumns('d.json', saved, ['id', 'station', 'label']))).toBe(
      'd.json: slices[0] ("station=S2 · lighting=dome"): no column "lighting"; the columns are "id", "station", "label"',
    );
    expect(() => checkDiscoveryColumns('d.json', saved, ['station', 'lighting'])).not.toThrow();
  });

  it('a column that is not a slice column, a value no row has (with the bins hint for a binned column), another run', () => {
    const one = { columns: ['station'], dicts: [['S1', 'S2']] } as unknown as CellTable;
    expect(message(() => checkDiscoveryCells('d.json', saved, one, null, []))).toBe(
      'd.json: slices[0] ("station=S2 · lighting=dome"): column "lighting" is not a slice column of this analysis; its slice columns are "station" (give the --slice-cols the discovery was made with)',
    );
    const other = { columns: ['station', 'lighting'], dicts: [['S1', 'S2'], ['[0.1, 0.2)', 'ring']] } as unknown as CellTable;
    expect(message(() => checkDiscoveryCells('d.json', saved, other, null, ['lighting']))).toBe(
      'd.json: slices[0] ("station=S2 · lighting=dome"): no row has lighting="dome"; the values of "lighting" are "[0.1, 0.2)", "ring" (give the --bins and --bin-method the discovery was made with)',
    );
    expect(message(() => checkDiscoveryCells('d.json', saved, cells, 'r4', []))).toBe('d.json: a discovery of a table without runs; this analysis reports run "r4"');
    expect(() => checkDiscoveryCells('d.json', saved, cells, null, [])).not.toThrow();
  });
});

describe('discoveredReason', () => {
  it('part gap, lift over the weakest parent\'s rest and q, in points (hand arithmetic: 0.123 = 12.3 points)', () => {
    const s = slice() as unknown as DiscoveredSlice;
    expect(discoveredReason(s)).toBe('bias +12.3 pts, lift +10.1 over the rest of station=S2, q<0.001');
    expect(discoveredReason({ ...s, lift: { ...s.lift, over: {} }, q: 0.0136 })).toBe('bias +12.3 pts, lift +10.1 over all other rows, q=0.014');
  });

  it('a folded slice says what explains it; a missing gap shows as a dash', () => {
    const s = slice({ rank: 0, part: 'variance', gaps: { avoidable_bias: null, variance: null, mismatch: null }, explained_by: ['a=1 · b=2'] }) as unknown as DiscoveredSlice;
    expect(discoveredReason(s)).toBe('variance — pts, lift +10.1 over the rest of station=S2, q<0.001, explained by a=1 · b=2');
  });

  it('exportSlicesOf: conditions as the key, the part as the focus, the rank as found', () => {
    expect(exportSlicesOf([slice() as unknown as DiscoveredSlice])).toEqual([
      { key: { station: 'S2', lighting: 'dome' }, label: 'station=S2 · lighting=dome', focus: 'bias', rank: 1, reason: 'bias +12.3 pts, lift +10.1 over the rest of station=S2, q<0.001' },
    ]);
  });
});
