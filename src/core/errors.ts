/**
 * The one error type floorgap raises for problems the user can fix (bad input, bad options).
 * The CLI prints `message` as one line on stderr and exits with `exitCode`.
 */
export class FloorgapError extends Error {
  readonly exitCode: number;
  constructor(message: string, exitCode = 2, cause?: unknown) {
    super(message, cause === undefined ? undefined : { cause });
    this.name = 'FloorgapError';
    this.exitCode = exitCode;
  }
}

/** The exit code of an unexpected internal error: a bug in floorgap, not a problem with the input. */
export const INTERNAL_EXIT = 3;

/**
 * The exit code a failure ends a command with: a FloorgapError's own (2 for bad input or usage),
 * {@link INTERNAL_EXIT} for anything else.
 * @example
 * exitCodeOf(error('bad')); // => 2
 * exitCodeOf(new TypeError('x is undefined')); // => 3
 */
export function exitCodeOf(e: unknown): number {
  return e instanceof FloorgapError ? e.exitCode : INTERNAL_EXIT;
}

/**
 * Creates a user-facing error: what was wrong, where, what was expected, and the fix if known.
 * @param message one line, no trailing period needed
 * @param cause the underlying error, kept for debugging
 * @example
 * throw error('preds.csv: column "weight" line 14: expected a number >= 0, got "-1"');
 */
export function error(message: string, cause?: unknown, exitCode = 2): FloorgapError {
  return new FloorgapError(message, exitCode, cause);
}
