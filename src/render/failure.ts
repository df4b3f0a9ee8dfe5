import { FloorgapError } from '../core/errors.js';
import { sanitize } from '../terminal/sanitize.js';

/**
 * What floorgap prints when a failure ends a command: one sanitised line, `floorgap: MESSAGE` for a
 * user-facing FloorgapError, `floorgap: internal error: FIRST LINE` for anything else, and after an
 * internal error's line its stack when `debug` (FLOORGAP_DEBUG=1). Ends with a line break. The CLI and
 * the explorer (its screen and its closing line) print every failure with this.
 * @example
 * failureText(new TypeError('x is undefined'), false); // => 'floorgap: internal error: x is undefined\n'
 */
export function failureText(e: unknown, debug: boolean): string {
  if (e instanceof FloorgapError) return `floorgap: ${sanitize(e.message)}\n`;
  const msg = e instanceof Error ? e.message : String(e);
  const line = `floorgap: internal error: ${sanitize(msg.split('\n')[0])}\n`;
  // the stack line by line, so that each line is sanitised and the line breaks stay
  return debug && e instanceof Error && e.stack ? `${line}${e.stack.split('\n').map((l) => sanitize(l)).join('\n')}\n` : line;
}
