import type { Key } from 'ink';

/** Every key of the explorer, for the help overlay, the hint line and the README. */
export const KEYS: readonly (readonly [string, string])[] = [
  ['↑ ↓  j k', 'move (in the detail pane: scroll)'],
  ['PgUp PgDn  Home End', 'move a page, to the top, to the bottom'],
  ['← →', 'in the detail pane: previous / next slice'],
  ['Enter', 'open or close the detail pane of the selected slice'],
  ['f', 'discovered slices: switch the table to the slices the search found, and back (the first time, it searches in the background)'],
  ['s', 'sort by the next column (report order, headroom, yield, bias, variance, mismatch, dev error, rows, name; discovered: rank, headroom, lift, name)'],
  ['r', 'reverse the sort'],
  ['h', 'sort by headroom, largest first'],
  ['g', 'regroup: pick slice columns (space toggles, Enter applies, none = overview); shows the grouping'],
  ['/', 'filter: text in the label, focus=variance, flagged, col=value (Esc clears)'],
  ['space', 'mark or unmark the selected slice'],
  ['e', 'export the rows of the marked slices (the flagged ones when none is marked; discovered: all listed)'],
  ['d', 'in the detail pane: break the slice down by the next column'],
  ['i', 'show or hide interval half-widths in the table'],
  ['?', 'this help'],
  ['q', 'quit (Ctrl-C also quits)'],
];

/** The one-line hint shown at the bottom of the table. */
export const HINT = '↑↓ move  ⏎ detail  f found  s sort  r rev  h headroom  g group  / filter  ␣ mark  e export  ? help  q quit';
export const HINT_ASCII = 'arrows move  Enter detail  f found  s sort  r rev  h headroom  g group  / filter  space mark  e export  ? help  q quit';
/** The hint under the discovered table: `f` goes back to the grouping. */
export const FOUND_HINT = '↑↓ move  ⏎ detail  f back  s sort  r rev  / filter  ␣ mark  e export  g group  ? help  q quit';
export const FOUND_HINT_ASCII = 'arrows move  Enter detail  f back  s sort  r rev  / filter  space mark  e export  g group  ? help  q quit';
export const DETAIL_HINT = '↑↓ scroll  ←→ prev/next slice  d breakdown  ⏎ back  ? help  q quit';
export const DETAIL_HINT_ASCII = 'up/down scroll  left/right slice  d breakdown  Enter back  ? help  q quit';

/** One key as the reducer reads it: ink's `input` and key flags. */
export interface KeyPress {
  readonly input: string;
  readonly key: Partial<Key>;
}

/**
 * The keys held in one read from the terminal. ink splits a read at escape sequences, but hands a
 * run of several other keys (key repeat, a paste, a burst over SSH: `"\x7f\x7f\x7f"`, `"abc\x7f\r"`)
 * to useInput as one `input` string with no key flags set. This splits such a run into its keys,
 * each flagged as ink flags that key read alone (DEL is `delete`, Ctrl-H `backspace`, CR `return`,
 * tab `tab`, other C0 controls Ctrl + a letter), so every key applies, in order. A single key, an
 * escape sequence, or input ink has already flagged is returned as it is.
 * @example
 * splitKeys('ab\x7f', {}); // => [{ input: 'a', key: {} }, { input: 'b', key: {} }, { input: '', key: { delete: true } }]
 */
export function splitKeys(input: string, key: Partial<Key>): KeyPress[] {
  const chars = [...input];
  const flagged = key.ctrl || key.meta || key.return || key.escape || key.tab || key.backspace || key.delete;
  if (chars.length <= 1 || flagged || input.includes('\x1b')) return [{ input, key }];
  return chars.map((ch): KeyPress => {
    if (ch === '\r') return { input: ch, key: { return: true } };
    if (ch === '\t') return { input: ch, key: { tab: true } };
    if (ch === '\x7f') return { input: '', key: { delete: true } };
    if (ch === '\b') return { input: '', key: { backspace: true } };
    // Ctrl + a letter (Ctrl-C is "\x03"), as ink names it: the letter, with ctrl set
    if (ch < '\x1b' && ch !== '\n') return { input: String.fromCharCode(ch.charCodeAt(0) + 96), key: { ctrl: true } };
    if (ch >= 'A' && ch <= 'Z') return { input: ch, key: { shift: true } };
    return { input: ch, key: {} };
  });
}
