/**
 * The one word wrapper (src/terminal/wrap.ts). Expected lines are hand-laid from the inputs (greedy:
 * each line takes as many words as fit); widths of wide characters follow UAX #11 (two columns for
 * the CJK characters used here).
 */
import { describe, expect, it } from 'vitest';
import { displayWidth } from '../../src/terminal/width.js';
import { wrap } from '../../src/terminal/wrap.js';

describe('wrap', () => {
  it('fills each line greedily with whole words', () => {
    expect(wrap('the dev rows do not look like the training rows', 20)).toEqual(['the dev rows do not', 'look like the', 'training rows']);
  });

  it('starts the first line after `first` and the others after `indent`', () => {
    expect(wrap('a bb ccc dddd', 9, { first: 'key  ', indent: '     ' })).toEqual(['key  a bb', '     ccc', '     dddd']);
  });

  it('measures display width, not string length: 検査 takes four columns', () => {
    const lines = wrap('検査 検査 検査', 9);
    expect(lines).toEqual(['検査 検査', '検査']);
    expect(lines.every((l) => displayWidth(l) <= 9)).toBe(true);
  });

  it('a word wider than the line is truncated by default, broken across lines with long: break', () => {
    expect(wrap('see /very/long/path/to/preds.csv now', 12)).toEqual(['see', '/very/long/…', 'now']);
    expect(wrap('see /very/long/path/to/preds.csv now', 12, { long: 'break' })).toEqual(['see', '/very/long/p', 'ath/to/preds', '.csv now']);
  });

  it('empty text is one line holding the prefix; runs of spaces separate words once', () => {
    expect(wrap('', 10, { first: '> ' })).toEqual(['> ']);
    expect(wrap('a    b', 10)).toEqual(['a b']);
  });

  it('never returns a line wider than the budget', () => {
    const text = 'floorgap: preds.csv: line 22: ends with CRLF where line 1 ends with LF; expected one kind of line end';
    for (const width of [5, 11, 17, 40]) {
      for (const long of ['truncate', 'break'] as const) {
        for (const l of wrap(text, width, { long, indent: '  ' })) expect(displayWidth(l)).toBeLessThanOrEqual(width);
      }
    }
  });
});
