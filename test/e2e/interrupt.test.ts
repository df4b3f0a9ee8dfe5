/**
 * Interruptions of the built CLI: Ctrl-C, SIGTERM and SIGHUP during a scan or an export end the
 * process with 128 + the signal's number (130, 143, 129, as shells report them), one line on stderr,
 * no temporary or partial file, and the file that was at the output path before untouched. The
 * explorer's own signal handling is tested in explore-pty.test.ts.
 */
import { spawn, type ChildProcessByStdio } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Readable } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { KEY, spawnPty } from '../helpers/pty.js';
import { CLI, ROOT, runCli } from '../helpers/run-cli.js';

let dir: string;
let table: string;
let cache: string;
const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-interrupt-'));
  cache = join(dir, 'cache');
  mkdirSync(cache);
  // a 1,000,000-row demo table (64 MB): its scan takes about a second, an export of a station several
  const r = await runCli(['demo', '--out', dir, '--rows', '1000000']);
  expect(r.code, r.stderr).toBe(0);
  table = join(dir, 'solder-joints.csv');
}, 60_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Run {
  readonly child: ChildProcessByStdio<null, Readable, Readable>;
  readonly out: () => string;
  readonly err: () => string;
  readonly done: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

function run(args: readonly string[]): Run {
  const child = spawn(process.execPath, [CLI, ...args], {
    cwd: ROOT,
    env: { ...process.env, NO_COLOR: '1', XDG_CACHE_HOME: cache },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  let err = '';
  child.stdout.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr.on('data', (d: Buffer) => (err += d.toString()));
  const done = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.on('close', (code, signal) => resolve({ code, signal })));
  return { child, out: () => out, err: () => err, done };
}

async function until(test: () => boolean, what: string, timeoutMs = 20_000): Promise<void> {
  const t0 = Date.now();
  while (!test()) {
    if (Date.now() - t0 > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await sleep(10);
  }
}

/** Temporary files floorgap leaves beside an output or in the cache (src/output/write-atomic.ts names them). */
function temporaries(folder: string): string[] {
  return readdirSync(folder, { recursive: true }).map(String).filter((n) => n.includes('.tmp-'));
}

describe('a signal during the scan', () => {
  it('SIGINT while `report` reads the rows: 130, one line, no cache entry half-written', async () => {
    const r = run(['report', table, '--progress', 'always']);
    await until(() => r.err().includes('reading'), 'the scan to start');
    await sleep(300);
    r.child.kill('SIGINT');
    const end = await r.done;
    expect(end).toEqual({ code: 130, signal: null });
    expect(r.out()).toBe('');
    expect(r.err().trimEnd().split('\n').at(-1)).toBe('floorgap: stopped by SIGINT');
    expect(temporaries(cache)).toEqual([]);
  }, 30_000);

  it('SIGTERM while `check` reads the rows: 143', async () => {
    const r = run(['check', table, '--max-bias', '0.5', '--progress', 'always', '--no-cache']);
    await until(() => r.err().includes('reading'), 'the scan to start');
    await sleep(300);
    r.child.kill('SIGTERM');
    expect(await r.done).toEqual({ code: 143, signal: null });
    expect(r.err().trimEnd().split('\n').at(-1)).toBe('floorgap: stopped by SIGTERM');
  }, 30_000);

  it('a signal ends the process within 2 s, with the most threads and bins the options allow', async () => {
    // the bounds (src/cli/bounds.ts) keep the work a signal must stop finite: 4 × cores threads, 1,000 bins
    const r = run(['report', table, '--threads', String(4 * cpus().length), '--bins', '1000', '--slice-cols', 'sharpness,station', '--progress', 'always', '--no-cache']);
    await until(() => r.err().includes('reading'), 'the scan to start');
    await sleep(200);
    const t0 = Date.now();
    r.child.kill('SIGTERM');
    expect(await r.done).toEqual({ code: 143, signal: null });
    expect(Date.now() - t0).toBeLessThan(2000);
  }, 30_000);
});

describe('a signal while `export` writes the rows', () => {
  for (const [signal, code] of [['SIGTERM', 143], ['SIGHUP', 129], ['SIGINT', 130]] as const) {
    it(`${signal}: ${code}, the previous file and manifest untouched, no temporary left`, async () => {
      const folder = join(dir, `out-${signal}`);
      mkdirSync(folder);
      const out = join(folder, 'rows.csv');
      writeFileSync(out, 'the previous export\n');
      writeFileSync(`${out}.manifest.json`, '{"previous": true}\n');
      const r = run(['export', table, '--out', out, '--force', '--slice', 'station=S1', '--splits', 'train,dev,test', '--no-cache']);
      // the rows go to a temporary file beside the output first: signal once it exists
      await until(() => temporaries(folder).length > 0, 'the temporary export file');
      await sleep(150);
      r.child.kill(signal);
      expect(await r.done).toEqual({ code, signal: null });
      expect(r.err().trimEnd().split('\n').at(-1)).toBe(`floorgap: stopped by ${signal}; unfinished output files removed`);
      expect(temporaries(folder)).toEqual([]);
      expect(readFileSync(out, 'utf8')).toBe('the previous export\n');
      expect(readFileSync(`${out}.manifest.json`, 'utf8')).toBe('{"previous": true}\n');
    }, 30_000);
  }

  it('without a signal the same export completes (the signal tests above stopped real work)', async () => {
    const folder = join(dir, 'out-complete');
    mkdirSync(folder);
    const out = join(folder, 'rows.csv');
    const r = run(['export', table, '--out', out, '--slice', 'station=S1', '--splits', 'train,dev,test', '--no-cache']);
    expect((await r.done).code).toBe(0);
    expect(existsSync(out)).toBe(true);
    expect(temporaries(folder)).toEqual([]);
    // as many rows as the report counts for station S1 in those splits
    const rep = JSON.parse((await runCli([table, '--by', 'station', '--format', 'json', '--no-cache'])).stdout) as {
      slices: { key: Record<string, string>; rows: Record<string, number | null> }[];
    };
    const s1 = rep.slices.find((s) => s.key.station === 'S1')!;
    const expected = (s1.rows.train ?? 0) + (s1.rows.dev ?? 0) + (s1.rows.test ?? 0);
    expect(readFileSync(out, 'utf8').trimEnd().split('\n').length - 1).toBe(expected);
  }, 60_000);
});

describe('Ctrl-C on a terminal during the scan', () => {
  it('130, and the progress line is cleared before the closing line', async () => {
    const p = spawnPty(['report', table, '--no-cache'], { cols: 100, rows: 24, env: { XDG_CACHE_HOME: cache, CI: undefined } });
    try {
      await p.waitFor(/reading|MB\/s|%/, 20_000);
      await p.press(KEY.ctrlC); // the terminal turns it into SIGINT for the foreground process
      const end = await p.exited(10_000);
      expect(end.exitCode).toBe(130);
      const lines = p.screen().filter((l) => l.trim() !== '');
      expect(lines.at(-1)).toBe('floorgap: stopped by SIGINT');
      // the line was cleared (CSI K) after the last progress frame, before the closing message
      expect(p.raw()).toMatch(/\r\x1b\[Kfloorgap: stopped by SIGINT/);
    } finally {
      p.dispose();
    }
  }, 30_000);
});
