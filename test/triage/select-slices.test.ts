/**
 * Which slices `export` writes rows for, the `--slice` syntax and the one-line reason. Expected values
 * are read off the hand-built report fixture (test/helpers/report-fixture.ts) or are hand-made strings.
 */
import { describe, expect, it } from 'vitest';
import { namedGrouping, parseSliceKey, selectSlices, sliceReason } from '../../src/triage/select-slices.js';
import { failure } from '../helpers/failure.js';
import { reportFixture } from '../helpers/report-fixture.js';

const named = (...texts: string[]) => ({ kind: 'named' as const, slices: texts.map(parseSliceKey) });

describe('parseSliceKey', () => {
  it('pairs separated by commas, names and values trimmed', () => {
    // hand-made input
    expect(parseSliceKey('station=S5, lighting = dome').pairs).toEqual([
      ['station', 'S5'],
      ['lighting', 'dome'],
    ]);
  });

  it('\\, is a literal comma, \\= a literal "=", \\\\ a backslash; a later "=" belongs to the value', () => {
    // hand-made input: a bin label holds a comma
    expect(parseSliceKey('sharpness=[0.583\\, 0.649)').pairs).toEqual([['sharpness', '[0.583, 0.649)']]);
    expect(parseSliceKey('a\\=b=x=y').pairs).toEqual([['a=b', 'x=y']]);
    expect(parseSliceKey('path=C:\\\\dir').pairs).toEqual([['path', 'C:\\dir']]);
  });

  it('an empty value is allowed; a pair without "=", an empty name or a repeated column is an error', () => {
    expect(parseSliceKey('note=').pairs).toEqual([['note', '']]);
    expect(() => parseSliceKey('station')).toThrow(/expected col=value pairs/);
    expect(() => parseSliceKey('station=S5,')).toThrow(/expected col=value pairs/);
    expect(() => parseSliceKey('=S5')).toThrow(/no column name/);
    expect(() => parseSliceKey('station=S5,station=S1')).toThrow(/named twice/);
  });
});

describe('namedGrouping', () => {
  it('the named columns when every slice names the same ones (order of the first)', () => {
    expect(namedGrouping([parseSliceKey('station=S5,lighting=dome'), parseSliceKey('lighting=ring,station=S2')])).toEqual(['station', 'lighting']);
    expect(namedGrouping([parseSliceKey('station=S5')])).toEqual(['station']);
  });

  it('the overview (null) for one-column slices of different columns', () => {
    expect(namedGrouping([parseSliceKey('station=S5'), parseSliceKey('package=QFN')])).toBeNull();
  });

  it('slices of several columns that name different columns are an error', () => {
    expect(() => namedGrouping([parseSliceKey('station=S5,lighting=dome'), parseSliceKey('station=S5')])).toThrow(/same columns/);
  });
});

describe('selectSlices on the hand-built report', () => {
  const report = reportFixture();

  it('default: the flagged slices in rank order (fixture: ranks 1, 2, 3 are flagged)', () => {
    const chosen = selectSlices(report, { kind: 'flagged' });
    expect(chosen.map((c) => c.slice.rank)).toEqual([1, 2, 3]);
    expect(chosen.every((c) => c.chosen === 'flagged' && c.named === null)).toBe(true);
  });

  it('--top N: the first N in rank order, fewer when the report is shorter (fixture: 7 slices)', () => {
    expect(selectSlices(report, { kind: 'top', n: 4 }).map((c) => c.slice.rank)).toEqual([1, 2, 3, 4]);
    expect(selectSlices(report, { kind: 'top', n: 50 })).toHaveLength(7);
    expect(() => selectSlices(report, { kind: 'top', n: 0 })).toThrow(/whole number > 0/);
  });

  it('named slices: matched by key whatever the order of the pairs, returned in rank order, each once', () => {
    const chosen = selectSlices(report, named('station=S1,lighting=ring', 'lighting=dome,station=S5', 'station=S5,lighting=dome'));
    expect(chosen.map((c) => c.slice.label)).toEqual(['station=S5 · lighting=dome', 'station=S1 · lighting=ring']);
    expect(chosen.map((c) => c.named)).toEqual(['lighting=dome,station=S5', 'station=S1,lighting=ring']);
    expect(chosen.every((c) => c.chosen === 'named')).toBe(true);
  });

  it('a column the report does not slice by, or a key no slice has, is a user error', async () => {
    const col = await failure(Promise.resolve().then(() => selectSlices(report, named('package=QFN'))));
    expect(col.exitCode).toBe(2);
    expect(col.message).toMatch(/no slices of column "package"; its slice columns are "station", "lighting"/);
    const value = await failure(Promise.resolve().then(() => selectSlices(report, named('station=S8,lighting=dome'))));
    expect(value.message).toMatch(/no row has station="S8"; the values of "station" are "S1", "S2"/);
    const combo = await failure(Promise.resolve().then(() => selectSlices(report, named('station=S5,lighting=ring'))));
    expect(combo.message).toMatch(/no row has this combination/);
    const partial = await failure(Promise.resolve().then(() => selectSlices(report, named('station=S5'))));
    expect(partial.message).toMatch(/not keyed by exactly station/);
  });
});

describe('sliceReason', () => {
  const bySlice = (rank: number) => reportFixture().slices.find((s) => s.rank === rank)!;

  it('dev error, floor and the focus part in points (fixture values)', () => {
    // fixture: station=S5 · lighting=dome, dev 0.13, floor 0.03, focus bias, avoidable bias 0.08
    expect(sliceReason(bySlice(1))).toBe('dev error 13.0 % vs floor 3.0 %, bias 8.0 pts');
    // fixture: station=S2 · lighting=ring, dev 0.075, floor 0.02, focus variance, variance 0.045
    expect(sliceReason(bySlice(2))).toBe('dev error 7.5 % vs floor 2.0 %, variance 4.5 pts');
    // fixture: rank 3, dev 0.11, floor 0.04, focus mismatch, mismatch 0.06
    expect(sliceReason(bySlice(3))).toBe('dev error 11.0 % vs floor 4.0 %, mismatch 6.0 pts');
  });

  it('other foci name the focus only', () => {
    // fixture: rank 5 is at-floor with dev 0.034 and floor 0.03
    expect(sliceReason(bySlice(5))).toBe('dev error 3.4 % vs floor 3.0 %, at-floor');
  });
});
