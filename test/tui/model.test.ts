import { describe, expect, it } from 'vitest';
import { displayWidth } from '../../src/terminal/width.js';
import { FOCI, type SliceReport } from '../../src/triage/types.js';
import {
  BAR_PARTS,
  barScale,
  cellText,
  clampCursor,
  defaultDescending,
  displayLabel,
  DROP_ORDER,
  gapBar,
  LEVER,
  screenLayout,
  SORT_KEYS,
  sliceFilter,
  sortSlices,
  tableColumns,
  windowStart,
  type ColumnId,
  type SortKey,
} from '../../src/tui/model.js';
import { sliceOfRank } from '../helpers/explorer-fixture.js';
import { reportFixture, withLabel } from '../helpers/report-fixture.js';

// Every report here is the fixture (hand-built) in test/helpers/report-fixture.ts or a small edit of
// it. Its slices by rank: 1 S5·dome (bias), 2 S2·ring (variance), 3 S7-rework-line-north·backlit-polarised
// (mismatch), 4 S4·diffuse (unclear, no train_dev), 5 S1·ring (at-floor), 6 S3·dome (below-floor),
// 7 S9·dome (thin: null gaps, headroom and yield). The array lists them out of rank order.

const report = reportFixture();
const slices = report.slices;

function ranks(list: readonly SliceReport[]): number[] {
  return list.map((s) => s.rank);
}

describe('sortSlices', () => {
  // Expected orders worked out by hand from the fixture's numbers (comment beside each row).
  const cases: [SortKey, number[], number[]][] = [
    // rank: −rank sorted "descending" puts rank 1 first
    ['rank', [1, 2, 3, 4, 5, 6, 7], [7, 6, 5, 4, 3, 2, 1]],
    // headroom total: .02 .01375 .0105 .00192 .0008 0 null
    ['headroom', [1, 2, 3, 4, 5, 6, 7], [6, 5, 4, 3, 2, 1, 7]],
    // yield: S2 .0061, S5 .0031, S7 .0019, S4 .0012, S1 .0002, S3 0, S9 null
    ['yield', [2, 1, 3, 4, 5, 6, 7], [6, 5, 4, 3, 1, 2, 7]],
    // avoidable bias: S5 .08, S4 .01, S2 = S7 = .005 (tie → rank), S1 .001, S3 −.03, S9 null
    ['bias', [1, 4, 2, 3, 5, 6, 7], [6, 5, 2, 3, 4, 1, 7]],
    // variance: S2 .045, S5 = S4 = .01 (tie), S7 .005, S1 = S3 = .002 (tie), S9 null
    ['variance', [2, 1, 4, 3, 5, 6, 7], [5, 6, 3, 1, 4, 2, 7]],
    // mismatch: S7 .06, S5 .01, S2 .005, S3 .003, S1 .001, S4 and S9 null (last, by rank)
    ['mismatch', [3, 1, 2, 6, 5, 4, 7], [5, 6, 2, 1, 3, 4, 7]],
    // dev error: S5 .13, S7 .11, S9 .0833, S2 .075, S4 .05, S1 .034, S3 .025
    ['dev', [1, 3, 7, 2, 4, 5, 6], [6, 5, 4, 2, 7, 3, 1]],
    // dev rows: S2 750, S5 = S1 = 600 (tie), S7 450, S3 300, S4 288, S9 12
    ['rows', [2, 1, 5, 3, 6, 4, 7], [7, 4, 6, 3, 1, 5, 2]],
    // label: "station=S1 …" < "station=S2 …" < … < "station=S9 …"
    ['name', [7, 3, 1, 4, 6, 2, 5], [5, 2, 6, 4, 1, 3, 7]],
  ];

  it.each(cases)('sorts by %s (descending, then ascending)', (key, descending, ascending) => {
    expect(ranks(sortSlices(slices, key, true))).toEqual(descending);
    expect(ranks(sortSlices(slices, key, false))).toEqual(ascending);
  });

  it('covers every sort key of SORT_KEYS (definition in src/tui/model.ts)', () => {
    expect(cases.map((c) => c[0])).toEqual([...SORT_KEYS]);
  });

  it('puts missing values last in both directions, ordered among themselves by rank', () => {
    // edit of the fixture: S2 (rank 2) and S5 (rank 1) lose their dev error
    const edited = slices.map((s) => (s.rank === 1 || s.rank === 2 ? { ...s, error: { ...s.error, dev: null } } : s));
    const desc = ranks(sortSlices(edited, 'dev', true));
    const asc = ranks(sortSlices(edited, 'dev', false));
    expect(desc.slice(-2)).toEqual([1, 2]);
    expect(asc.slice(-2)).toEqual([1, 2]);
    // the rest as in the 'dev' case above without S5 and S2
    expect(desc.slice(0, 5)).toEqual([3, 7, 4, 5, 6]);
    expect(asc.slice(0, 5)).toEqual([6, 5, 4, 7, 3]);
  });

  it('sorts names A→Z when not descending, by code unit', () => {
    // edit of the fixture: two plain labels; "Zeta" < "alpha" in code-unit order (uppercase first)
    const edited = withLabel(withLabel(report, 3, 'alpha'), 4, 'Zeta').slices;
    expect(sortSlices(edited, 'name', false).map((s) => s.label).slice(0, 2)).toEqual(['Zeta', 'alpha']);
  });

  it('does not modify its input', () => {
    const before = ranks(slices);
    sortSlices(slices, 'headroom', false);
    expect(ranks(slices)).toEqual(before);
  });

  it('has names as the only key sorted ascending by default (definition in src/tui/model.ts)', () => {
    expect(SORT_KEYS.filter((k) => !defaultDescending(k))).toEqual(['name']);
  });
});

describe('sliceFilter', () => {
  function matching(text: string): number[] {
    return ranks(slices.filter(sliceFilter(text))).sort((a, b) => a - b);
  }

  it('keeps everything for an empty filter', () => {
    expect(matching('')).toEqual([1, 2, 3, 4, 5, 6, 7]);
    expect(matching('   ')).toEqual([1, 2, 3, 4, 5, 6, 7]);
  });

  it('matches focus=… on the start of the focus', () => {
    expect(matching('focus=variance')).toEqual([2]); // fixture: only S2 has focus variance
    expect(matching('focus=at')).toEqual([5]); // at-floor
    expect(matching('FOCUS=BIAS')).toEqual([1]); // case-insensitive
    expect(matching('focus=floor')).toEqual([]); // a prefix, not a substring
  });

  it('matches flagged (or flag)', () => {
    expect(matching('flagged')).toEqual([1, 2, 3]); // fixture: S5, S2, S7 are flagged
    expect(matching('flag')).toEqual([1, 2, 3]);
  });

  it('matches col=value as a substring of that key only', () => {
    expect(matching('lighting=dome')).toEqual([1, 6, 7]); // S5, S3, S9 are dome
    expect(matching('station=s5')).toEqual([1]);
    expect(matching('Station=S7-REWORK')).toEqual([3]);
    expect(matching('station=dome')).toEqual([]); // dome is a lighting value, not a station
    expect(matching('shift=day')).toEqual([]); // no such column
  });

  it('matches any other term as a case-insensitive substring of the label', () => {
    expect(matching('dome')).toEqual([1, 6, 7]);
    expect(matching('RING')).toEqual([2, 5]);
    expect(matching('=ring')).toEqual([2, 5]); // "=" at the start is not a col=value term
    expect(matching('zzz')).toEqual([]);
  });

  it('requires every term (AND)', () => {
    expect(matching('flagged dome')).toEqual([1]);
    expect(matching('lighting=ring focus=at')).toEqual([5]);
    expect(matching('  ring   s2  ')).toEqual([2]);
    expect(matching('flagged focus=at')).toEqual([]);
  });
});

describe('windowStart and clampCursor', () => {
  it('returns the documented example (definition in src/tui/model.ts)', () => {
    expect(windowStart(40, 12, 10, 0)).toBe(3);
  });

  it('starts at 0 when everything fits or there is no room', () => {
    expect(windowStart(8, 7, 10, 5)).toBe(0);
    expect(windowStart(10, 9, 10, 3)).toBe(0);
    expect(windowStart(40, 12, 0, 5)).toBe(0);
  });

  it('keeps the previous window while the cursor is inside it', () => {
    expect(windowStart(40, 15, 10, 10)).toBe(10);
    expect(windowStart(40, 10, 10, 10)).toBe(10);
    expect(windowStart(40, 19, 10, 10)).toBe(10);
  });

  it('moves the window as little as possible', () => {
    expect(windowStart(40, 20, 10, 10)).toBe(11); // one below: one step
    expect(windowStart(40, 9, 10, 10)).toBe(9); // one above: one step
    expect(windowStart(40, 39, 10, 0)).toBe(30); // the last row at the bottom
    expect(windowStart(40, 39, 10, 35)).toBe(30); // never past the end
    expect(windowStart(40, 0, 10, -4)).toBe(0);
  });

  it('keeps the cursor on screen for every cursor and previous start', () => {
    for (let previous = -2; previous < 45; previous++) {
      for (let cursor = 0; cursor < 40; cursor++) {
        const start = windowStart(40, cursor, 10, previous);
        expect(cursor).toBeGreaterThanOrEqual(start);
        expect(cursor).toBeLessThan(start + 10);
        expect(start).toBeGreaterThanOrEqual(0);
        expect(start).toBeLessThanOrEqual(30);
      }
    }
  });

  it('clamps the cursor into [0, total − 1], 0 when empty', () => {
    expect(clampCursor(3, 7)).toBe(3);
    expect(clampCursor(9, 7)).toBe(6);
    expect(clampCursor(-3, 7)).toBe(0);
    expect(clampCursor(5, 0)).toBe(0);
    expect(clampCursor(0, 1)).toBe(0);
  });
});

describe('screenLayout', () => {
  // hand arithmetic: lines = rows − 1; body = lines − 3 header lines (10+ rows) − 1 status (5+ rows) − 1 key line
  it('uses rows − 1 lines at every height, dropping the header, then the status line', () => {
    expect(screenLayout(80, 24)).toEqual({ lines: 23, tooSmall: false, header: true, status: true, body: 18 });
    expect(screenLayout(80, 10)).toEqual({ lines: 9, tooSmall: false, header: true, status: true, body: 4 });
    expect(screenLayout(80, 9)).toEqual({ lines: 8, tooSmall: false, header: false, status: true, body: 6 });
    expect(screenLayout(80, 5)).toEqual({ lines: 4, tooSmall: false, header: false, status: true, body: 2 });
    expect(screenLayout(80, 4)).toEqual({ lines: 3, tooSmall: false, header: false, status: false, body: 2 });
    for (let rows = 4; rows <= 60; rows++) {
      const l = screenLayout(80, rows);
      expect((l.header ? 3 : 0) + l.body + (l.status ? 1 : 0) + 1).toBe(rows - 1);
      expect(l.body).toBeGreaterThanOrEqual(2); // the table's header line and at least one row
    }
  });

  it('is too small below 4 rows or 20 columns: one line for the note, none at 1 row', () => {
    expect(screenLayout(80, 3)).toEqual({ lines: 1, tooSmall: true, header: false, status: false, body: 0 });
    expect(screenLayout(80, 2).lines).toBe(1);
    expect(screenLayout(80, 1).lines).toBe(0);
    expect(screenLayout(80, 0).lines).toBe(0);
    expect(screenLayout(19, 24)).toEqual({ lines: 1, tooSmall: true, header: false, status: false, body: 0 });
    expect(screenLayout(20, 24).tooSmall).toBe(false);
  });
});

describe('tableColumns', () => {
  const ids = (width: number, intervals = false, mismatch = true) => tableColumns(width, { intervals, mismatch }).map((c) => c.id);
  const rowWidth = (width: number, intervals = false, mismatch = true) => {
    const cols = tableColumns(width, { intervals, mismatch });
    return cols.reduce((a, c) => a + c.width, 0) + cols.length - 1; // cells joined by one space (SliceTable.tsx)
  };
  const ALL: ColumnId[] = ['mark', 'label', 'rows', 'share', 'floor', 'train', 'dev', 'bias', 'variance', 'mismatch', 'headroom', 'yield', 'focus', 'bar'];

  // Column widths from BASE in src/tui/model.ts: every column but the label takes width + 1 (its
  // separator): mark 3, rows 9, focus 11, bar 11, the nine 5-wide columns 6 each → 88 in all. The
  // label needs 14 (MIN_LABEL) and takes at most 34 (MAX_LABEL).

  it('keeps every column at 140 columns, the label at its maximum', () => {
    expect(ids(140)).toEqual(ALL);
    expect(tableColumns(140, { intervals: false, mismatch: true }).find((c) => c.id === 'label')?.width).toBe(34); // 140 − 88 = 52 → 34
  });

  it('drops share at 100 columns', () => {
    // 100 − 88 = 12 < 14 → drop share (6): 18 ≥ 14
    expect(ids(100)).toEqual(ALL.filter((id) => id !== 'share'));
  });

  it('drops share, yield, train and rows at 80 columns', () => {
    // 80 − 88 = −8; − share 6 → −2; − yield 6 → 4; − train 6 → 10; − rows 9 → 19 ≥ 14
    expect(ids(80)).toEqual(['mark', 'label', 'floor', 'dev', 'bias', 'variance', 'mismatch', 'headroom', 'focus', 'bar']);
  });

  it('also drops mismatch and the bar at 60 columns', () => {
    // from 80's list: 60 − 61 = −1; − mismatch 6 → 5; − bar 11 → 16 ≥ 14
    expect(ids(60)).toEqual(['mark', 'label', 'floor', 'dev', 'bias', 'variance', 'headroom', 'focus']);
  });

  it('leaves out mismatch when the report has none, which keeps the rows column at 80', () => {
    // 80 − 82 = −2; − share → 4; − yield → 10; − train → 16 ≥ 14
    expect(ids(80, false, false)).toEqual(['mark', 'label', 'rows', 'floor', 'dev', 'bias', 'variance', 'headroom', 'focus', 'bar']);
  });

  it('widens dev and the gaps by 5 with intervals, dropping more', () => {
    const cols = tableColumns(80, { intervals: true, mismatch: true });
    // 88 + 4 × 5 = 108; 80 − 108 = −28 → share −22, yield −16, train −10, rows −1, mismatch 10, bar 21
    expect(cols.map((c) => c.id)).toEqual(['mark', 'label', 'floor', 'dev', 'bias', 'variance', 'headroom', 'focus']);
    expect(cols.filter((c) => ['dev', 'bias', 'variance'].includes(c.id)).map((c) => c.width)).toEqual([10, 10, 10]);
  });

  it('drops columns only in DROP_ORDER, least important first, as the width shrinks', () => {
    for (const intervals of [false, true]) {
      for (const mismatch of [false, true]) {
        for (let width = 200; width >= 20; width--) {
          const present = new Set(ids(width, intervals, mismatch));
          const order = DROP_ORDER.filter((id) => mismatch || id !== 'mismatch');
          const dropped = order.filter((id) => !present.has(id));
          // nothing outside DROP_ORDER is ever dropped
          expect(ALL.filter((id) => !present.has(id) && (mismatch || id !== 'mismatch') && !order.includes(id))).toEqual([]);
          // the dropped columns are a prefix of DROP_ORDER (definition in src/tui/model.ts)
          expect(dropped, `width ${width}`).toEqual(order.slice(0, dropped.length));
        }
      }
    }
  });

  it.each([60, 80, 100, 140])('fits the row into %i columns, exactly when the label is not at its maximum', (width) => {
    for (const intervals of [false, true]) {
      for (const mismatch of [false, true]) {
        expect(rowWidth(width, intervals, mismatch)).toBeLessThanOrEqual(width);
      }
    }
    expect(rowWidth(width)).toBe(Math.min(width, 88 + 34)); // label fills the rest, up to 34
  });

  it('never makes a row wider than the terminal from 38 columns up (48 with intervals)', () => {
    // Below that the label's floor of 6 plus the columns nothing can drop (mark 3, dev 6, bias 6,
    // headroom 6, focus 11 = 32; dev and bias 5 wider with intervals = 42) no longer fit; the App's
    // Line truncates such rows. Widths from BASE in src/tui/model.ts.
    for (let width = 38; width <= 240; width++) {
      expect(rowWidth(width, false), `width ${width}`).toBeLessThanOrEqual(width);
      if (width >= 48) expect(rowWidth(width, true), `width ${width} with intervals`).toBeLessThanOrEqual(width);
    }
    expect(rowWidth(37, false)).toBe(38);
    expect(rowWidth(47, true)).toBe(48);
  });
});

describe('gapBar and barScale', () => {
  const s5 = sliceOfRank(report, 1); // floor .03, bias .08, variance .01, mismatch .01 → .13
  const s3 = sliceOfRank(report, 6); // floor .05, bias −.03, variance .002, mismatch .003
  const s9 = sliceOfRank(report, 7); // floor .03, gaps null

  it('scales to the largest floor + positive gaps shown (fixture: S5, 0.13)', () => {
    expect(barScale(slices)).toBeCloseTo(0.13, 12);
    expect(barScale([])).toBe(0);
  });

  it('draws floor, bias, variance, mismatch in that order, by cumulative rounding', () => {
    // cumulative ends: round(.03/.13·10) = 2, round(.11/.13·10) = 8, round(.12/.13·10) = 9, 10
    expect(gapBar(s5, 0.13, 10)).toEqual([
      { part: 'floor', cells: 2 },
      { part: 'bias', cells: 6 },
      { part: 'variance', cells: 1 },
      { part: 'mismatch', cells: 1 },
    ]);
    expect(BAR_PARTS).toEqual(['floor', 'bias', 'variance', 'mismatch']);
  });

  it('does not draw negative parts, nor let them shorten the bar', () => {
    // S3: bias −.03 counts as 0; ends round(.05/.13·10) = 4, then 4, round(.052/.13·10) = 4, round(.055/.13·10) = 4
    expect(gapBar(s3, 0.13, 10)).toEqual([{ part: 'floor', cells: 4 }]);
  });

  it('draws only the floor of a slice with null gaps', () => {
    expect(gapBar(s9, 0.13, 10)).toEqual([{ part: 'floor', cells: 2 }]); // round(.03/.13·10) = 2
  });

  it('doubles the cells when the width doubles and halves them when the scale doubles', () => {
    expect(gapBar(s5, 0.13, 20).map((p) => p.cells)).toEqual([5, 12, 1, 2]); // ends 4.6→5, 16.9→17, 18.5→18, 20
    expect(gapBar(s5, 0.26, 20).map((p) => p.cells)).toEqual([2, 6, 1, 1]); // same as .13 at 10
  });

  it('never uses more cells than the width, even when the scale is too small', () => {
    for (const s of slices) {
      for (const scale of [0.001, 0.01, 0.05, 0.13, 0.5]) {
        for (const width of [1, 3, 10, 17]) {
          const total = gapBar(s, scale, width).reduce((a, p) => a + p.cells, 0);
          expect(total).toBeLessThanOrEqual(width);
        }
      }
    }
    // S5 against a scale of .05: floor round(6) = 6, bias capped at 10 → 4, nothing left
    expect(gapBar(s5, 0.05, 10)).toEqual([
      { part: 'floor', cells: 6 },
      { part: 'bias', cells: 4 },
    ]);
  });

  it('draws nothing without a positive scale or width', () => {
    expect(gapBar(s5, 0, 10)).toEqual([]);
    expect(gapBar(s5, Number.NaN, 10)).toEqual([]);
    expect(gapBar(s5, -1, 10)).toEqual([]);
    expect(gapBar(s5, 0.13, 0)).toEqual([]);
  });
});

describe('cell texts, labels and words', () => {
  it('formats the cells of a row in points (fixture S5)', () => {
    const s5 = sliceOfRank(report, 1);
    const o = { intervals: false, marked: false, label: 'x' };
    expect(cellText(s5, 'mark', o)).toBe(' *'); // flagged
    expect(cellText(s5, 'mark', { ...o, marked: true })).toBe('+*');
    expect(cellText(s5, 'dev', o)).toBe('13.0');
    expect(cellText(s5, 'dev', { ...o, intervals: true })).toBe('13.0±2.7'); // (.159 − .105) · 50
    expect(cellText(s5, 'bias', o)).toBe('+8.0');
    expect(cellText(s5, 'share', o)).toBe('20%');
    expect(cellText(sliceOfRank(report, 7), 'headroom', o)).toBe('—'); // thin: null headroom
  });

  it('shows only values in a grouping, col=value in the overview, sanitised either way', () => {
    const s5 = sliceOfRank(report, 1);
    expect(displayLabel(s5, true)).toBe('S5 · dome');
    expect(displayLabel(s5, false)).toBe('station=S5 · lighting=dome');
    const bad = sliceOfRank(withLabel(report, 1, 'S5\u001b[2J\u202e'), 1);
    // sanitize's escapes (definition in src/terminal/sanitize.ts)
    expect(displayLabel(bad, true)).toBe('S5\\x1b[2J\\u202e');
    expect(displayLabel(bad, false)).toBe('S5\\x1b[2J\\u202e');
  });

  it('has a lever sentence for every focus', () => {
    for (const f of FOCI) expect(LEVER[f].length, f).toBeGreaterThan(10);
  });

  it('keeps header texts within their columns', () => {
    for (const width of [60, 80, 100, 140]) {
      for (const c of tableColumns(width, { intervals: true, mismatch: true })) expect(displayWidth(c.header)).toBeLessThanOrEqual(c.width);
    }
  });
});
