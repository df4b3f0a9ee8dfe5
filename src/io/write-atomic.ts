import { createWriteStream, promises as fs } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { error } from '../util/error.js';

/** A temporary path in the same folder as `path`, so the final rename is atomic on one file system. */
export function tempPathFor(path: string): string {
  return join(dirname(path), `.${basename(path)}.tmp-${process.pid}-${randomBytes(4).toString('hex')}`);
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
  } catch (e) {
    stream.destroy();
    await fs.rm(tmp, { force: true });
    if (e instanceof Error && 'code' in e && typeof (e as NodeJS.ErrnoException).code === 'string') {
      const code = (e as NodeJS.ErrnoException).code;
      throw error(`${path}: cannot write (${code}: ${e.message})`, e);
    }
    throw e;
  }
}
