import { createWriteStream, promises as fs } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { error, type FloorgapError } from '../util/error.js';
import { releaseTemp, trackTemp } from './temp-files.js';

/**
 * One line for a failed write, in the user's terms, naming the destination (never the temporary file):
 * a full disk, a read-only file system, a permission, or the system's own words.
 * @param what what was being written, e.g. "the rows"
 * @example
 * writeError('out.csv', Object.assign(new Error('no space left on device, write'), { code: 'ENOSPC' }));
 * // => FloorgapError('out.csv: cannot write: the disk is full (no space left on device); the file there before, if any, is unchanged')
 */
export function writeError(path: string, e: unknown, what = ''): FloorgapError {
  return error(`${path}: cannot write${what ? ` ${what}` : ''}: ${writeReason(e)}; the file there before, if any, is unchanged`, e);
}

/** Why a write failed, in a few words (see {@link writeError}). */
export function writeReason(e: unknown): string {
  const code = e instanceof Error ? (e as NodeJS.ErrnoException).code : undefined;
  const msg = e instanceof Error ? e.message : String(e);
  return code === 'ENOSPC' || /no space left on device/i.test(msg)
      ? 'the disk is full (no space left on device)'
      : code === 'EROFS' || /read-only file system/i.test(msg)
        ? 'the folder is on a read-only file system'
        : code === 'EACCES' || code === 'EPERM' || /permission denied/i.test(msg)
          ? 'permission denied'
          : code === 'EDQUOT' || /quota exceeded/i.test(msg)
            ? 'the disk quota is used up'
            : msg
                .split('\n')[0]
                .replace(/^[A-Za-z ]+ Error: /, '')
                .replace(/"[^"]*\.tmp-[^"]*"/g, 'the temporary file')
                .replace(/'[^']*\.tmp-[^']*'/g, 'the temporary file')
                .replace(/^E[A-Z]+: /, '');
}

/** A temporary path in the same folder as `path`, so the final rename is atomic on one file system. */
export function tempPathFor(path: string): string {
  return trackTemp(join(dirname(path), `.${basename(path)}.tmp-${process.pid}-${randomBytes(4).toString('hex')}`));
}

/**
 * Writes `path` atomically: the content goes to a temporary file in the same folder, which is renamed
 * over `path` only once it is complete. On any failure the temporary file is removed and the previous
 * file at `path`, if any, is untouched.
 * @param path destination
 * @param write receives a function that appends a chunk; it may be async
 * @param options.overwrite refuse to replace an existing file unless true
 * @example
 * await writeAtomic('out.csv', async (put) => { await put('a,b\n'); await put('1,2\n'); });
 */
export async function writeAtomic(
  path: string,
  write: (put: (chunk: string) => Promise<void>) => Promise<void> | void,
  options: { overwrite?: boolean } = {},
): Promise<void> {
  if (!options.overwrite) {
    const exists = await fs.stat(path).then(() => true, () => false);
    if (exists) throw error(`${path}: file exists; pass --force to overwrite it`);
  }
  const dir = dirname(path);
  const dirOk = await fs.stat(dir).then((s) => s.isDirectory(), () => false);
  if (!dirOk) throw error(`${path}: folder ${dir} does not exist`);
  const tmp = tempPathFor(path);
  const stream = createWriteStream(tmp, { flags: 'wx' });
  const opened = new Promise<void>((resolve, reject) => {
    stream.once('open', () => resolve());
    stream.once('error', reject);
  });
  try {
    await opened;
    let failure: Error | null = null;
    stream.on('error', (e) => {
      failure = e;
    });
    const put = async (chunk: string): Promise<void> => {
      if (failure) throw failure;
      if (!stream.write(chunk)) {
        await new Promise<void>((resolve, reject) => {
          const onError = (e: Error) => reject(e);
          stream.once('error', onError);
          stream.once('drain', () => {
            stream.off('error', onError);
            resolve();
          });
        });
      }
    };
    await write(put);
    await new Promise<void>((resolve, reject) => {
      if (failure) return reject(failure);
      stream.once('error', reject);
      stream.end(() => resolve());
    });
    await fs.rename(tmp, path);
    releaseTemp(tmp);
  } catch (e) {
    stream.destroy();
    await fs.rm(tmp, { force: true });
    releaseTemp(tmp);
    if (e instanceof Error && e.name === 'FloorgapError') throw e;
    throw writeError(path, e);
  }
}
