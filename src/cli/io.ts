import { error, type FloorgapError } from '../core/errors.js';
import { writeReason } from '../output/write-atomic.js';

/** The process-facing surface a command uses; `cli/index.ts` fills it from `process`. */
export interface CliIO {
  readonly stdout: NodeJS.WritableStream & { isTTY?: boolean; columns?: number };
  readonly stderr: NodeJS.WritableStream & { isTTY?: boolean };
  /** the keyboard, for the explorer (absent in tests that only print) */
  readonly stdin?: NodeJS.ReadStream;
  readonly env: Readonly<Record<string, string | undefined>>;
  readonly cwd: string;
}

/** Colour only on a terminal, and never when NO_COLOR is set (https://no-color.org). */
export function useColor(io: CliIO): boolean {
  return Boolean(io.stdout.isTTY) && !('NO_COLOR' in io.env && io.env.NO_COLOR !== '');
}

/**
 * A failed write on stdout (a full disk behind `> file`, a device that refuses it) as one line: exit 2,
 * as for any output floorgap cannot write. A closed pipe (EPIPE, `| head`) is no error: see src/cli.ts.
 * @example
 * stdoutError(Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' })).message;
 * // => 'cannot write to stdout: the disk is full (no space left on device)'
 */
export function stdoutError(e: unknown): FloorgapError {
  return error(`cannot write to stdout: ${writeReason(e)}`, e);
}

/** Writes a command's result to stdout; a failed write rejects with {@link stdoutError}. */
export function writeOut(io: CliIO, text: string): Promise<void> {
  return new Promise((resolve, reject) => {
    io.stdout.write(text, (e) => (e ? reject(stdoutError(e)) : resolve()));
  });
}
