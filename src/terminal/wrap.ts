/**
 * Greedy word wrapping by display width: the one wrapper of the text report, the explorer's detail pane
 * and its messages.
 */
import { displayWidth, truncate } from './width.js';

/** Options of {@link wrap}. */
export interface WrapOptions {
  /** what the first line starts with (a key column, an indent); default none */
  readonly first?: string;
  /** what every further line starts with; default none */
  readonly indent?: string;
  /**
   * a word wider than a line: `truncate` cuts it with `…` (tables and headers, where one line per item
   * is the layout), `break` splits it across lines (messages, whose every character must show)
   */
  readonly long?: 'truncate' | 'break';
}

/** Splits a word into pieces that each fit `room` columns (at least one character a piece). */
function pieces(word: string, room: number): string[] {
  const out: string[] = [];
  let piece = '';
  for (const ch of word) {
    if (piece !== '' && displayWidth(piece + ch) > room) {
      out.push(piece);
      piece = '';
    }
    piece += ch;
  }
  if (piece !== '') out.push(piece);
  return out;
}

/**
 * Wraps sanitized text at spaces so that no line is wider than `width` columns: each line holds as many
 * words as fit, the first after `first`, the others after `indent`.
 * @param text sanitized text; runs of spaces separate words
 * @param width the column budget of every line
 * @returns the lines (at least one)
 * @example
 * wrap('the dev rows do not look like the training rows', 20);
 * // => ['the dev rows do not', 'look like the', 'training rows']
 * wrap('floors.csv: no such file', 10, { long: 'break' }); // => ['floors.csv', ': no such', 'file']
 */
export function wrap(text: string, width: number, options: WrapOptions = {}): string[] {
  const first = options.first ?? '';
  const indent = options.indent ?? '';
  const breakLong = options.long === 'break';
  const lines: string[] = [];
  let current = first;
  let empty = true;
  const words = text.split(' ').filter((w) => w !== '');
  for (let i = 0; i < words.length; i++) {
    const word = words[i];
    const candidate = empty ? current + word : `${current} ${word}`;
    if (displayWidth(candidate) <= width) {
      current = candidate;
      empty = false;
      continue;
    }
    if (!empty) {
      lines.push(current);
      current = indent;
      empty = true;
      i--; // the word again, on the new line
      continue;
    }
    // a word alone wider than the line
    if (!breakLong) {
      lines.push(current + word);
      current = indent;
      continue;
    }
    const parts = pieces(word, Math.max(1, width - displayWidth(current)));
    lines.push(current + parts[0]);
    const rest = parts.slice(1).join('');
    current = indent;
    if (rest !== '') words.splice(i + 1, 0, rest);
  }
  if (!empty || lines.length === 0) lines.push(current);
  return lines.map((l) => truncate(l, width));
}
