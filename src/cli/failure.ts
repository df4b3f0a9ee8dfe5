import { failureText } from '../render/failure.js';
import { exitCodeOf } from '../core/errors.js';
import type { CliIO } from './io.js';

/**
 * The one way a failure ends a command, in every command and in the explorer: its line on stderr (see
 * {@link failureText}; the stack too for an internal error when FLOORGAP_DEBUG is set), and the exit
 * code: a FloorgapError's own (2), 3 for an internal error.
 * @example
 * return reportFailure(e, io); // => 3 after writing 'floorgap: internal error: …'
 */
export function reportFailure(e: unknown, io: Pick<CliIO, 'stderr' | 'env'>): number {
  io.stderr.write(failureText(e, Boolean(io.env.FLOORGAP_DEBUG)));
  return exitCodeOf(e);
}
