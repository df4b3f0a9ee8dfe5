/**
 * The one rule for output paths (src/output/write-atomic.ts): absent or a regular file (replaced only when
 * overwriting is allowed, keeping its mode); a symbolic link, a named pipe, a device or a folder is
 * refused, whatever the overwrite permission, and left as it was. Pipes are real ones (mkfifo).
 */
import { execFileSync } from 'node:child_process';
import { chmodSync, lstatSync, mkdirSync, readdirSync, readFileSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeAtomic } from '../../src/output/write-atomic.js';
import { failure } from '../helpers/failure.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

let dir: string;
let n = 0;
const folder = () => {
  const f = join(dir, `case-${n++}`);
  mkdirSync(f);
  return f;
};
const write = (path: string, overwrite: boolean) => writeAtomic(path, (put) => put('new\n'), { overwrite });

beforeAll(() => {
  dir = makeTempDir();
});
afterAll(() => removeTempDir(dir));

describe('writeAtomic: what may be at the destination', () => {
  it('a named pipe is refused even with overwrite, and stays a pipe; no temporary is left', async () => {
    const f = folder();
    const pipe = join(f, 'out.xml');
    execFileSync('mkfifo', [pipe]);
    for (const overwrite of [false, true]) {
      const e = await failure(write(pipe, overwrite));
      expect(e.message).toBe(`${pipe}: is a named pipe (FIFO); floorgap writes only regular files`);
      expect(e.exitCode).toBe(2);
    }
    expect(lstatSync(pipe).isFIFO()).toBe(true);
    expect(readdirSync(f)).toEqual(['out.xml']);
  });

  it('a symbolic link is refused, even to a regular file; the link and its target are unchanged', async () => {
    const f = folder();
    writeFileSync(join(f, 'target.txt'), 'target\n');
    symlinkSync('target.txt', join(f, 'out.txt'));
    const e = await failure(write(join(f, 'out.txt'), true));
    expect(e.message).toBe(`${join(f, 'out.txt')}: is a symbolic link; floorgap writes only regular files and does not follow links (name the file it points to)`);
    expect(lstatSync(join(f, 'out.txt')).isSymbolicLink()).toBe(true);
    expect(readFileSync(join(f, 'target.txt'), 'utf8')).toBe('target\n');
  });

  it('a folder is refused', async () => {
    const f = folder();
    mkdirSync(join(f, 'sub'));
    expect((await failure(write(join(f, 'sub'), true))).message).toBe(`${join(f, 'sub')}: is a folder; floorgap writes only regular files`);
  });

  it('a regular file: refused without overwrite; replaced with it, keeping its mode', async () => {
    const f = folder();
    const path = join(f, 'out.txt');
    writeFileSync(path, 'old\n');
    chmodSync(path, 0o444);
    expect((await failure(write(path, false))).message).toBe(`${path}: file exists; pass --force to overwrite it`);
    await write(path, true);
    expect(readFileSync(path, 'utf8')).toBe('new\n');
    expect(statSync(path).mode & 0o777).toBe(0o444); // as chmod set it above
    chmodSync(path, 0o600);
    await write(path, true);
    expect(statSync(path).mode & 0o777).toBe(0o600);
  });

  it('an absent file is created with the usual mode (0666 less the umask)', async () => {
    const f = folder();
    const path = join(f, 'new.txt');
    await write(path, false);
    const umask = process.umask();
    expect(statSync(path).mode & 0o777).toBe(0o666 & ~umask);
  });
});
