/**
 * The characters that must never reach a terminal or a printed SQL text as themselves: they could drive
 * the terminal, end a line comment, or hide and reorder what a reader sees. One definition, used by the
 * terminal sanitiser and by the SQL writers (which carry such characters as escapes).
 */

/** Bidirectional marks, embeddings, overrides and isolates, plus the Unicode line and paragraph separators. */
const INVISIBLE_FORMAT = new Set<number>([
  0x061c, // arabic letter mark
  0x200e, // left-to-right mark
  0x200f, // right-to-left mark
  0x2028, // line separator
  0x2029, // paragraph separator
  0x202a, 0x202b, 0x202c, 0x202d, 0x202e, // embeddings and overrides
  0x2066, 0x2067, 0x2068, 0x2069, // isolates
]);

/**
 * True for a UTF-16 code unit that is unsafe as itself: C0 controls (tab, line feed and ESC included),
 * DEL, C1 controls, a surrogate (callers skip well-formed pairs first), the bidi controls and U+2028/9.
 * @example
 * isUnsafeCode(0x1b); // => true
 * isUnsafeCode(0x41); // => false
 */
export function isUnsafeCode(code: number): boolean {
  if (code < 0x20) return true; // C0 controls, ESC included
  if (code >= 0x7f && code <= 0x9f) return true; // DEL and C1 controls (CSI, OSC, ST as single code points)
  if (code >= 0xd800 && code <= 0xdfff) return true; // a lone surrogate (a paired one never reaches here)
  return INVISIBLE_FORMAT.has(code);
}

/**
 * True when the text holds an unsafe character (a well-formed surrogate pair is safe).
 * @example
 * hasUnsafeChars('a\nb'); // => true
 */
export function hasUnsafeChars(text: string): boolean {
  for (let i = 0; i < text.length; i++) {
    const code = text.charCodeAt(i);
    if (code >= 0xd800 && code <= 0xdbff && i + 1 < text.length) {
      const next = text.charCodeAt(i + 1);
      if (next >= 0xdc00 && next <= 0xdfff) {
        i++;
        continue;
      }
    }
    if (isUnsafeCode(code)) return true;
  }
  return false;
}
