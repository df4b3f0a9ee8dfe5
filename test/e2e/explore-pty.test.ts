/**
 * The interactive explorer end to end: the built binary in a pseudo-terminal with a terminal emulator
 * attached, driven by key presses the way a user drives it. Expected values come from the JSON report
 * of the same data (`floorgap report … --format json`), key bindings from src/tui/keys.ts (and the
 * reducer in src/tui/state.ts), the lever sentences from LEVER in src/tui/model.ts, exit codes from the
 * README (2 for bad input) and from the explorer's signal handlers (128 + the signal's number).
 *
 * Needs `npm run build` first (npm test does it).
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { LEVER } from '../../src/tui/model.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { KEY, spawnPty, type PtySession } from '../helpers/pty.js';
import { CLI, ROOT, runCli } from '../helpers/run-cli.js';
import { startTmux, tmuxAvailable, type TmuxSession } from '../helpers/tmux.js';

const SAMPLE = ['data-samples/solder-joints.csv', '--floor-table', 'data-samples/inspector-floors.csv', '--annotators', 'insp_a,insp_b,insp_c'];
const COLS = 80;
const ROWS = 24;
/** the longest any single wait may take (loading the sample takes a few seconds) */
const WAIT = 15_000;
/** the status line of a loaded table always starts with the sort (src/tui/components/StatusBar.tsx) */
const TABLE = /^sort \S/;

/** The slice with the most headroom (ties: the report's rank), as `h` sorts (src/tui/model.ts). */
function mostHeadroom(report: Report): SliceReport {
  const withHeadroom = report.slices.filter((s) => s.headroom !== null);
  return withHeadroom.reduce((best, s) => (s.headroom!.total > best.headroom!.total || (s.headroom!.total === best.headroom!.total && s.rank < best.rank) ? s : best));
}

/**
 * What is wrong with the frame on screen, or null: the explorer draws at most rows − 1 lines (so the
 * last terminal row stays blank) and no line wider than the terminal (a wider one would wrap, which
 * the emulator marks on the continuation row).
 */
function frameProblem(p: PtySession): string | null {
  const lines = p.screen();
  if (lines[lines.length - 1].trim() !== '') return `the last row is not blank: ${JSON.stringify(lines[lines.length - 1])}`;
  const wrapped = p.wrappedRows();
  if (wrapped.length > 0) return `rows ${wrapped.join(', ')} continue a line wider than ${p.cols} columns`;
  const wide = lines.find((l) => [...l].length > p.cols);
  return wide ? `a line is wider than ${p.cols} columns: ${JSON.stringify(wide)}` : null;
}

function expectFrameFits(p: PtySession) {
  expect(frameProblem(p)).toBeNull();
}

/** The table's rows: the lines between its header line and the first blank line or the status line. */
function tableRows(lines: readonly string[], header: RegExp): string[] {
  const top = lines.findIndex((l) => header.test(l));
  expect(top, `no table header matching ${header}`).toBeGreaterThanOrEqual(0);
  const rows: string[] = [];
  for (const l of lines.slice(top + 1)) {
    if (l.trim() === '' || TABLE.test(l)) break;
    rows.push(l);
  }
  return rows;
}

/** The label cell of a table row (after the 2-column mark and a space), as drawn: maybe cut with `…`. */
function labelCell(row: string): string {
  return row.slice(3).split(/ {2,}/)[0];
}

/** A label cell shows `label`, whole or cut short with an ellipsis. */
function showsLabel(cell: string, label: string): boolean {
  return cell.endsWith('…') ? label.startsWith(cell.slice(0, -1)) : cell === label;
}

function expectRestored(p: PtySession) {
  expect(p.isAlternate(), 'back on the main screen').toBe(false);
  expect(p.cursorVisible(), 'the last cursor sequence shows it').toBe(true);
}

let overview: Report;
let grouped: Report;
/** the JSON reports, computed while the first terminal session loads */
let expected: Promise<void>;
const open: PtySession[] = [];

function start(args: readonly string[], cols = COLS, rows = ROWS): PtySession {
  const p = spawnPty(args, { cols, rows });
  open.push(p);
  return p;
}

beforeAll(() => {
  if (!existsSync(CLI)) throw new Error(`${CLI} is missing: run npm run build first`);
  // the expected values: the JSON report of the same data, the overview and the grouping the test picks
  expected = Promise.all([runCli([...SAMPLE, '--format', 'json']), runCli([...SAMPLE, '--by', 'station,lighting', '--format', 'json'])]).then(([a, b]) => {
    if (a.code !== 0 || b.code !== 0) throw new Error(`floorgap report failed: ${a.stderr}${b.stderr}`);
    overview = JSON.parse(a.stdout) as Report;
    grouped = JSON.parse(b.stdout) as Report;
  });
  expected.catch(() => {}); // reported by the tests that await it
});

afterAll(() => {
  for (const p of open.splice(0)) p.dispose();
});

describe(`explore in a ${COLS}×${ROWS} terminal`, () => {
  let p: PtySession;
  const problems: string[] = [];
  let stopWatching = () => {};

  it('shows a first frame, then the table, every frame within rows − 1 lines and the width', async () => {
    p = start(['explore', ...SAMPLE]);
    // every chunk of output, from the first frame on, is checked while the size stays 80×24
    stopWatching = p.onDraw((s) => {
      if (!s.isAlternate()) return;
      const problem = frameProblem(s);
      if (problem && problems.length < 5) problems.push(`${problem}\n${s.screen().join('\n')}`);
    });
    await p.waitFor(/^loading |^sort \S/, WAIT); // the loading screen, or the table when loading was quick
    expect(p.isAlternate()).toBe(true);
    expect(p.cursorVisible()).toBe(false);
    expectFrameFits(p);
    const lines = await p.waitFor(TABLE, WAIT);
    expectFrameFits(p);
    await expected;
    expect(lines.join('\n')).toContain(`grouping overview (one-column slices) · ${overview.slices.length} slices`);
    expect(tableRows(lines, /^ {3}slice /).length).toBeGreaterThan(5);
    expect(problems).toEqual([]);
  }, 40_000);

  it('h sorts by headroom: the top row is the slice with the most headroom in the JSON report', async () => {
    const top = mostHeadroom(overview);
    await p.press('h');
    const lines = await p.waitFor(/^sort headroom ↓/, WAIT);
    const first = tableRows(lines, /^ {3}slice /)[0];
    expect(showsLabel(labelCell(first), top.label), `top row ${JSON.stringify(first)}, expected ${top.label}`).toBe(true);
    expectFrameFits(p);
  });

  it('g, space, ↓, space, Enter regroups by two columns', async () => {
    await p.press('g');
    await p.waitFor('group by (space toggles', WAIT);
    await p.press(KEY.space, KEY.down, KEY.space);
    // the picker lists the candidate columns in table order: station, then lighting
    await p.waitUntil((l) => l.some((x) => x.includes('[x] station')) && l.some((x) => x.includes('[x] lighting')), WAIT, 'station and lighting ticked');
    await p.press(KEY.enter);
    const lines = await p.waitFor('grouping by station × lighting', WAIT);
    const rows = tableRows(lines, /^ {3}station · lighting /);
    expect(rows.length).toBeGreaterThan(5);
    for (const r of rows) expect(labelCell(r)).toMatch(/^S\d · \S/);
    // still sorted by headroom: the grouped JSON report's top slice, shown by its values
    const top = mostHeadroom(grouped);
    expect(showsLabel(labelCell(rows[0]), Object.values(top.key).join(' · '))).toBe(true);
    expect(lines.join('\n')).toContain(`${grouped.slices.length} slices`);
    expectFrameFits(p);
  });

  it('Enter opens the detail pane: the lever for its focus and the most confident dev errors', async () => {
    const top = mostHeadroom(grouped);
    await p.press(KEY.enter);
    const lines = await p.waitFor('what to do:', WAIT);
    expect(lines.find((l) => l.includes('  focus '))).toContain(`${top.label}  focus ${top.focus}`);
    // the lever sentence wraps at the width: join the rows back into one text
    const text = lines.map((l) => l.trim()).join(' ');
    expect(text).toContain(`what to do: ${LEVER[top.focus]}`);
    expectFrameFits(p);
    // the examples sit below the fold at 24 rows: page down until they show (how far depends on the
    // breakdown and examples, which load after the pane opens)
    for (let i = 0; i < 4 && !p.screen().some((l) => l.includes('most confident dev errors')); i++) {
      await p.press(KEY.pageDown);
      await p.waitUntil((l) => !l.some((x) => x === '  …'), WAIT, 'the breakdown and examples loaded');
    }
    await p.waitFor('most confident dev errors', WAIT);
    expectFrameFits(p);
    await p.press(KEY.enter); // back to the table
    await p.waitFor(/^ {3}station · lighting /, WAIT);
  });

  it('/ low Enter filters: every visible row contains "low"', async () => {
    await p.press('/', 'l', 'o', 'w', KEY.enter);
    const lines = await p.waitFor(/filter "low" \(\d+ of \d+\)/, WAIT);
    const rows = tableRows(lines, /^ {3}station · lighting /);
    const expected = grouped.slices.filter((s) => s.label.toLowerCase().includes('low'));
    expect(rows).toHaveLength(expected.length);
    for (const r of rows) expect(r).toContain('low');
    expectFrameFits(p);
    stopWatching();
    expect(problems).toEqual([]);
  });

  it('/ then "xyz", three Backspaces and Enter in one write: every key applies, the filter stays "low"', async () => {
    await p.press('/', 'xyz\x7f\x7f\x7f\r'); // press writes each argument at once: one read for the burst
    const lines = await p.waitUntil((l) => /^↑↓ move /.test(l[ROWS - 2]) && /filter "low" \(\d+ of \d+\)/.test(l[ROWS - 3]), WAIT, 'the prompt closed with the filter "low"');
    for (const r of tableRows(lines, /^ {3}station · lighting /)) expect(r).toContain('low');
    expectFrameFits(p);
  });

  it('resizing to 60×20 lays the screen out again', async () => {
    p.resize(60, 20);
    const lines = await p.waitUntil((l) => l.some((x) => /^ {3}station · /.test(x)) && l.some((x) => TABLE.test(x)) && frameProblem(p) === null && l[0].length <= 60 && l[0].endsWith('…'), WAIT, 'the table laid out for 60 columns');
    expect(lines).toHaveLength(20);
    expectFrameFits(p);
    for (const r of tableRows(lines, /^ {3}station · /)) expect(r).toContain('low');
  });

  it('q quits: exit 0, main screen, cursor shown', async () => {
    await p.press('q');
    expect(await p.exited()).toEqual({ exitCode: 0, signal: 0 });
    expectRestored(p);
  });
});

describe('explore ends on a signal with 128 + its number and restores the terminal', () => {
  it('Ctrl-C on the table: 130', async () => {
    const p = start(['explore', ...SAMPLE]);
    await p.waitFor(TABLE, WAIT);
    await p.press(KEY.ctrlC); // a key in raw mode (src/tui/state.ts), not a signal
    expect(await p.exited()).toEqual({ exitCode: 130, signal: 0 });
    expectRestored(p);
  }, 30_000);

  it('SIGTERM on the table: 143', async () => {
    const p = start(['explore', ...SAMPLE]);
    await p.waitFor(TABLE, WAIT);
    p.kill('SIGTERM');
    expect(await p.exited()).toEqual({ exitCode: 143, signal: 0 });
    expectRestored(p);
  }, 30_000);
});

describe('stopping while the table loads', () => {
  // a larger demo table (the bundled generator), so the scan is still running a second in
  let dir: string;
  let big: string[];
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'floorgap-pty-'));
    const r = await runCli(['demo', '--out', dir, '--rows', '300000']);
    expect(r.code, r.stderr).toBe(0);
    big = [join(dir, 'solder-joints.csv'), '--floor-table', join(dir, 'inspector-floors.csv'), '--annotators', 'insp_a,insp_b,insp_c'];
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  /** one second into loading, by the loading screen's clock (src/tui/screens/LoadingScreen.tsx), or the table if it came first */
  const aSecondIn = (p: PtySession) => p.waitUntil((l) => l.some((x) => /\b[1-9]\d*\.\d s$/.test(x)) || l.some((x) => TABLE.test(x)), WAIT, 'a second of loading');

  it('SIGHUP: 129, terminal restored', async () => {
    const p = start(['explore', ...big]);
    await aSecondIn(p);
    p.kill('SIGHUP');
    expect(await p.exited(5_000)).toEqual({ exitCode: 129, signal: 0 });
    expectRestored(p);
  }, 30_000);

  it('q: exits 0 within seconds (closing the engine under a running scan used to hang the process)', async () => {
    const p = start(['explore', ...big]);
    await aSecondIn(p);
    await p.press('q');
    expect(await p.exited(5_000)).toEqual({ exitCode: 0, signal: 0 });
    expectRestored(p);
  }, 30_000);
});

describe('the scrollback is never cleared', () => {
  /** the sizes the window goes through: shorter, taller, shorter again, several times */
  const SIZES: readonly (readonly [number, number])[] = [
    [80, 16],
    [80, 30],
    [80, 12],
    [80, 24],
    [80, 10],
    [80, 28],
    [80, 14],
  ];
  /** the table laid out for the current size: status and key lines are the frame's last two (rows − 1 lines) */
  const laidOut = (rows: number) => (l: string[]) => TABLE.test(l[rows - 3] ?? '') && /^↑↓ move /.test(l[rows - 2] ?? '') && l[rows - 1] === '';

  it('resizing shorter and taller never writes ESC [ 3 J (erase the scrollback)', async () => {
    const p = start(['explore', ...SAMPLE]);
    await p.waitFor(TABLE, WAIT);
    for (const [cols, rows] of SIZES) {
      p.resize(cols, rows);
      await p.waitUntil(laidOut(rows), WAIT, `the table laid out for ${cols}×${rows}`);
    }
    await p.press('q');
    expect(await p.exited()).toEqual({ exitCode: 0, signal: 0 });
    // ESC [ 3 J is "erase saved lines" (ECMA-48 ED with parameter 3, as xterm and tmux implement it)
    expect(p.raw().includes('\x1b[3J'), 'ESC [ 3 J written').toBe(false);
    expectRestored(p);
  }, 60_000);

  it('in tmux: the 180 lines written before the explorer are still in the scrollback after it quits', async (ctx) => {
    if (!tmuxAvailable()) {
      ctx.skip(); // the test above holds the byte-level guarantee
      return;
    }
    const env: Record<string, string> = {};
    for (const [k, v] of Object.entries(process.env)) if (v !== undefined && !['CI', 'CONTINUOUS_INTEGRATION', 'TMUX', 'TMUX_PANE'].includes(k)) env[k] = v;
    const args = ['explore', ...SAMPLE].map((a) => `'${a}'`).join(' ');
    // 180 numbered lines, then the explorer, then its exit code on the main screen
    const t = startTmux(`i=1; while [ $i -le 180 ]; do echo "scrollback line $i"; i=$((i+1)); done; '${process.execPath}' '${CLI}' ${args}; echo "explorer exited $?"`, { cols: 80, rows: 24, cwd: ROOT, env });
    try {
      await t.waitFor(TABLE, WAIT);
      const before = t.historySize();
      // 180 lines and the explorer's command line on a 24-row pane: at least 180 − 24 lines scrolled off
      expect(before).toBeGreaterThanOrEqual(180 - 24);
      for (const [cols, rows] of SIZES) {
        t.resize(cols, rows);
        await waitForTmux(t, laidOut(rows), `the table laid out for ${cols}×${rows} in tmux`);
      }
      t.sendKeys('q');
      await t.waitFor(/^explorer exited 0$/, WAIT);
      expect(t.historySize()).toBeGreaterThanOrEqual(before);
      const all = t.everything();
      for (const n of [1, 2, 90, 179, 180]) expect(all, `scrollback line ${n}`).toContain(`scrollback line ${n}`);
    } finally {
      t.kill();
    }
  }, 60_000);
});

/** Polls a tmux pane until `test(screen)` holds. */
async function waitForTmux(t: TmuxSession, test: (lines: string[]) => boolean, what: string): Promise<void> {
  const deadline = Date.now() + WAIT;
  while (!test(t.screen())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}; screen:\n${t.screen().map((l) => `|${l}`).join('\n')}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('short terminals', () => {
  /** src/tui/screens/TooSmallScreen.tsx: what a terminal of fewer than 4 rows shows */
  const NOTE = 'floorgap: enlarge the window (at least 4 rows and 20 columns)';
  /** what the frame shows at `rows` (screenLayout in src/tui/model.ts), always within rows − 1 lines */
  const expectedAt = (rows: number) => (l: string[]) => {
    if (l[rows - 1] !== '') return false;
    if (rows === 1) return true;
    if (rows <= 3) return l[0] === NOTE;
    if (rows === 4) return /^ {3}slice /.test(l[0]) && /^↑↓ move /.test(l[2]);
    return TABLE.test(l[rows - 3]) && /^↑↓ move /.test(l[rows - 2]) && (rows >= 10) === l[0].startsWith('floorgap ');
  };
  /** waits until nothing has been written for `ms` */
  const quiet = async (p: PtySession, ms = 300) => {
    let seen = -1;
    while (p.raw().length !== seen) {
      seen = p.raw().length;
      await new Promise((r) => setTimeout(r, ms));
    }
  };

  it('resized to every height from 10 rows down to 1 and back, the frame keeps the last row free', async () => {
    const p = start(['explore', ...SAMPLE]);
    await p.waitFor(TABLE, WAIT);
    for (const rows of [10, 9, 8, 7, 6, 5, 4, 3, 2, 1, 2, 5, 8, 24]) {
      p.resize(COLS, rows);
      await p.waitUntil(expectedAt(rows), WAIT, `the frame laid out for ${COLS}×${rows}`);
      await quiet(p);
      expect(expectedAt(rows)(p.screen()), `${rows} rows:\n${p.screen().join('\n')}`).toBe(true);
      expectFrameFits(p);
    }
    await p.press('q');
    expect(await p.exited()).toEqual({ exitCode: 0, signal: 0 });
    expect(p.raw().includes('\x1b[3J'), 'ESC [ 3 J written').toBe(false);
    expectRestored(p);
  }, 90_000);
});

describe('hostile slice values on a real terminal', () => {
  it('control sequences from the data reach the screen as visible escapes, never as live ones', async () => {
    // test/fixtures/bad/control-values.csv: stations "S1 ESC[2J", "S2 OSC 52 (clipboard write) BEL", "S3 BEL", "S4 RLO evil"
    const p = start(['explore', 'test/fixtures/bad/control-values.csv', '--slice-cols', 'station', '--no-cache'], 100, 30);
    await p.waitFor(TABLE, WAIT);
    const screen = p.screen().join('\n');
    expect(screen).toContain('station=S1\\x1b[2J');
    expect(screen).toContain('station=S3\\x07');
    expect(screen).toContain('station=S4\\u202e'); // shortened with … at this width
    const raw = p.raw();
    expect(raw).not.toContain('\x1b]52'); // no clipboard write
    expect(raw).not.toContain('S1\x1b[2J'); // the value's own clear-screen never written as such
    expect(raw).not.toContain('\x07');
    expect(raw).not.toContain('\u202e');
    await p.press('q');
    expect(await p.exited()).toEqual({ exitCode: 0, signal: 0 });
  }, 30_000);
});

describe('explore without a terminal on stdout prints the text report', () => {
  it('floorgap explore FILES', async () => {
    const r = await runCli(['explore', ...SAMPLE]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('floorgap slice report');
    expect(r.stdout).not.toContain('\x1b[?1049h');
  });

  it('floorgap FILES (the default command)', async () => {
    const r = await runCli(SAMPLE);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('floorgap slice report');
    expect(r.stdout).not.toContain('\x1b[?1049h');
  });
});

describe('a load error', () => {
  afterEach(() => {
    for (const p of open.splice(0)) p.dispose();
  });

  it('shows the message, exits 2 and restores the terminal, repeating the message on the main screen', async () => {
    const missing = 'data-samples/no-such-table.csv';
    const p = start(['explore', missing]);
    await p.waitFor(`floorgap: ${missing}: no such file`, WAIT);
    expect(p.isAlternate()).toBe(true);
    expectFrameFits(p);
    expect(await p.exited()).toEqual({ exitCode: 2, signal: 0 });
    expectRestored(p);
    // stderr's one line (README: exit 2, one line naming the file) lands on the main screen
    expect(p.screen().join('\n')).toContain(`floorgap: ${missing}: no such file`);
  }, 30_000);
});
