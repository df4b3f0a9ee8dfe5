/**
 * A stdout that cannot be written: the built binary with its stdout on /dev/full (every write fails
 * with ENOSPC) ends in one line `floorgap: cannot write to stdout: …` and exit 2, not a stack trace; a
 * reader that closes the pipe early (`| head`, EPIPE) is no error. In-process, a failed write of a
 * command's result is the same line and exit 2.
 */
import { spawn } from 'node:child_process';
import { closeSync, existsSync, openSync } from 'node:fs';
import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { CLI, ROOT } from '../helpers/run-cli.js';

const SAMPLE = ['data-samples/solder-joints.csv', '--floor-table', 'data-samples/inspector-floors.csv'];
const FULL = '/dev/full';

/** Runs the binary with stdout on `fd` (or a pipe the test closes at once); resolves with the exit code and stderr. */
function run(args: readonly string[], stdout: number | 'closed-pipe'): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [CLI, ...args], {
      cwd: ROOT,
      env: { ...process.env, NO_COLOR: '1' },
      stdio: ['ignore', stdout === 'closed-pipe' ? 'pipe' : stdout, 'pipe'],
    });
    if (stdout === 'closed-pipe') child.stdout!.destroy();
    let stderr = '';
    child.stderr!.on('data', (d: Buffer) => (stderr += d.toString('utf8')));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stderr }));
  });
}

const LINE = 'floorgap: cannot write to stdout: the disk is full (no space left on device)\n';

describe.skipIf(!existsSync(FULL))('stdout on /dev/full', () => {
  it.each([
    ['report', ['report', ...SAMPLE, '--no-cache']],
    ['report --format json', ['report', ...SAMPLE, '--no-cache', '--format', 'json']],
    ['--help', ['--help']],
    ['sql (the printed query)', ['sql', '--table', 'lake.preds', '--slice-cols', 'station,lighting']],
  ])('%s: one line, exit 2', async (_name, args) => {
    const fd = openSync(FULL, 'w');
    try {
      const r = await run(args, fd);
      expect(r.stderr).toBe(LINE);
      expect(r.code).toBe(2);
    } finally {
      closeSync(fd);
    }
  }, 60_000);
});

describe('a reader that closes the pipe early', () => {
  it('is no error: no line, exit 0', async () => {
    const r = await run(['report', ...SAMPLE, '--no-cache', '--format', 'json'], 'closed-pipe');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
  }, 60_000);
});

describe('in-process: a failed write of the result', () => {
  it('is one line and exit 2', async () => {
    // a stdout whose every write fails as a full disk's does: fixture (an errno error as Node makes it)
    const stdout = new Writable({
      write(_chunk, _enc, done) {
        done(Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC', errno: -28, syscall: 'write' }));
      },
    });
    stdout.on('error', () => undefined); // the binary's listener (src/cli.ts) is not installed in-process
    let stderr = '';
    const err = new Writable({
      write(chunk: Buffer, _enc, done) {
        stderr += chunk.toString();
        done();
      },
    });
    const code = await main(['sql', '--table', 'lake.preds', '--slice-cols', 'station'], { stdout, stderr: err, env: { ...process.env, NO_COLOR: '1' }, cwd: ROOT });
    expect(stderr).toBe(LINE);
    expect(code).toBe(2);
  });
});
