/**
 * ANSI SGR styling for the text renderer. Every style is switched off by its own reset code (not by a
 * full reset), so a coloured word inside a bold row keeps the row bold. Styling only ever adds escape
 * sequences: {@link stripAnsi} of a styled string gives back the plain string.
 */

/** The styles the renderers use. */
export type Style = 'bold' | 'dim' | 'underline' | 'red' | 'green' | 'yellow' | 'blue' | 'magenta' | 'cyan';

const CODES: Readonly<Record<Style, readonly [number, number]>> = {
  bold: [1, 22],
  dim: [2, 22],
  underline: [4, 24],
  red: [31, 39],
  green: [32, 39],
  yellow: [33, 39],
  blue: [34, 39],
  magenta: [35, 39],
  cyan: [36, 39],
};

/**
 * Wraps text in SGR codes for the given styles; returns it unchanged when `enabled` is false or no style is given.
 * @param text already sanitized and laid out text
 * @param styles styles to apply, outermost first
 * @param enabled whether colour is on
 * @returns the styled text
 * @example
 * paint('bias', ['red'], true); // => '\x1b[31mbias\x1b[39m'
 */
export function paint(text: string, styles: readonly Style[], enabled: boolean): string {
  if (!enabled || styles.length === 0 || text === '') return text;
  let open = '';
  let close = '';
  for (const style of styles) {
    const [on, off] = CODES[style];
    open += `\x1b[${on}m`;
    close = `\x1b[${off}m${close}`;
  }
  return open + text + close;
}

/**
 * Removes SGR sequences (`ESC [ … m`), e.g. to compare coloured and plain output in tests.
 * @param text styled text
 * @returns the text without SGR sequences
 * @example
 * stripAnsi('\x1b[1mtotal\x1b[22m'); // => 'total'
 */
export function stripAnsi(text: string): string {
  return text.replace(/\x1b\[[0-9;]*m/g, '');
}
