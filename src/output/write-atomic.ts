import { createWriteStream, promises as fs, type Stats } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { error, type FloorgapError } from '../core/errors.js';
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

/** What is at an output path that {@link checkDestination} accepted: nothing, or a regular file and its mode. */
export interface Destination {
  readonly path: string;
  /** the permission bits of the regular file there (to give its replacement), or null when there is none */
  readonly mode: number | null;
}

/** What a file that is not a regular one is, in a few words. */
function kindOf(s: Stats): string {
  if (s.isDirectory()) return 'a folder';
  if (s.isSymbolicLink()) return 'a symbolic link';
  if (s.isFIFO()) return 'a named pipe (FIFO)';
  if (s.isCharacterDevice()) return 'a character device';
  if (s.isBlockDevice()) return 'a block device';
  if (s.isSocket()) return 'a socket';
  return 'not a regular file';
}

/**
 * The one rule for every output path floorgap writes (exports and manifests, `--junit`, `sql --out`,
 * the demo, cache entries); call it before the work starts and again just before the rename
 * ({@link moveInto}). The path's folder must exist. At the path itself (not followed when it is a link):
 * - nothing: fine;
 * - a regular file: fine when `overwrite` (its mode is returned, to give the new file), else an error
 *   asking for --force;
 * - a symbolic link: refused, naming it a link (renaming over it would replace the link, not write the
 *   file it points to, and following it would let a link aim the output anywhere);
 * - anything else (a folder, a named pipe, a device such as /dev/null, a socket): refused, whatever
 *   `overwrite` says, naming what is there.
 * @param path the destination
 * @param options.overwrite a regular file there may be replaced
 * @param options.folderHint for a folder at the path: what to name instead, e.g. "--out needs a file name, e.g. out/rows.csv"
 * @returns the destination, with the mode of the regular file there, if any
 * @throws FloorgapError naming the path and what is in the way
 * @example
 * await checkDestination('/dev/null', { overwrite: true });
 * // => FloorgapError('/dev/null: is a character device; floorgap writes only regular files')
 */
export async function checkDestination(path: string, options: { overwrite: boolean; folderHint?: string }): Promise<Destination> {
  const dir = dirname(path);
  const folder = await fs.stat(dir).then((s) => s, () => null);
  if (!folder) throw error(`${path}: folder ${dir} does not exist; create it first`);
  if (!folder.isDirectory()) throw error(`${path}: ${dir} is not a folder`);
  let s: Stats;
  try {
    s = await fs.lstat(path);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT') return { path, mode: null };
    throw writeError(path, e);
  }
  if (s.isFile()) {
    if (!options.overwrite) throw error(`${path}: file exists; pass --force to overwrite it`);
    return { path, mode: s.mode & 0o777 };
  }
  if (s.isSymbolicLink()) throw error(`${path}: is a symbolic link; floorgap writes only regular files and does not follow links (name the file it points to)`);
  if (s.isDirectory() && options.folderHint) throw error(`${path}: is a folder; ${options.folderHint}`);
  throw error(`${path}: is ${kindOf(s)}; floorgap writes only regular files`);
}

/**
 * Renames a complete temporary file onto a destination that {@link checkDestination} has just accepted,
 * giving it the mode of the regular file it replaces (a read-only 0444 file stays 0444).
 * @param tmp the temporary file, in the destination's folder
 * @param dest what checkDestination returned
 */
export async function moveInto(tmp: string, dest: Destination): Promise<void> {
  if (dest.mode !== null) await fs.chmod(tmp, dest.mode);
  await fs.rename(tmp, dest.path);
}

/**
 * Writes `path` atomically: the content goes to a temporary file in the same folder, which is renamed
 * over `path` only once it is complete. On any failure the temporary file is removed and the previous
 * file at `path`, if any, is untouched. The destination follows {@link checkDestination}: only a
 * regular file is replaced (keeping its mode), and only with `overwrite`.
 * @param path destination
 * @param write receives a function that appends a chunk; it may be async
 * @param options.overwrite replace an existing regular file (never anything else)
 * @example
 * await writeAtomic('out.csv', async (put) => { await put('a,b\n'); await put('1,2\n'); });
 */
export async function writeAtomic(
  path: string,
  write: (put: (chunk: string) => Promise<void>) => Promise<void> | void,
  options: { overwrite?: boolean } = {},
): Promise<void> {
  const overwrite = options.overwrite === true;
  await checkDestination(path, { overwrite });
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
    // something may have appeared at the path while the content was written
    await moveInto(tmp, await checkDestination(path, { overwrite }));
    releaseTemp(tmp);
  } catch (e) {
    stream.destroy();
    await fs.rm(tmp, { force: true });
    releaseTemp(tmp);
    if (e instanceof Error && e.name === 'FloorgapError') throw e;
    throw writeError(path, e);
  }
}
