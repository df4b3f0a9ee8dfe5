// Must come first: chalk decides on colour when ink loads it (see the helper).
import { restoreColorEnv } from '../helpers/force-color.js';
import { render } from 'ink-testing-library';
import type { ReactElement } from 'react';
import { describe, expect, it } from 'vitest';
import { FloorgapError } from '../../src/core/errors.js';
import { stripAnsi } from '../../src/terminal/ansi.js';
import { detailLines, type DetailExtras } from '../../src/tui/detail.js';
import { KEYS } from '../../src/tui/keys.js';
import { DetailPane } from '../../src/tui/screens/DetailPane.js';
import { FailureScreen } from '../../src/tui/screens/FailureScreen.js';
import { GroupPicker } from '../../src/tui/screens/GroupPicker.js';
import { HelpScreen } from '../../src/tui/screens/HelpScreen.js';
import { LoadingScreen } from '../../src/tui/screens/LoadingScreen.js';
import { EXAMPLES_FIXTURE, sliceOfRank } from '../helpers/explorer-fixture.js';
import { settle } from '../helpers/ink-frame.js';
import { reportFixture } from '../helpers/report-fixture.js';

restoreColorEnv();

// The explorer's screens drawn alone, outside the App. Sizes, titles and column names are invented
// for each case; the report is the fixture (hand-built) in test/helpers/report-fixture.ts.

/** A frame's lines, SGR removed, trailing blanks and the blank lines a fixed-height box pads with trimmed. */
function linesIn(frame: string): string[] {
  const lines = stripAnsi(frame).split('\n').map((l) => l.trimEnd());
  while (lines.length > 0 && lines[lines.length - 1] === '') lines.pop();
  return lines;
}

/** The lines of a drawn element, and the frame as ink wrote it. */
function drawn(node: ReactElement): { lines: string[]; raw: string } {
  const r = render(node);
  const raw = r.lastFrame() ?? '';
  r.unmount();
  return { lines: linesIn(raw), raw };
}

describe('LoadingScreen', () => {
  const base = { title: 'runs/preds.csv', elapsed: 0, width: 80, height: 23, color: false, ascii: false } as const;

  it('before any progress: the title, what loads and the seconds', () => {
    expect(drawn(<LoadingScreen {...base} progress={null} />).lines).toEqual(['floorgap', 'loading runs/preds.csv', '  0.0 s']);
  });

  it('with progress: a bar of min(40, width − 20) cells, the percentage and the seconds (ASCII)', () => {
    // width 80: a 40-cell bar; round(0.42 · 40) = round(16.8) = 17 filled, 23 empty; 1,500 ms = 1.5 s (hand arithmetic)
    const { lines } = drawn(<LoadingScreen {...base} progress={{ percent: 42 }} elapsed={1500} ascii />);
    expect(lines[2]).toBe(`[${'#'.repeat(17)}${'-'.repeat(23)}] 42%  1.5 s`);
  });

  it('a narrow terminal gets a short bar; Unicode blocks', () => {
    // width 30: min(40, 30 − 20) = 10 cells; round(0.25 · 10) = round(2.5) = 3 filled (Math.round), 7 empty (hand arithmetic)
    const { lines } = drawn(<LoadingScreen {...base} width={30} progress={{ percent: 25 }} />);
    expect(lines[2]).toBe(`${'█'.repeat(3)}${'░'.repeat(7)} 25%  0.0 s`);
  });

  it('sanitises the title and cuts it to the width; the screen to the height', () => {
    const { lines } = drawn(<LoadingScreen {...base} title={'a\x1b[2Jb.csv'} width={20} height={2} progress={null} />);
    // 'loading a\x1b[2Jb.csv' (sanitised, 23 columns) cut to 20: 19 characters and '…'
    expect(lines).toEqual(['floorgap', 'loading a\\x1b[2Jb.c…']);
  });
});

describe('FailureScreen', () => {
  it('the message under the title when both fit, else the message alone, wrapped to the width', () => {
    const error = new FloorgapError('cannot read runs/preds.csv: no such file');
    expect(drawn(<FailureScreen error={error} width={80} height={23} color={false} />).lines).toEqual(['floorgap', '', 'floorgap: cannot read runs/preds.csv: no such file']);
    // at 30 columns the line wraps in two ('floorgap: cannot read' and the rest); two lines and the
    // title and blank line (4) do not fit in 3, so the message shows alone
    expect(drawn(<FailureScreen error={error} width={30} height={3} color={false} />).lines).toEqual(['floorgap: cannot read', 'runs/preds.csv: no such file']);
  });
});

describe('HelpScreen', () => {
  it('every key, the legend of the gap bar, how to close it', () => {
    const { lines } = drawn(<HelpScreen width={80} height={20} color={false} ascii />);
    // 'keys', one line per entry of KEYS (16), the legend, the discovered view's caution and the closing line: 20 lines
    expect(KEYS).toHaveLength(16);
    expect(lines).toHaveLength(20);
    expect(lines[0]).toBe('keys');
    expect(lines[1]).toBe(`  ${KEYS[0][0].padEnd(20)} ${KEYS[0][1]}`);
    expect(lines[17]).toBe('  gap bar: . floor  # bias  = variance  ~ mismatch   * flagged  + marked');
    expect(lines[18]).toBe('  discovered slices: a discovered slice is a lead to investigate, not a verdict'); // FOUND_CAUTION (src/tui/found.ts)
    expect(lines[19]).toBe('  any key closes this help');
  });

  it('too tall for the lines available: the title goes, then the last line says what is left and how to close', () => {
    const { lines } = drawn(<HelpScreen width={80} height={3} color={false} ascii={false} />);
    // 19 lines without the title (16 keys, legend, caution, closing line); 2 shown, the third says 17 more (hand count)
    expect(lines).toEqual([`  ${KEYS[0][0].padEnd(20)} ${KEYS[0][1]}`, `  ${KEYS[1][0].padEnd(20)} ${KEYS[1][1]}`, '  … 17 more lines in a taller terminal · any key closes this help']);
    // 80×24 gives the help 18 lines: without the title 19, so 17 shown and 2 more (hand count)
    const tall = drawn(<HelpScreen width={80} height={18} color={false} ascii={false} />).lines;
    expect(tall).toHaveLength(18);
    expect(tall[17]).toBe('  … 2 more lines in a taller terminal · any key closes this help');
    expect(drawn(<HelpScreen width={80} height={20} color={false} ascii />).lines[19]).toBe('  any key closes this help');
  });
});

describe('GroupPicker', () => {
  const columns = Array.from({ length: 12 }, (_, i) => `c${String(i + 1).padStart(2, '0')}`); // c01 … c12, invented

  it('a checkbox per column in the window around the cursor, the cursor reversed', () => {
    // height 5: the title and 4 rows; cursor 6 (c07) past the first window of 4, so it starts at
    // 6 − 4 + 1 = 3 (c04) (windowStart, hand arithmetic)
    const { lines, raw } = drawn(<GroupPicker columns={columns} cursor={6} picked={new Set(['c05', 'c01'])} height={5} width={80} color={false} />);
    expect(lines).toEqual(['group by (space toggles, Enter applies, Esc cancels; none = overview)', '  [ ] c04', '  [x] c05', '  [ ] c06', '  [ ] c07']);
    // SGR 7 is "negative image" (ECMA-48), what ink writes for inverse: only on the cursor's row
    const rawLines = raw.split('\n');
    expect(rawLines.map((l) => l.includes('\x1b[7m'))).toEqual([false, false, false, false, true]);
  });

  it('sanitises the column names', () => {
    const { lines } = drawn(<GroupPicker columns={['a\x1b[31mb']} cursor={0} picked={new Set()} height={5} width={80} color={false} />);
    expect(lines[1]).toBe('  [ ] a\\x1b[31mb');
  });
});

describe('DetailPane', () => {
  const report = reportFixture();
  const s5 = sliceOfRank(report, 1);
  const extras: DetailExtras = { drillColumn: null, drill: null, examples: EXAMPLES_FIXTURE };
  /** the pane's lines as detail.ts writes them, as text */
  const all = detailLines(s5, report, extras, 80).map((l) => l.map((s) => s.text).join('').trimEnd());

  it('shows the lines that fit from the scroll on, and says how far it can scroll', async () => {
    const limits: number[] = [];
    const r = render(<DetailPane slice={s5} report={report} extras={extras} width={80} height={6} scroll={2} onScrollLimit={(m) => limits.push(m)} color={false} />);
    await settle();
    const lines = linesIn(r.lastFrame() ?? '');
    r.unmount();
    expect(all.length).toBeGreaterThan(8); // a pane longer than the room, so it scrolls
    expect(lines).toEqual(all.slice(2, 8));
    expect(limits).toEqual([all.length - 6]);
  });

  it('a scroll past the end shows the last lines', () => {
    const { lines } = drawn(<DetailPane slice={s5} report={report} extras={extras} width={80} height={6} scroll={10_000} onScrollLimit={() => undefined} color={false} />);
    expect(lines).toEqual(all.slice(-6));
  });
});
