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
