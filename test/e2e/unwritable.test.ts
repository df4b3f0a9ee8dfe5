/**
 * Outputs that cannot be written: a missing folder, a folder as the path, a read-only file system and a
 * full disk (small tmpfs mounts, when this machine lets the tests mount them: as root, or a read-only
 * folder by permissions otherwise), and a write that fails at the lowest layer (in-process). Each ends
 * in one line naming the path and the cause, exit 2, no temporary file, and the previous file untouched.
 */
import { execFileSync } from 'node:child_process';
import { chmodSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir, userInfo } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeAtomic } from '../../src/output/write-atomic.js';
import { failure } from '../helpers/failure.js';
import { runCli } from '../helpers/run-cli.js';

const SAMPLE = 'data-samples/solder-joints.csv';
let dir: string;
const mounts: string[] = [];

/** Mounts a tmpfs of `size` at a new folder; null when this machine does not allow it. */
function tmpfs(name: string, size: string, readOnly = false): string | null {
  const at = join(dir, name);
  mkdirSync(at);
  try {
    execFileSync('mount', ['-t', 'tmpfs', '-o', `size=${size}`, 'tmpfs', at], { stdio: 'ignore' });
  } catch {
    return null;
  }
  mounts.push(at);
  writeFileSync(join(at, 'rows.csv'), 'the previous file\n');
  if (readOnly) execFileSync('mount', ['-o', 'remount,ro', at], { stdio: 'ignore' });
  return at;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-unwritable-'));
});
afterAll(() => {
  for (const m of mounts.reverse()) {
    try {
      execFileSync('umount', [m], { stdio: 'ignore' });
    } catch {
      // left for the system to clean
    }
  }
  rmSync(dir, { recursive: true, force: true });
});

async function expectWriteError(args: string[], message: RegExp) {
  const r = await runCli(args);
  expect(r.code, r.stderr).toBe(2);
  const lines = r.stderr.trimEnd().split('\n').filter((l) => !/^floorgap: (reading|read) /.test(l));
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(message);
}

const temporaries = (folder: string) => readdirSync(folder).filter((n) => n.includes('.tmp-'));

describe('a missing folder or a folder as the path', () => {
  it('export, check --junit, sql --out and demo name the missing folder', async () => {
    const missing = join(dir, 'no', 'such');
    await expectWriteError(['export', SAMPLE, '--out', join(missing, 'rows.csv'), '--slice', 'station=S5'], /rows\.csv: folder .*no\/such does not exist; create it first$/);
    await expectWriteError(['check', SAMPLE, '--max-bias', '0.9', '--junit', join(missing, 'j.xml')], /j\.xml: folder .*no\/such does not exist/);
    await expectWriteError(['sql', SAMPLE, '--out', join(missing, 'cells.csv')], /cells\.csv: folder .*no\/such does not exist/);
  });

  it('export to a folder asks for a file name', async () => {
    await expectWriteError(['export', SAMPLE, '--out', dir, '--slice', 'station=S5'], /is a folder; --out needs a file name/);
  });
});

/** Makes a named pipe (mkfifo) at `path`. */
function fifo(path: string): string {
  execFileSync('mkfifo', [path]);
  return path;
}

/** Makes a character device with the numbers of /dev/null (1, 3) at `path`; false when not allowed (not root). */
function charDevice(path: string): boolean {
  try {
    execFileSync('mknod', [path, 'c', '1', '3'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

const kind = (path: string) => {
  const s = lstatSync(path);
  return s.isFIFO() ? 'fifo' : s.isCharacterDevice() ? 'char' : s.isSymbolicLink() ? 'link' : s.isFile() ? 'file' : 'other';
};
const mode = (path: string) => statSync(path).mode & 0o777;

describe('outputs replace only regular files', () => {
  it('a named pipe is refused by export, sql --out, check --junit and demo, even with --force; the pipe stays', async () => {
    const folder = join(dir, 'fifo');
    mkdirSync(folder);
    const pipe = fifo(join(folder, 'pipe'));
    const refused = /pipe: is a named pipe \(FIFO\); floorgap writes only regular files$/;
    await expectWriteError(['export', SAMPLE, '--out', pipe, '--force', '--slice', 'station=S5'], refused);
    await expectWriteError(['sql', SAMPLE, '--out', pipe, '--force'], refused);
    await expectWriteError(['check', SAMPLE, '--max-bias', '0.9', '--junit', pipe], refused);
    // the manifest's path is an output too
    const rows = join(folder, 'rows.csv');
    fifo(`${rows}.manifest.json`);
    await expectWriteError(['export', SAMPLE, '--out', rows, '--force', '--slice', 'station=S5'], /rows\.csv\.manifest\.json: is a named pipe \(FIFO\); floorgap writes only regular files$/);
    const demo = join(folder, 'demo');
    mkdirSync(demo);
    fifo(join(demo, 'inspector-floors.csv'));
    await expectWriteError(['demo', '--out', demo, '--rows', '100', '--force'], /inspector-floors\.csv: is a named pipe \(FIFO\); floorgap writes only regular files$/);
    expect(readdirSync(demo)).toEqual(['inspector-floors.csv']); // refused before the table was written
    expect([kind(pipe), kind(`${rows}.manifest.json`), kind(join(demo, 'inspector-floors.csv'))]).toEqual(['fifo', 'fifo', 'fifo']);
    expect(readdirSync(folder).sort()).toEqual(['demo', 'pipe', 'rows.csv.manifest.json']);
  });

  it('a character device (made with mknod, the numbers of /dev/null) is refused with --force; it stays a device', async (ctx) => {
    const folder = join(dir, 'dev');
    mkdirSync(folder);
    const device = join(folder, 'mydev');
    if (!charDevice(device)) return ctx.skip('mknod needs root');
    const refused = /mydev: is a character device; floorgap writes only regular files$/;
    await expectWriteError(['export', SAMPLE, '--out', device, '--force', '--slice', 'station=S5'], refused);
    await expectWriteError(['sql', SAMPLE, '--out', device, '--force'], refused);
    await expectWriteError(['check', SAMPLE, '--max-bias', '0.9', '--junit', device], refused);
    expect(kind(device)).toBe('char');
    expect(readdirSync(folder)).toEqual(['mydev']);
  });

  it('--out /dev/null --force is refused, and /dev/null is still a character device', async () => {
    expect(kind('/dev/null')).toBe('char');
    await expectWriteError(['sql', SAMPLE, '--out', '/dev/null', '--force'], /^floorgap: \/dev\/null: is a character device; floorgap writes only regular files$/);
    await expectWriteError(['check', SAMPLE, '--max-bias', '0.9', '--junit', '/dev/null'], /\/dev\/null: is a character device/);
    expect(kind('/dev/null')).toBe('char');
  });

  it('a symbolic link is refused, naming it a link; the file it points to is unchanged', async () => {
    const folder = join(dir, 'link');
    mkdirSync(folder);
    writeFileSync(join(folder, 'target.xml'), 'the target\n');
    symlinkSync('target.xml', join(folder, 'j.xml'));
    await expectWriteError(['check', SAMPLE, '--max-bias', '0.9', '--junit', join(folder, 'j.xml')], /j\.xml: is a symbolic link; floorgap writes only regular files and does not follow links \(name the file it points to\)$/);
    await expectWriteError(['sql', SAMPLE, '--out', join(folder, 'j.xml'), '--force'], /j\.xml: is a symbolic link/);
    expect(kind(join(folder, 'j.xml'))).toBe('link');
    expect(readFileSync(join(folder, 'target.xml'), 'utf8')).toBe('the target\n');
  });

  it('a replaced file keeps its mode (0444, 0600), with --force; check --junit replaces its own file without --force', async () => {
    const folder = join(dir, 'modes');
    mkdirSync(folder);
    const put = (name: string, m: number) => {
      writeFileSync(join(folder, name), 'old\n');
      chmodSync(join(folder, name), m);
      return join(folder, name);
    };
    const rows = put('rows.csv', 0o444);
    put('rows.csv.manifest.json', 0o600);
    const cells = put('cells.csv', 0o444);
    const junit = put('j.xml', 0o640);
    expect((await runCli(['export', SAMPLE, '--out', rows, '--force', '--slice', 'station=S5'])).code).toBe(0);
    expect((await runCli(['sql', SAMPLE, '--out', cells, '--force'])).code).toBe(0);
    expect((await runCli(['check', SAMPLE, '--max-bias', '0.9', '--junit', junit])).code).toBe(0);
    expect((await runCli(['check', SAMPLE, '--max-bias', '0.9', '--junit', junit])).code).toBe(0); // again: its own file
    // the new content is there, the old modes too
    expect(readFileSync(rows, 'utf8').startsWith('id,')).toBe(true);
    expect(readFileSync(junit, 'utf8').startsWith('<?xml')).toBe(true);
    expect([mode(rows), mode(`${rows}.manifest.json`), mode(cells), mode(junit)]).toEqual([0o444, 0o600, 0o444, 0o640]);
    const demo = join(folder, 'demo');
    mkdirSync(demo);
    writeFileSync(join(demo, 'solder-joints.csv'), 'old\n');
    chmodSync(join(demo, 'solder-joints.csv'), 0o444);
    expect((await runCli(['demo', '--out', demo, '--rows', '100', '--force'])).code).toBe(0);
    expect(mode(join(demo, 'solder-joints.csv'))).toBe(0o444);
    expect(temporaries(folder)).toEqual([]);
  });
});

describe('a read-only file system', () => {
  it('export and demo: one line, the previous file untouched', async (ctx) => {
    let ro = tmpfs('ro', '1m', true);
    if (!ro && userInfo().uid !== 0) {
      // without mounts, permissions make a read-only folder for a user that is not root
      ro = join(dir, 'ro-perm');
      mkdirSync(ro);
      writeFileSync(join(ro, 'rows.csv'), 'the previous file\n');
      chmodSync(ro, 0o555);
    }
    if (!ro) return ctx.skip('neither a tmpfs mount nor a permission-read-only folder is possible here (root without mount rights)');
    await expectWriteError(['export', SAMPLE, '--out', join(ro, 'rows.csv'), '--force', '--slice', 'station=S5'], /rows\.csv: cannot write the rows: (the folder is on a read-only file system|permission denied); the file there before, if any, is unchanged$/);
    expect(readFileSync(join(ro, 'rows.csv'), 'utf8')).toBe('the previous file\n');
    await expectWriteError(['demo', '--out', ro, '--force'], /solder-joints\.csv: cannot write: (the folder is on a read-only file system|permission denied)/);
    expect(readdirSync(ro).sort()).toEqual(['rows.csv']);
  });
});

describe('a full disk', () => {
  it('export (CSV and Parquet), sql --out and demo: one line, the previous file untouched, no temporary', async (ctx) => {
    const full = tmpfs('full', '32k');
    if (!full) return ctx.skip('this machine does not let the tests mount a small tmpfs');
    const previous = 'the previous file\n';
    await expectWriteError(['export', SAMPLE, '--out', join(full, 'rows.csv'), '--force', '--splits', 'train,dev,test', '--slice', 'station=S5'], /rows\.csv: cannot write the rows: the disk is full \(no space left on device\); the file there before, if any, is unchanged$/);
    expect(readFileSync(join(full, 'rows.csv'), 'utf8')).toBe(previous);
    await expectWriteError(['export', SAMPLE, '--out', join(full, 'rows.parquet'), '--splits', 'train,dev,test', '--slice', 'station=S5'], /rows\.parquet: cannot write.*: the disk is full/);
    await expectWriteError(['sql', SAMPLE, '--out', join(full, 'cells.csv')], /cells\.csv: cannot write the cells: the disk is full/);
    await expectWriteError(['demo', '--out', full, '--force'], /solder-joints\.csv: cannot write: the disk is full/);
    expect(temporaries(full)).toEqual([]);
    expect(readdirSync(full).sort()).toEqual(['rows.csv']);
  });
});

describe('a write that fails at the lowest layer', () => {
  it('writeAtomic: the error names the cause, the previous file stays, the temporary goes', async () => {
    const folder = join(dir, 'mocked');
    mkdirSync(folder);
    const path = join(folder, 'report.txt');
    writeFileSync(path, 'before\n');
    const e = await failure(
      writeAtomic(
        path,
        async (put) => {
          await put('half of the new content\n');
          throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
        },
        { overwrite: true },
      ),
    );
    expect(e.message).toBe(`${path}: cannot write: the disk is full (no space left on device); the file there before, if any, is unchanged`);
    expect(readFileSync(path, 'utf8')).toBe('before\n');
    expect(temporaries(folder)).toEqual([]);
  });
});
