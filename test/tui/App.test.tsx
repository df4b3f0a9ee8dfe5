// Must come first: chalk decides on colour when ink loads it (see the helper).
import { restoreColorEnv } from '../helpers/force-color.js';
import { afterEach, describe, expect, it } from 'vitest';
import { stripAnsi } from '../../src/terminal/ansi.js';
import { displayWidth } from '../../src/terminal/width.js';
import type { Report } from '../../src/triage/types.js';
import { HINT } from '../../src/tui/keys.js';
import type { ExplorerData } from '../../src/tui/data.js';
import { FloorgapError } from '../../src/core/errors.js';
import { LEVER } from '../../src/tui/model.js';
import { EXAMPLES_FIXTURE, FAKE_EXPORT_PATH, fakeExplorerData, sliceOfRank } from '../helpers/explorer-fixture.js';
import { KEY, linesOf, renderExplorer, settle, type Explorer, type ExplorerProps } from '../helpers/ink-frame.js';
import { reportFixture, withLabel } from '../helpers/report-fixture.js';

restoreColorEnv();

// The data is the fake in test/helpers/explorer-fixture.ts over the fixture (hand-built) report in
// test/helpers/report-fixture.ts. In report order (rank 1 first) its slices are S5·dome, S2·ring,
// S7-rework-line-north·backlit-polarised, S4·diffuse, S1·ring, S3·dome, S9·dome; S5, S2, S7 are flagged.
// Frames are compared after removing SGR sequences (`frame()`); colour is forced on for chalk so the
// raw frames (`rawFrame()`, `frames`) show what a colour terminal would receive.

const open: Explorer[] = [];
afterEach(() => {
  while (open.length > 0) open.pop()?.unmount();
});

async function explorer(props: ExplorerProps): Promise<Explorer> {
  const x = renderExplorer(props);
  open.push(x);
  await settle(); // the load resolves
  return x;
}

/** Lines of the last frame without trailing blanks (ink pads lines with spaces). */
function screen(x: Explorer): string[] {
  return linesOf(x.frame()).map((l) => l.trimEnd());
}

/** The frame as one paragraph: lines joined, indentation and wrapping collapsed to single spaces. */
function prose(x: Explorer): string {
  return screen(x).join(' ').replace(/\s+/g, ' ');
}

/** Every frame fits the terminal: at most `rows − 1` lines, none wider than `columns`. */
function expectFits(x: Explorer, columns: number, rows: number): void {
  const lines = linesOf(x.frame());
  expect(lines.length).toBeLessThanOrEqual(rows - 1);
  for (const l of lines) expect(displayWidth(l), l).toBeLessThanOrEqual(columns);
}

const SGR = /\x1b\[([0-9;]*)m/g;

/** The SGR parameters found in frames, and whatever else looks like an escape. */
function escapesIn(frames: readonly string[]): { sgr: Set<string>; other: string[] } {
  const sgr = new Set<string>();
  const other: string[] = [];
  for (const f of frames) {
    for (const m of f.matchAll(SGR)) for (const p of m[1].split(';')) sgr.add(p);
    const rest = f.replace(SGR, '');
    // ESC, C1 controls, bidi overrides and isolates: never in a frame unescaped
    for (const m of rest.matchAll(/[\x1b\x80-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g)) other.push(JSON.stringify(m[0]));
  }
  return { sgr, other };
}

// Rows of the fixture in report order, as the 80-column table shows them: label column 19 wide
// (80 − 61, see tableColumns in src/tui/model.ts), values in points from the fixture (hand-built).
const ROWS_80 = [
  ' * S5 · dome',
  ' * S2 · ring',
  ' * S7-rework-line-nor…',
  '   S4 · diffuse',
  '   S1 · ring',
  '   S3 · dome',
  '   S9 · dome',
];

describe('loading', () => {
  it('shows the loading screen first, then the table', async () => {
    let resolve: (d: ReturnType<typeof fakeExplorerData>['data']) => void = () => undefined;
    const { data } = fakeExplorerData();
    const x = renderExplorer({ load: () => new Promise((r) => (resolve = r)) });
    open.push(x);
    // the first frame: title from the test default in test/helpers/ink-frame.tsx, no progress known
    expect(linesOf(stripAnsi(x.frames[0])).slice(0, 3).map((l) => l.trimEnd())).toEqual(['floorgap', 'loading runs/2024-06-03/preds.csv', '  0.0 s']);
    await settle();
    expect(x.frame()).toContain('loading runs/2024-06-03/preds.csv');
    resolve(data);
    await settle();
    expect(screen(x)[0]).toMatch(/^floorgap preds\.csv · /);
  });

  it('polls the progress while loading (ASCII bar)', async () => {
    const x = renderExplorer({ load: () => new Promise(() => undefined), progress: () => ({ percent: 42 }), ascii: true });
    open.push(x);
    await new Promise((r) => setTimeout(r, 320)); // the App polls every 250 ms
    // bar width min(40, 80 − 20) = 40, round(0.42 · 40) = 17 filled (progressBar in src/tui/screens/LoadingScreen.tsx)
    expect(screen(x)[2]).toMatch(new RegExp(`^\\[${'#'.repeat(17)}${'-'.repeat(23)}\\] 42% {2}0\\.[2-9] s$`));
  });

  it('shows why loading failed and exits with 2 after a moment', async () => {
    const error = new FloorgapError('cannot read runs/bad\u001b[2J.csv: no such file');
    const x = renderExplorer({ load: () => Promise.reject(error) });
    open.push(x);
    await settle();
    // message as thrown, sanitised (definition of sanitize in src/terminal/sanitize.ts)
    expect(screen(x).slice(0, 3)).toEqual(['floorgap', '', 'floorgap: cannot read runs/bad\\x1b[2J.csv: no such file']);
    expect(x.exits).toEqual([]);
    await new Promise((r) => setTimeout(r, 1300)); // the App waits 1,200 ms (src/tui/hooks/use-explorer-data.ts)
    expect(x.exits).toEqual([{ code: 2, error }]);
  });

  it('shows an internal error as one line and exits with 3 after a moment', async () => {
    const error = new TypeError("Cannot read properties of undefined (reading 'slices')\n    at load (x.js:1:1)");
    const x = renderExplorer({ load: () => Promise.reject(error) });
    open.push(x);
    await settle();
    // the line the CLI prints for an internal error (failureText in src/render/failure.ts): first line only
    expect(screen(x).slice(0, 3)).toEqual(['floorgap', '', "floorgap: internal error: Cannot read properties of undefined (reading 'slices')"]);
    await new Promise((r) => setTimeout(r, 1300)); // the App waits 1,200 ms (src/tui/hooks/use-explorer-data.ts)
    expect(x.exits).toEqual([{ code: 3, error }]);
  });

  it('exits at once on a key after a failed load: 2, or 130 for Ctrl-C', async () => {
    const a = renderExplorer({ load: () => Promise.reject(new FloorgapError('bad')) });
    const b = renderExplorer({ load: () => Promise.reject(new FloorgapError('bad')) });
    open.push(a, b);
    await settle();
    await a.press('x');
    await b.press(KEY.ctrlC);
    expect(a.exits.map((e) => e.code)).toEqual([2]);
    expect(b.exits.map((e) => e.code)).toEqual([130]);
  });
});

describe('the slice table', () => {
  it('shows the header, the table in report order, status and hints at 80×24', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    const lines = screen(x);
    // header lines: fixture (hand-built) overall numbers, formatted by src/tui/header.ts
    expect(lines[0]).toBe('floorgap preds.csv · train 12,000 · train_dev 2,700 · dev 3,000 · test 2,900');
    expect(lines[1]).toBe('grouping by station × lighting · 7 slices · 3 flagged · floor from mixed');
    expect(lines[2]).toBe('overall  floor 3.1 · train 4.8 · train_dev 6.1 · dev 7.9 · test 8.3  │  bias +1…');
    // 80 columns keep floor, dev, bias, var, mism, head, focus, gaps (see model.test.ts)
    expect(lines[3]).toBe('   station · lighting  floor   dev  bias   var  mism  head focus      gaps');
    // S5: floor 3.0, dev 13.0, bias +8.0, var +1.0, mism +1.0, headroom 2.0; bar 2/6/1/1 cells (gapBar, scale .13)
    expect(lines[4]).toBe(' * S5 · dome             3.0  13.0  +8.0  +1.0  +1.0   2.0 bias       ░░██████▓▒');
    for (const [i, start] of ROWS_80.entries()) expect(lines[4 + i].startsWith(start), lines[4 + i]).toBe(true);
    expect(lines[10]).toBe('   S9 · dome             3.0   8.3     —     —     —     — thin       ░░'); // thin: null gaps
    expect(lines[21]).toBe('sort report order ↓ · 7 slices · 0 marked · 1/7');
    expect(lines[22]).toBe(`${HINT.slice(0, 79)}…`); // the hint (src/tui/keys.ts) cut to 80 columns
    expectFits(x, 80, 24);
    expect(lines).toHaveLength(23); // rows − 1
  });

  it('moves the cursor, also for a burst of keys in one read', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    await x.press('jjj'); // one read: applied key by key
    expect(screen(x)[21]).toBe('sort report order ↓ · 7 slices · 0 marked · 4/7');
    await x.press(KEY.end);
    expect(screen(x)[21]).toMatch(/ 7\/7$/);
    await x.press(KEY.pageUp, KEY.down);
    expect(screen(x)[21]).toMatch(/ 2\/7$/);
    await x.press(KEY.home);
    expect(screen(x)[21]).toMatch(/ 1\/7$/);
  });

  it('sorts by headroom with h, largest first, keeping the selected slice', async () => {
    // edit of the fixture: S4 (rank 4) gets the largest headroom, 5.0 points
    const base = reportFixture();
    const report: Report = { ...base, slices: base.slices.map((s) => (s.rank === 4 ? { ...s, headroom: { total: 0.05, bias: 0.03, variance: 0.02, mismatch: null } } : s)) };
    const x = await explorer({ data: fakeExplorerData({ report }).data });
    expect(screen(x)[4].startsWith(' * S5 · dome')).toBe(true);
    await x.press('h');
    const lines = screen(x);
    expect(lines[4]).toMatch(/^ {3}S4 · diffuse .* 5\.0 unclear/);
    // then S5 2.0, S2 1.4, S7 1.1 … and S9 (no headroom) last
    expect(lines.slice(5, 11).map((l) => l.slice(0, 12).trim())).toEqual(['* S5 · dome', '* S2 · ring', '* S7-rework', 'S1 · ring', 'S3 · dome', 'S9 · dome']);
    expect(lines[21]).toBe('sort headroom ↓ · 7 slices · 0 marked · 2/7'); // S5 stays selected, now second
    await x.press('r');
    expect(screen(x)[21]).toBe('sort headroom ↑ · 7 slices · 0 marked · 5/7'); // S3 S1 S7 S2 S5 S4, then S9
    expect(screen(x)[10]).toMatch(/^ {3}S9 · dome/); // missing values stay last
  });

  it('cycles the sort with s, the status naming it (SORT_LABEL in src/tui/model.ts)', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    const seen: string[] = [];
    for (let i = 0; i < 9; i++) {
      await x.press('s');
      seen.push(screen(x)[21].split(' · ')[0]);
    }
    expect(seen).toEqual(['sort headroom ↓', 'sort yield ↓', 'sort avoidable bias ↓', 'sort variance ↓', 'sort mismatch ↓', 'sort dev error ↓', 'sort dev rows ↓', 'sort name ↑', 'sort report order ↓']);
  });

  it('filters with / text Enter, and clears with Esc', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    await x.press('/');
    expect(screen(x)[22]).toBe('/▏ (Enter keeps, Esc clears)');
    await x.press('d', 'o', 'm', 'e');
    expect(screen(x)[22]).toBe('/dome▏ (Enter keeps, Esc clears)');
    expect(screen(x).slice(4, 11).filter((l) => l.startsWith(' '))).toHaveLength(7); // not applied yet
    await x.press(KEY.enter);
    const lines = screen(x);
    // fixture: the dome slices are S5, S3, S9
    expect(lines.slice(4, 7).map((l) => l.slice(0, 12).trim())).toEqual(['* S5 · dome', 'S3 · dome', 'S9 · dome']);
    expect(lines[7]).toBe('');
    expect(lines[21]).toBe('sort report order ↓ · filter "dome" (3 of 7) · 0 marked · 1/3');
    await x.press('/', KEY.backspace, KEY.backspace, KEY.backspace, KEY.backspace, 'z', 'z', KEY.enter);
    expect(screen(x)).toContain('  no slice matches the filter (Esc clears it)');
    await x.press(KEY.escape);
    expect(screen(x)[21]).toBe('sort report order ↓ · 7 slices · 0 marked · 1/7');
  });

  it('shows every column at 120×40', async () => {
    const x = await explorer({ data: fakeExplorerData().data, columns: 120, rows: 40 });
    const header = screen(x)[3];
    // 120 − 88 = 32 ≥ 14: nothing dropped (tableColumns in src/tui/model.ts)
    for (const h of ['dev rows', 'share', 'floor', 'train', 'dev', 'bias', 'var', 'mism', 'head', 'yield', 'focus', 'gaps']) expect(header).toContain(h);
    expect(screen(x)[4]).toContain('20%'); // S5's share
    expectFits(x, 120, 40);
    expect(linesOf(x.frame())).toHaveLength(39);
  });
});

describe('several keys in one read (key repeat, a paste, a burst over SSH)', () => {
  // the bottom line of an 80×24 frame is line 22; the prompts' text is defined in src/tui/components/KeyHints.tsx
  it('applies every Backspace and character of one chunk in order in the filter prompt', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    await x.press('/');
    await x.press('dome'); // one read
    expect(screen(x)[22]).toBe('/dome▏ (Enter keeps, Esc clears)');
    await x.press('\x7f\x7f\x7f'); // three Backspaces (DEL) in one read
    expect(screen(x)[22]).toBe('/d▏ (Enter keeps, Esc clears)');
    await x.press('abc\x7f\x7f'); // "dabc" less two
    expect(screen(x)[22]).toBe('/da▏ (Enter keeps, Esc clears)');
    await x.press('\b\bring\r'); // Ctrl-H twice, "ring", Enter
    // fixture: the ring slices are S2 · ring and S1 · ring
    expect(screen(x)[21]).toBe('sort report order ↓ · filter "ring" (2 of 7) · 0 marked · 1/2');
  });

  it('applies every key of one chunk in the export prompt, Enter included', async () => {
    const { data, calls } = fakeExplorerData();
    const x = await explorer({ data });
    await x.press('e');
    expect(screen(x)[22]).toBe(`export rows to: ${FAKE_EXPORT_PATH}▏ (Enter writes, Esc cancels)`);
    await x.press('\x7f\x7f\x7ftsv\r'); // "floorgap-export.csv" → "floorgap-export.tsv", then Enter
    await settle();
    // nothing marked: the flagged slices (fixture: S2, S5, S7, in the report's order) are exported
    expect(calls.exportSlices).toEqual([{ slices: ['station=S2 · lighting=ring', 'station=S5 · lighting=dome', 'station=S7-rework-line-north · lighting=backlit-polarised'], path: 'floorgap-export.tsv', force: false }]);
  });

  it('reads Ctrl-C inside a chunk as Ctrl-C', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    await x.press('jj\x03');
    expect(x.exits.map((e) => e.code)).toEqual([130]);
  });
});

describe('the narrow layout (60×20)', () => {
  it('drops the least important columns and fits every line', async () => {
    const x = await explorer({ data: fakeExplorerData().data, columns: 60, rows: 20 });
    const header = screen(x)[3];
    // 60 columns keep floor, dev, bias, var, head, focus (see model.test.ts)
    expect(header).toBe('   station · light… floor   dev  bias   var  head focus'); // label column 16 wide
    for (const gone of ['dev rows', 'share', 'train', 'mism', 'yield', 'gaps']) expect(header).not.toContain(gone);
    expect(screen(x)[4]).toBe(' * S5 · dome          3.0  13.0  +8.0  +1.0   2.0 bias');
    expect(screen(x)[4]).not.toMatch(/[░█▓▒]/); // no gap bar
    expectFits(x, 60, 20);
    expect(linesOf(x.frame())).toHaveLength(19);
  });

  it('fits every screen: detail, picker, help, prompts', async () => {
    const x = await explorer({ data: fakeExplorerData().data, columns: 60, rows: 20 });
    const screens: [string, string[]][] = [
      ['detail', [KEY.enter]],
      ['scrolled detail', ['j', 'j', 'j', 'j', 'j', 'j', 'j', 'j', 'j', 'j']],
      ['table', [KEY.enter]],
      ['filter', ['/', 'd', 'o']],
      ['table', [KEY.escape]],
      ['picker', ['g']],
      ['table', [KEY.escape]],
      ['help', ['?']],
      ['table', ['x']],
      ['export prompt', ['e']],
    ];
    for (const [name, keys] of screens) {
      await x.press(...keys);
      const lines = screen(x);
      expect(lines[0].startsWith('floorgap '), `${name}: ${lines[0]}`).toBe(true);
      expectFits(x, 60, 20);
    }
  });

  it('keeps the help overlay in order when it is taller than the terminal', async () => {
    const x = await explorer({ data: fakeExplorerData().data, columns: 60, rows: 20 });
    await x.press('?');
    const lines = screen(x);
    expect(lines.slice(0, 3).map((l) => l.split(' ')[0])).toEqual(['floorgap', 'grouping', 'overall']);
    // too tall: no title; the keys of src/tui/keys.ts in their order, as many as fit above the status
    // and hint lines, the last of them saying how many more there are and how to close the help
    expect(lines[3]).toMatch(/^ {2}↑ ↓ {2}j k/);
    expect(lines[4]).toMatch(/^ {2}PgUp PgDn {2}Home End/);
    expect(lines[5]).toMatch(/^ {2}← →/);
    expect(lines[16]).toMatch(/^ {2}… \d+ more lines in a taller terminal · any key closes/);
    expect(lines[18]).toMatch(/^↑↓ move/);
  });
});

describe('short terminals: never more than rows − 1 lines', () => {
  /** the frame's lines; an empty frame (ink wrote nothing) has none */
  const frameLines = (x: Explorer) => (x.frame() === '' ? [] : screen(x));
  const NOTE = 'floorgap: enlarge the window (at least 4 rows and 20 columns)'; // src/tui/screens/TooSmallScreen.tsx

  it('fits every screen at every height from 1 to 12 rows', async () => {
    const screens: [string, string[]][] = [
      ['table', []],
      ['detail', [KEY.enter]],
      ['scrolled detail', ['j', 'j', 'j']],
      ['table', [KEY.enter]],
      ['filter', ['/', 'd']],
      ['table', [KEY.escape]],
      ['picker', ['g']],
      ['table', [KEY.escape]],
      ['help', ['?']],
      ['table', ['x']],
      ['export prompt', ['e']],
    ];
    for (let rows = 1; rows <= 12; rows++) {
      const x = await explorer({ data: fakeExplorerData().data, columns: 80, rows });
      for (const [name, keys] of screens) {
        await x.press(...keys);
        const lines = frameLines(x);
        expect(lines.length, `${name} at ${rows} rows:\n${lines.join('\n')}`).toBeLessThanOrEqual(rows - 1);
        for (const l of lines) expect(displayWidth(l), l).toBeLessThanOrEqual(80);
      }
      x.unmount();
    }
  });

  it('fits the loading screen and a failed load at every height from 1 to 12 rows', async () => {
    for (let rows = 1; rows <= 12; rows++) {
      const a = renderExplorer({ load: () => new Promise(() => undefined), rows });
      const b = renderExplorer({ load: () => Promise.reject(new Error('cannot read runs/preds.csv: no such file')), rows });
      open.push(a, b);
      await settle();
      for (const x of [a, b]) expect(frameLines(x).length, `${rows} rows:\n${x.frame()}`).toBeLessThanOrEqual(rows - 1);
    }
  });

  it('shows nothing at 1 row and one line asking for a larger window at 2 and 3 rows', async () => {
    const one = await explorer({ data: fakeExplorerData().data, rows: 1 });
    expect(frameLines(one)).toEqual([]);
    for (const rows of [2, 3]) {
      const x = await explorer({ data: fakeExplorerData().data, rows });
      expect(frameLines(x)).toEqual([NOTE]);
    }
    // and at fewer than 20 columns, cut to the width (truncate in src/terminal/sanitize.ts: 9 characters and …)
    const narrow = await explorer({ data: fakeExplorerData().data, columns: 10, rows: 24 });
    expect(frameLines(narrow)).toEqual(['floorgap:…']);
  });

  it('drops the status line below 5 rows and the header below 10 rows, keeping the table and the key line', async () => {
    // fixture (hand-built) rows in report order; 80 columns as in the 80×24 test above
    const header = '   station · lighting  floor   dev  bias   var  mism  head focus      gaps';
    const status = 'sort report order ↓ · 7 slices · 0 marked · 1/7';
    const hint = `${HINT.slice(0, 79)}…`;
    const at = async (rows: number) => frameLines(await explorer({ data: fakeExplorerData().data, rows }));
    // 4 rows: table header, one row, key line (3 = rows − 1 lines)
    const four = await at(4);
    expect([four[0], four[1].slice(0, 12), four[2]]).toEqual([header, ' * S5 · dome', hint]);
    expect(four).toHaveLength(3);
    // 5 rows: the status line comes back
    expect((await at(5)).filter((l) => l === status || l === hint)).toEqual([status, hint]);
    // 9 rows: no header lines; table header, 5 rows (8 − 3), status, key line
    const nine = await at(9);
    expect(nine[0]).toBe(header);
    expect(nine.slice(1, 6).map((l) => l.slice(0, 12))).toEqual(ROWS_80.slice(0, 5).map((r) => r.slice(0, 12)));
    expect(nine.slice(6)).toEqual([status, hint]);
    // 10 rows: the three header lines, table header, 3 rows (9 − 6), status, key line
    const ten = await at(10);
    expect(ten[0].startsWith('floorgap preds.csv · ')).toBe(true);
    expect(ten[3]).toBe(header);
    expect(ten.slice(7)).toEqual([status, hint]);
    expect(ten).toHaveLength(9);
  });

  it('keeps the prompt on the last line at 4 rows', async () => {
    const x = await explorer({ data: fakeExplorerData().data, rows: 4 });
    await x.press('/', 'd', 'o');
    expect(frameLines(x)[2]).toBe('/do▏ (Enter keeps, Esc clears)');
  });
});

describe('the detail pane', () => {
  it('shows focus, the lever, the numbers with intervals, the breakdown and examples (120×40)', async () => {
    const { data, calls } = fakeExplorerData();
    const x = await explorer({ data, columns: 120, rows: 40 });
    await x.press(KEY.enter);
    const lines = screen(x);
    // S5 (fixture, hand-built), formatted by src/tui/detail.ts: points with one decimal, gaps signed,
    // intervals [lo, hi], p and q with three decimals or <0.001
    expect(lines[3]).toBe('station=S5 · lighting=dome  focus bias  * flagged  rank 1');
    expect(prose(x)).toContain(`what to do: ${LEVER.bias}`); // the lever of focus bias (src/tui/model.ts)
    expect(lines[5]).toBe(''); // the blank line detailLines puts after the lever (one line at 120 columns)
    expect(lines[6].startsWith('rows ')).toBe(true);
    for (const expected of [
      'rows     train 2,400  train_dev 540  dev 600  test 580   share 20.0% of dev',
      'floor    3.0 —  source table',
      'error    (95% intervals)',
      '  train            11.0  [9.8, 12.3]      n 2,400',
      '  dev              13.0  [10.5, 15.9]     n 600',
      'gaps                value  interval         p          q',
      '  avoidable bias   +8.0  [+6.7, +9.3]     <0.001     <0.001',
      '  variance         +1.0  [-1.9, +4.0]     0.500      0.700',
      '  mismatch         +1.0  [-2.8, +4.8]     0.610      0.780',
      '  dev overfit      +0.5  [-3.4, +4.4]     0.800      0.820',
      'headroom 2.00 points of overall dev error',
      '         bias 1.60 · variance 0.20 · mismatch 0.20',
      'yield    0.310 pts per 1,000 new labelled rows   cost 1 per row',
      'by shift  (d: next column)',
      // the fake's breakdown (drillFixture): day ← S1's numbers, night ← S3's
      `  ${'day'.padEnd(22)} ${'600'.padStart(8)} ${'3.0'.padStart(6)} ${'3.4'.padStart(6)} ${'+0.1'.padStart(6)} ${'+0.2'.padStart(6)}  at-floor`,
      `  ${'night'.padEnd(22)} ${'300'.padStart(8)} ${'5.0'.padStart(6)} ${'2.5'.padStart(6)} ${'-3.0'.padStart(6)} ${'+0.2'.padStart(6)}  below-floor`,
      'most confident dev errors',
      // EXAMPLES_FIXTURE (hand-built)
      `  ${'J0001805'.padEnd(16)} ${'good'.padEnd(14)} ${'bridge'.padEnd(14)} 0.975`,
      `  ${'J0002211'.padEnd(16)} ${'bridge'.padEnd(14)} ${'good'.padEnd(14)} 0.912`,
    ]) {
      expect(lines, expected).toContain(expected);
    }
    expect(lines[38]).toMatch(/^↑↓ scroll {2}←→ prev\/next slice/); // DETAIL_HINT (src/tui/keys.ts)
    const s5 = sliceOfRank(data.report, 1).label;
    expect(calls.drill).toEqual([{ slice: s5, column: 'shift' }]); // the one column not in S5's key
    expect(calls.examples).toEqual([s5]);
    expectFits(x, 120, 40);
  });

  it('goes to the next and previous slice with → and ←, and back to the table with Enter', async () => {
    const x = await explorer({ data: fakeExplorerData().data, columns: 120, rows: 40 });
    await x.press(KEY.enter, KEY.right);
    expect(screen(x)[3]).toBe('station=S2 · lighting=ring  focus variance  * flagged  rank 2');
    expect(prose(x)).toContain(`what to do: ${LEVER.variance}`);
    await x.press(KEY.right, KEY.right, KEY.left);
    expect(screen(x)[3]).toBe('station=S7-rework-line-north · lighting=backlit-polarised  focus mismatch  * flagged  rank 3');
    await x.press(KEY.enter);
    expect(screen(x)[3]).toMatch(/^ {3}station · lighting/);
    expect(screen(x)[38 - 1]).toMatch(/ 3\/7$/);
  });

  it('breaks down by the next column with d', async () => {
    const { data, calls } = fakeExplorerData({ columns: ['station', 'lighting', 'shift', 'camera'] });
    const x = await explorer({ data, columns: 120, rows: 40 });
    await x.press(KEY.enter);
    expect(screen(x)).toContain('by shift  (d: next column)');
    await x.press('d');
    expect(screen(x)).toContain('by camera  (d: next column)');
    await x.press('d');
    expect(screen(x)).toContain('by shift  (d: next column)'); // wraps around
    expect(calls.drill.map((c) => c.column)).toEqual(['shift', 'camera', 'shift']);
  });

  it('shows why there are no examples, sanitised', async () => {
    const x = await explorer({ data: fakeExplorerData({ examples: 'no score column: \u001b[31mscore' }).data, columns: 120, rows: 40 });
    await x.press(KEY.enter);
    expect(screen(x)).toContain('  no score column: \\x1b[31mscore');
    expect(escapesIn(x.frames).sgr.has('31')).toBe(false);
  });

  it('scrolls to the examples at 80×24', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    await x.press(KEY.enter);
    expect(x.frame()).not.toContain(EXAMPLES_FIXTURE[0].id);
    for (let i = 0; i < 15; i++) await x.press('j');
    expect(x.frame()).toContain(EXAMPLES_FIXTURE[0].id);
    expect(x.frame()).toContain(EXAMPLES_FIXTURE[1].id);
    expectFits(x, 80, 24);
  });
});

describe('grouping picker', () => {
  it('lists the columns, toggles with space, regroups with Enter', async () => {
    const { data, calls } = fakeExplorerData();
    const x = await explorer({ data });
    await x.press('g');
    let lines = screen(x);
    expect(lines[3]).toBe('group by (space toggles, Enter applies, Esc cancels; none = overview)');
    // FAKE_COLUMNS; the fixture is grouped by station × lighting
    expect(lines.slice(4, 7)).toEqual(['  [x] station', '  [x] lighting', '  [ ] shift']);
    await x.press(' ');
    expect(screen(x)[4]).toBe('  [ ] station');
    await x.press(KEY.enter);
    expect(calls.regroup).toEqual([['lighting']]);
    lines = screen(x);
    // the fake's report (regroupedFixture): dome ← S5, ring ← S2 (both flagged), diffuse ← S4
    expect(lines[1]).toBe('grouping by lighting · 3 slices · 2 flagged · floor from mixed');
    expect(lines[3]).toMatch(/^ {3}lighting {2,}floor/);
    expect(lines.slice(4, 7).map((l) => l.slice(0, 12).trim())).toEqual(['* dome', '* ring', 'diffuse']);
    expect(lines[21]).toBe('sort report order ↓ · 3 slices · 0 marked · 1/3  grouped by lighting');
  });

  it('asks for the overview when nothing is picked, and cancels with Esc', async () => {
    const { data, calls } = fakeExplorerData();
    const x = await explorer({ data });
    await x.press('g', KEY.escape);
    expect(screen(x)[3]).toMatch(/^ {3}station · lighting/);
    await x.press('g', ' ', 'j', ' ', KEY.enter);
    expect(calls.regroup).toEqual([[]]);
    expect(screen(x)[1]).toBe('grouping overview (one-column slices) · 3 slices · 2 flagged · floor from mixed');
    expect(screen(x)[4].startsWith(' * lighting=dome')).toBe(true); // the overview shows col=value
    expect(screen(x)[21]).toMatch(/ {2}overview: one-column slices$/);
  });
});

describe('export', () => {
  // at 120×40 (status line 37, prompt line 38) so the status message is not cut
  it('exports the marked slices to the proposed path', async () => {
    const { data, calls } = fakeExplorerData();
    const x = await explorer({ data, columns: 120, rows: 40 });
    await x.press(' ', ' '); // marks S5, then S2
    expect(screen(x)[4].startsWith('+* S5 · dome')).toBe(true); // marked and flagged (cellText in src/tui/model.ts)
    expect(screen(x)[37]).toBe('sort report order ↓ · 7 slices · 2 marked · 3/7');
    await x.press('e');
    expect(screen(x)[38]).toBe(`export rows to: ${FAKE_EXPORT_PATH}▏ (Enter writes, Esc cancels)`);
    await x.press(KEY.enter);
    // the slices in the report's array order (S2 before S5 in the fixture), path as proposed, no force
    expect(calls.exportSlices).toEqual([{ slices: ['station=S2 · lighting=ring', 'station=S5 · lighting=dome'], path: FAKE_EXPORT_PATH, force: false }]);
    expect(screen(x)[37]).toBe(`sort report order ↓ · 7 slices · 2 marked · 3/7  wrote 2 slices to ${FAKE_EXPORT_PATH}`);
  });

  it('asks before overwriting: y exports with force, n keeps the file', async () => {
    const { data, calls } = fakeExplorerData();
    const x = await explorer({ data, columns: 120, rows: 40, fileExists: (p) => p === FAKE_EXPORT_PATH });
    await x.press('e', KEY.enter);
    expect(screen(x)[38]).toBe(`${FAKE_EXPORT_PATH} exists: overwrite it and its manifest? (y/n)`);
    await x.press('n');
    expect(calls.exportSlices).toEqual([]);
    expect(screen(x)[37]).toMatch(/ {2}export cancelled: the file was kept$/);
    await x.press('e', KEY.enter, 'y');
    // nothing marked: the flagged slices S2, S5, S7 in array order
    expect(calls.exportSlices).toEqual([
      { slices: ['station=S2 · lighting=ring', 'station=S5 · lighting=dome', 'station=S7-rework-line-north · lighting=backlit-polarised'], path: FAKE_EXPORT_PATH, force: true },
    ]);
  });

  it('takes a typed path', async () => {
    const { data, calls } = fakeExplorerData();
    const x = await explorer({ data, columns: 120, rows: 40 });
    await x.press('e', ...Array<string>(FAKE_EXPORT_PATH.length).fill(KEY.backspace), 'out.csv', KEY.enter);
    expect(calls.exportSlices.map((c) => c.path)).toEqual(['out.csv']);
  });
});

describe('quitting', () => {
  it('calls onExit(0) once for q', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    await x.press('q');
    await x.press('q');
    expect(x.exits.map((e) => e.code)).toEqual([0]);
  });

  it('calls onExit(130) for Ctrl-C, even in a prompt', async () => {
    const x = await explorer({ data: fakeExplorerData().data });
    await x.press('/', 'q');
    expect(x.exits).toEqual([]); // q is text in the filter prompt
    await x.press(KEY.ctrlC);
    expect(x.exits.map((e) => e.code)).toEqual([130]);
  });

  it('calls onExit(130) for Ctrl-C while loading', async () => {
    const x = renderExplorer({ load: () => new Promise(() => undefined) });
    open.push(x);
    await settle();
    await x.press(KEY.ctrlC);
    expect(x.exits.map((e) => e.code)).toEqual([130]);
  });
});

describe('errors after loading', () => {
  // a bug (any error that is not a FloorgapError) ends the explorer with exit 3 and the error; a
  // FloorgapError (a file that went away, a grouping that needs the rows) is a message and the explorer goes on
  const bug = new TypeError("Cannot read properties of undefined (reading 'cells')");
  const failing = (part: Partial<ExplorerData>): ExplorerData => ({ ...fakeExplorerData().data, ...part });

  it('regroup: an internal error exits 3; a FloorgapError is a message on the status line', async () => {
    const x = await explorer({ data: failing({ regroup: () => Promise.reject(bug) }) });
    await x.press('g', ' ', KEY.enter);
    expect(x.exits).toEqual([{ code: 3, error: bug }]);
    const y = await explorer({ data: failing({ regroup: () => Promise.reject(new FloorgapError('preds.csv: cannot read the table (no such file)')) }) });
    await y.press('g', ' ', KEY.enter);
    expect(y.exits).toEqual([]);
    // the status line, cut to 80 columns (truncate in src/terminal/sanitize.ts)
    expect(screen(y)[21]).toBe('sort report order ↓ · 7 slices · 0 marked · 1/7  regroup failed: preds.csv: can…');
  });

  it('detail pane: an internal error in the breakdown or the examples exits 3', async () => {
    const a = await explorer({ data: failing({ drill: () => Promise.reject(bug) }) });
    await a.press(KEY.enter);
    expect(a.exits).toEqual([{ code: 3, error: bug }]);
    const b = await explorer({ data: failing({ examples: () => Promise.reject(bug) }) });
    await b.press(KEY.enter);
    expect(b.exits).toEqual([{ code: 3, error: bug }]);
  });

  it('export: an internal error exits 3', async () => {
    const x = await explorer({ data: failing({ exportSlices: () => Promise.reject(bug) }) });
    await x.press('e', KEY.enter);
    expect(x.exits).toEqual([{ code: 3, error: bug }]);
  });
});

describe('NO_COLOR (color={false})', () => {
  /** Walks through every screen and returns all frames ink wrote. */
  async function session(color: boolean): Promise<readonly string[]> {
    const x = await explorer({ data: fakeExplorerData().data, color, columns: 120, rows: 40 });
    await x.press(' ', 'i', KEY.enter, 'd', KEY.enter, '/', 'r', 'i', KEY.enter, KEY.escape, 'g', KEY.escape, '?', 'x', 'e', KEY.escape, 'h');
    return x.frames;
  }

  it('writes no colour or dim codes; only bold and the inverse cursor remain', async () => {
    const frames = await session(false);
    expect(frames.length).toBeGreaterThan(10);
    const { sgr, other } = escapesIn(frames);
    expect(other).toEqual([]);
    // What the frames contain: 1/22 (bold on/off: the title, table header, flagged marks, prompts) and
    // 7/27 (inverse on/off: the selected row and picker line, the only cursor there is). No foreground
    // colour (30–37, 39, 90–97, 38;…), background (40–49) or dim (2).
    expect([...sgr].sort()).toEqual(['1', '22', '27', '7']);
  });

  it('does write colours with color={true} (so the check above can fail)', async () => {
    const { sgr } = escapesIn(await session(true));
    for (const code of ['31', '33', '35', '2', '39']) expect(sgr.has(code), code).toBe(true); // red bias, yellow variance, magenta mismatch, dim
  });
});

describe('terminal escapes in the data', () => {
  // edits of the fixture: labels, a grouping column, a hint, a file name, picker columns, breakdown
  // values and example ids carrying ESC sequences, a C1 CSI (U+009B) and a right-to-left override
  function hostile(): ReturnType<typeof fakeExplorerData> {
    let report = withLabel(withLabel(reportFixture(), 1, 'S5\u001b[2J'), 2, 'S2\u202eevil');
    report = {
      ...report,
      by: ['sta\u001b[31mtion'],
      source: { ...report.source, inputs: [{ path: 'runs/pre\u001b]52;c;aGk=\u0007ds.csv', bytes: 1, modified: '2024-06-03T09:41:27.000Z' }] },
      slices: report.slices.map((s) => (s.rank === 1 ? { ...s, hints: ['noisy labels\u001b[5m here'] } : s)),
    };
    return fakeExplorerData({
      report,
      columns: ['sta\u001b[31mtion', 'light\u009b2Jing', 'shift\u202e'],
      drillValues: ['d\u001b[2Jay', '\u202enight'],
      examples: [{ id: 'J\u001b[31m1', label: 'good\u202e', pred: 'bridge', score: 0.9 }],
      exportMessage: 'wrote 1 slice',
    });
  }

  it('never lets them reach a frame raw, on any screen', async () => {
    const x = await explorer({ data: hostile().data, title: 'x\u001b[2J.csv', columns: 120, rows: 40 });
    await x.press(KEY.enter); // detail: label, hint, breakdown, examples
    const detail = x.frame();
    await x.press(KEY.enter, 'g', 'j', ' ', KEY.enter); // picker, then regroup by both odd columns
    const regrouped = x.frame();
    await x.press('/', '\u202e', 'x'); // typed into the filter prompt
    const prompt = x.frame();
    const { sgr, other } = escapesIn(x.frames);
    expect(other).toEqual([]);
    expect([...sgr].sort()).toEqual(['1', '22', '27', '7']); // no colour smuggled in (\x1b[31m, \x1b[5m)
    // escaped by sanitize (src/terminal/sanitize.ts) instead
    expect(detail).toContain('S5\\x1b[2J  focus bias'); // withLabel replaces the whole label
    expect(detail).toContain('note: noisy labels\\x1b[5m here');
    expect(detail).toContain('d\\x1b[2Jay');
    expect(detail).toContain('\\u202enight');
    expect(detail).toContain('J\\x1b[31m1');
    expect(detail).toContain('good\\u202e');
    expect(regrouped).toContain('grouped by sta\\x1b[31mtion × light\\x9b2Jing');
    expect(prompt).toContain('/\\u202ex▏');
  });

  it('escapes them in the table, its header and the picker', async () => {
    const x = await explorer({ data: hostile().data, columns: 120, rows: 40 });
    const table = screen(x);
    expect(table[0]).toBe('floorgap pre\\x1b]52;c;aGk=\\x07ds.csv · train 12,000 · train_dev 2,700 · dev 3,000 · test 2,900');
    expect(table[1].startsWith('grouping by sta\\x1b[31mtion · 7 slices')).toBe(true);
    expect(table[3].startsWith('   sta\\x1b[31mtion ')).toBe(true);
    expect(table[4].startsWith(' * S5\\x1b[2J ')).toBe(true);
    expect(table[5].startsWith(' * S2\\u202eevil ')).toBe(true);
    await x.press('g');
    expect(screen(x).slice(4, 7)).toEqual(['  [x] sta\\x1b[31mtion', '  [ ] light\\x9b2Jing', '  [ ] shift\\u202e']);
    expect(escapesIn(x.frames).other).toEqual([]);
  });
});
