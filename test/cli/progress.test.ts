/**
 * Progress of long scans: one start and one end line in logs (stderr not a terminal), a bar redrawn in
 * place on a terminal, nothing for small files unless asked. Expected strings: the format defined in
 * src/cli/progress.ts (our own).
 */
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { progressLine, scanProgress } from '../../src/cli/progress.js';
import { writeDemo } from '../../src/demo/write-demo.js';
import type { Duck } from '../../src/sql/duck.js';
import { watchProgress } from '../../src/sql/progress.js';
import { Captured, runMain } from '../helpers/run-main.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

let dir: string;
let table: string;

beforeAll(async () => {
  dir = makeTempDir();
  table = (await writeDemo(dir, { rows: 2000, seed: 2 })).table;
});

afterAll(() => {
  if (dir) removeTempDir(dir);
});

/** A stand-in for the engine whose query progress is whatever the test sets. */
function fakeDuck(progress: { percentage: number }): Duck {
  return {
    connection: {
      get progress() {
        return { percentage: progress.percentage, rows_processed: 10n, total_rows_to_process: 20n };
      },
    },
  } as unknown as Duck;
}

const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('progress in logs (stderr not a terminal)', () => {
  const run = (extra: string[]) => runMain(['report', table, '--format', 'json', '--no-cache', ...extra]);

  it('--progress always: exactly one start line and one end line', async () => {
    const r = await run(['--progress', 'always']);
    expect(r.code).toBe(0);
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^floorgap: reading .*solder-joints\.csv \(\d+\.\d MB\)$/);
    expect(lines[1]).toMatch(/^floorgap: read .*solder-joints\.csv \(\d+\.\d MB\) in \d+\.\d s \(.* MB\/s\)$/);
    expect(r.stderr).not.toContain('\r');
  });

  it('a small file under --progress auto, and --progress never: nothing on stderr', async () => {
    expect((await run([])).stderr).toBe('');
    expect((await run(['--progress', 'never'])).stderr).toBe('');
  });
});

describe('progress on a terminal', () => {
  it('redraws one bar in place while the scan runs, then clears it and prints the end line', async () => {
    const stderr = new Captured(true);
    const state = { percentage: 25 };
    const watch = scanProgress({ stderr, env: {} }, 'always')!;
    const stop = watch(fakeDuck(state), { where: 'big.csv', bytes: 200 * 1024 * 1024 });
    await wait(250);
    state.percentage = 75;
    await wait(250);
    stop();
    const text = stderr.text;
    expect(text).toContain('\r\x1b[Kfloorgap: reading big.csv  [######..................]  25 %  50 of 200 MB');
    expect(text).toContain('[##################......]  75 %  150 of 200 MB');
    expect(text).toMatch(/\r\x1b\[Kfloorgap: read big\.csv \(200 MB\) in \d+\.\d s \(.*\/s\)\n$/);
    // nothing but the bar before the end line: no new lines while it runs
    expect(text.split('\n')).toHaveLength(2);
  });

  it('shows nothing for a small file under --progress auto', () => {
    const stderr = new Captured(true);
    const stop = scanProgress({ stderr, env: {} }, 'auto')!(fakeDuck({ percentage: 10 }), { where: 'small.csv', bytes: 1000 });
    stop();
    expect(stderr.text).toBe('');
  });
});

describe('progressLine', () => {
  it('shows the share, the bytes read of all, the time and the rate', () => {
    // hand arithmetic: half of 600 MB in 2 s is 300 MB at 150 MB/s; 12 of 24 marks
    expect(progressLine('preds.csv', 600 * 1024 * 1024, { percentage: 50, rowsProcessed: 0, totalRows: 0 }, 2000)).toBe(
      'reading preds.csv  [############............]  50 %  300 of 600 MB  2.0 s  150 MB/s',
    );
  });
});

describe('watchProgress', () => {
  it('hands each new reading to the callback and stops when asked', async () => {
    const state = { percentage: -1 };
    const seen: number[] = [];
    const stop = watchProgress(fakeDuck(state), (p) => seen.push(p.percentage), 20);
    await wait(80);
    // no query running (-1): nothing reported
    expect(seen).toEqual([]);
    state.percentage = 40;
    await wait(80);
    stop();
    const count = seen.length;
    state.percentage = 90;
    await wait(80);
    expect(seen[0]).toBe(40);
    // the same reading is reported once; nothing after stop
    expect(seen).toHaveLength(count);
    expect(new Set(seen)).toEqual(new Set([40]));
  });
});
