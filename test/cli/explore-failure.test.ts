/**
 * Failures inside the explorer, end to end in this process: `main` runs `floorgap explore` on a fake
 * terminal (stdin and stdout TTYs) over the bundled sample, and a failure is injected where the
 * explorer's work happens — the report builder (loading, regroup, the detail pane's breakdown), the
 * export command, the detail pane's drawing. An internal error (not a FloorgapError) must restore the
 * terminal, then print exactly the line `floorgap report` prints for the same failure, and exit 3
 * (README, exit codes); a FloorgapError keeps exit 2 and its one line.
 */
import { EventEmitter } from 'node:events';
import { copyFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Writable } from 'node:stream';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { main } from '../../src/cli/index.js';
import { runExport } from '../../src/cli/commands/export.js';
import { buildReport } from '../../src/triage/report.js';
import { detailLines } from '../../src/tui/detail.js';
import { explorerData } from '../../src/app/explorer-data.js';
import { error } from '../../src/core/errors.js';

vi.mock('../../src/triage/report.js', async (original) => {
  const actual = await original<typeof import('../../src/triage/report.js')>();
  return { ...actual, buildReport: vi.fn(actual.buildReport) };
});
vi.mock('../../src/cli/commands/export.js', async (original) => {
  const actual = await original<typeof import('../../src/cli/commands/export.js')>();
  return { ...actual, runExport: vi.fn(actual.runExport) };
});
vi.mock('../../src/tui/detail.js', async (original) => {
  const actual = await original<typeof import('../../src/tui/detail.js')>();
  return { ...actual, detailLines: vi.fn(actual.detailLines) };
});
vi.mock('../../src/app/explorer-data.js', async (original) => {
  const actual = await original<typeof import('../../src/app/explorer-data.js')>();
  return { ...actual, explorerData: vi.fn(actual.explorerData) };
});

const SAMPLE = ['data-samples/solder-joints.csv', '--floor-table', 'data-samples/inspector-floors.csv', '--no-cache'];

/** A terminal's output side: keeps what is written. */
class Screen extends Writable {
  text = '';
  readonly isTTY = true;
  readonly rows = 30;
  constructor(readonly columns = 100) {
    super();
  }
  override _write(chunk: Buffer | string, _enc: BufferEncoding, done: (e?: Error | null) => void): void {
    this.text += chunk.toString();
    done();
  }
}

/** A terminal's keyboard, as ink reads it ('readable', then read()); records raw-mode changes. */
class Keyboard extends EventEmitter {
  readonly isTTY = true;
  readonly rawModes: boolean[] = [];
  private pending: string | null = null;
  setRawMode(mode: boolean) {
    this.rawModes.push(mode);
    return this;
  }
  setEncoding() {
    return this;
  }
  ref() {
    return this;
  }
  unref() {
    return this;
  }
  resume() {
    return this;
  }
  pause() {
    return this;
  }
  read(): string | null {
    const d = this.pending;
    this.pending = null;
    return d;
  }
  /** one key, as one read */
  type(key: string) {
    this.pending = key;
    this.emit('readable');
  }
}

class Captured extends Writable {
  text = '';
  override _write(chunk: Buffer | string, _enc: BufferEncoding, done: (e?: Error | null) => void): void {
    this.text += chunk.toString();
    done();
  }
}

const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

interface Session {
  readonly done: Promise<number>;
  readonly screen: Screen;
  readonly keyboard: Keyboard;
  readonly stderr: Captured;
  /** types keys one read at a time, letting the explorer draw after each */
  press(...keys: string[]): Promise<void>;
}

/** Starts `floorgap explore ARGS` on the fake terminal; resolves once the table is loaded (unless `wait` is false). */
async function explore(args: readonly string[], env: Record<string, string> = {}, wait = true, columns = 100): Promise<Session> {
  const screen = new Screen(columns);
  const keyboard = new Keyboard();
  const stderr = new Captured();
  const loadedBefore = vi.mocked(explorerData).mock.results.length;
  const done = main(['explore', ...args], {
    stdout: screen,
    stderr,
    stdin: keyboard as unknown as NodeJS.ReadStream,
    env: { ...process.env, NO_COLOR: '1', FLOORGAP_DEBUG: undefined, ...env },
    cwd: process.cwd(),
  });
  let finished = false;
  void done.then(() => (finished = true));
  if (wait) {
    // loaded: the explorer's data exists; then a moment for React to draw the table
    const deadline = Date.now() + 30_000;
    while (vi.mocked(explorerData).mock.results.length === loadedBefore && !finished) {
      if (Date.now() > deadline) throw new Error('the explorer did not load');
      await sleep(20);
    }
    await sleep(100);
  }
  return {
    done,
    screen,
    keyboard,
    stderr,
    async press(...keys) {
      for (const k of keys) {
        keyboard.type(k);
        await sleep(60);
      }
    },
  };
}

/** The terminal was given back: the alternate screen left, the cursor shown, raw mode off (as in test/e2e/explore-pty.test.ts). */
function expectRestored(s: Session) {
  const t = s.screen.text;
  expect(t.lastIndexOf('\x1b[?1049l'), 'left the alternate screen').toBeGreaterThan(t.lastIndexOf('\x1b[?1049h'));
  expect(t.lastIndexOf('\x1b[?25h'), 'the last cursor sequence shows it').toBeGreaterThan(t.lastIndexOf('\x1b[?25l'));
  expect(s.keyboard.rawModes.at(-1)).toBe(false);
}

/** A bug's error: fixture (invented), the message of a TypeError as V8 words it. */
const bug = () => new TypeError("Cannot read properties of undefined (reading 'slices')");
const BUG_LINE = "floorgap: internal error: Cannot read properties of undefined (reading 'slices')\n";

// back to the real implementations (mockReset restores the function given to vi.fn), also after a failed test
afterEach(() => {
  for (const m of [vi.mocked(buildReport), vi.mocked(runExport), vi.mocked(detailLines)]) m.mockReset();
});

describe('an internal error in the explorer: exit 3 and the line every command prints', () => {
  it('while loading: the same line as `floorgap report`, after the terminal is restored', async () => {
    vi.mocked(buildReport).mockImplementationOnce(() => {
      throw bug();
    });
    const out = new Captured();
    const err = new Captured();
    const reportCode = await main(['report', ...SAMPLE], { stdout: out, stderr: err, env: { ...process.env, NO_COLOR: '1', FLOORGAP_DEBUG: undefined }, cwd: process.cwd() });
    expect(reportCode).toBe(3);
    expect(err.text).toBe(BUG_LINE);

    vi.mocked(buildReport).mockImplementationOnce(() => {
      throw bug();
    });
    const s = await explore(SAMPLE, {}, false);
    expect(await s.done).toBe(3);
    expect(s.stderr.text).toBe(err.text);
    expectRestored(s);
  }, 30_000);

  it('with FLOORGAP_DEBUG=1 the stack follows the line, as for `floorgap report`', async () => {
    const run = async (command: 'report' | 'explore') => {
      vi.mocked(buildReport).mockImplementationOnce(() => {
        throw bug();
      });
      if (command === 'report') {
        const err = new Captured();
        const code = await main(['report', ...SAMPLE], { stdout: new Captured(), stderr: err, env: { ...process.env, NO_COLOR: '1', FLOORGAP_DEBUG: '1' }, cwd: process.cwd() });
        return { code, lines: err.text.split('\n') };
      }
      const s = await explore(SAMPLE, { FLOORGAP_DEBUG: '1' }, false);
      return { code: await s.done, lines: s.stderr.text.split('\n') };
    };
    for (const r of [await run('report'), await run('explore')]) {
      expect(r.code).toBe(3);
      expect(r.lines[0]).toBe(BUG_LINE.trimEnd());
      expect(r.lines[1]).toBe("TypeError: Cannot read properties of undefined (reading 'slices')");
      expect(r.lines[2]).toMatch(/^ {4}at /);
    }
  }, 30_000);

  it('during a regroup', async () => {
    const s = await explore(SAMPLE);
    vi.mocked(buildReport).mockImplementationOnce(() => {
      throw bug();
    });
    await s.press('g', ' ', '\r'); // the picker: tick the first column, apply
    expect(await s.done).toBe(3);
    expect(s.stderr.text).toBe(BUG_LINE);
    expectRestored(s);
  }, 30_000);

  it("in the detail pane's breakdown", async () => {
    const s = await explore(SAMPLE);
    vi.mocked(buildReport).mockImplementationOnce(() => {
      throw bug();
    });
    await s.press('\r'); // open the pane: its breakdown by the next column builds a report
    expect(await s.done).toBe(3);
    expect(s.stderr.text).toBe(BUG_LINE);
    expectRestored(s);
  }, 30_000);

  it('while drawing the detail pane (an error thrown in a render)', async () => {
    const s = await explore(SAMPLE);
    // every call throws (React renders again once after an error before it gives up)
    vi.mocked(detailLines).mockImplementation(() => {
      throw bug();
    });
    await s.press('\r');
    expect(await s.done).toBe(3);
    expect(s.stderr.text).toBe(BUG_LINE);
    expectRestored(s);
  }, 30_000);

  it('in an export; a FloorgapError there is a message and the explorer goes on', async () => {
    const s = await explore(SAMPLE);
    vi.mocked(runExport).mockRejectedValueOnce(error('rows.csv: cannot write the rows: the disk is full'));
    await s.press(' ', 'e', '\r'); // mark the first slice, export it to the proposed path
    await sleep(200);
    vi.mocked(runExport).mockRejectedValueOnce(bug());
    await s.press('e', '\r');
    expect(await s.done).toBe(3);
    expect(s.stderr.text).toBe(BUG_LINE);
    expectRestored(s);
    expect(vi.mocked(runExport)).toHaveBeenCalledTimes(2);
  }, 30_000);
});

describe('a FloorgapError in the explorer', () => {
  it('while loading: exit 2 and the same line as `floorgap report`', async () => {
    const missing = ['data-samples/no-such-table.csv', '--no-cache'];
    const err = new Captured();
    expect(await main(['report', ...missing], { stdout: new Captured(), stderr: err, env: { ...process.env, NO_COLOR: '1' }, cwd: process.cwd() })).toBe(2);
    const s = await explore(missing, {}, false);
    expect(await s.done).toBe(2);
    expect(s.stderr.text).toBe(err.text);
    expect(s.stderr.text).toMatch(/^floorgap: data-samples\/no-such-table\.csv: no such file[^\n]*\n$/);
    expectRestored(s);
  }, 30_000);
});

describe('a read that fails after loading (the file went away)', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'floorgap-explore-failure-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('is a message naming the file, and the explorer goes on (q exits 0)', async () => {
    const table = join(dir, 'preds.csv');
    copyFileSync('data-samples/solder-joints.csv', table);
    // --max-cells 1 keeps only the grouping sets of one and two columns in memory (README, Limits): a
    // regroup by three columns scans the rows again
    const s = await explore([table, '--max-cells', '1', '--no-cache'], {}, true, 250); // wide: the whole message shows
    rmSync(table);
    await s.press('g', ' ', 'j', ' ', 'j', ' ', '\r');
    await sleep(500);
    await s.press('q');
    expect(await s.done).toBe(0);
    expect(s.stderr.text).toBe('');
    // readError in src/read/read-errors.ts: the file, then what the engine said
    expect(s.screen.text).toMatch(new RegExp(`regroup failed: ${table.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')}: `));
    expectRestored(s);
  }, 30_000);
});
