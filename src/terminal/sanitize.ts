/**
 * Terminal-safe strings: every string that comes from data (slice keys and values, labels, file paths,
 * warnings) goes through `sanitize` before it reaches a terminal, so a crafted value cannot move the
 * cursor, clear the screen, write the clipboard (OSC 52) or reorder what the reader sees (bidi overrides).
 */

import { isUnsafeCode } from '../core/unsafe-chars.js';

/** Short escapes for the three whitespace controls; everything else uses `\xNN` or `\uNNNN`. */
const SHORT_ESCAPES: Readonly<Record<number, string>> = { 0x09: '\\t', 0x0a: '\\n', 0x0d: '\\r' };

function isUnsafe(code: number, keepWhitespace: boolean): boolean {
  if (keepWhitespace && (code === 0x09 || code === 0x0a || code === 0x0d)) return false;
  return isUnsafeCode(code);
}

function escapeCode(code: number): string {
  const short = SHORT_ESCAPES[code];
  if (short !== undefined) return short;
  const hex = code.toString(16);
  return code <= 0xff ? `\\x${hex.padStart(2, '0')}` : `\\u${hex.padStart(4, '0')}`;
}

/** Options of {@link sanitize}. */
export interface SanitizeOptions {
  /**
   * Keep tab, line feed and carriage return as they are (for file formats that quote them, such as CSV).
   * Default false: they become `\t`, `\n`, `\r`.
   */
  readonly keepWhitespace?: boolean;
}

/**
 * Replaces every character that could drive a terminal or hide text by a visible escape:
 * C0 controls (ESC, BEL, tab and newline included), DEL, C1 controls (U+0080–U+009F), lone surrogates,
 * and the bidi marks, overrides and isolates (U+061C, U+200E, U+200F, U+202A–U+202E, U+2066–U+2069),
 * plus U+2028 and U+2029. Code points up to U+00FF become `\xNN`, the others `\uNNNN`; tab, newline and
 * carriage return become `\t`, `\n`, `\r`. A backslash already in the data is left as it is, so an
 * escape in the output may also be literal text from the input; it is never a live control.
 * @param text any string from data
 * @param options `keepWhitespace` to let tab, LF and CR through
 * @returns the string with only printable characters
 * @example
 * sanitize('S5\x1b[2J'); // => 'S5\\x1b[2J'
 * sanitize('abc\u202Edef'); // => 'abc\\u202edef'
 */
export function sanitize(text: string, options: SanitizeOptions = {}): string {
  const keep = options.keepWhitespace === true;
  let out = '';
  let clean = 0; // start of the pending run of safe characters
  for (let i = 0; i < text.length; i++) {
    const code = text.charCodeAt(i);
    if (code >= 0xd800 && code <= 0xdbff && i + 1 < text.length) {
      const next = text.charCodeAt(i + 1);
      if (next >= 0xdc00 && next <= 0xdfff) {
        i++; // a well-formed pair: an astral character, always printable for our purposes
        continue;
      }
    }
    if (!isUnsafe(code, keep)) continue;
    out += text.slice(clean, i) + escapeCode(code);
    clean = i + 1;
  }
  return clean === 0 ? text : out + text.slice(clean);
}
