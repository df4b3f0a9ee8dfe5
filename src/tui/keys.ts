/** Every key of the explorer, for the help overlay, the hint line and the README. */
export const KEYS: readonly (readonly [string, string])[] = [
  ['↑ ↓  j k', 'move (in the detail pane: scroll)'],
  ['PgUp PgDn  Home End', 'move a page, to the top, to the bottom'],
  ['← →', 'in the detail pane: previous / next slice'],
  ['Enter', 'open or close the detail pane of the selected slice'],
  ['s', 'sort by the next column (report order, headroom, yield, bias, variance, mismatch, dev error, rows, name)'],
  ['r', 'reverse the sort'],
  ['h', 'sort by headroom, largest first'],
  ['g', 'regroup: pick slice columns (space toggles, Enter applies, none = overview)'],
  ['/', 'filter: text in the label, focus=variance, flagged, col=value (Esc clears)'],
  ['space', 'mark or unmark the selected slice'],
  ['e', 'export the rows of the marked slices (the flagged ones when none is marked)'],
  ['d', 'in the detail pane: break the slice down by the next column'],
  ['i', 'show or hide interval half-widths in the table'],
  ['?', 'this help'],
  ['q', 'quit (Ctrl-C also quits)'],
];

/** The one-line hint shown at the bottom of the table. */
export const HINT = '↑↓ move  ⏎ detail  s sort  r rev  h headroom  g group  / filter  ␣ mark  e export  ? help  q quit';
export const HINT_ASCII = 'arrows move  Enter detail  s sort  r rev  h headroom  g group  / filter  space mark  e export  ? help  q quit';
export const DETAIL_HINT = '↑↓ scroll  ←→ prev/next slice  d breakdown  ⏎ back  ? help  q quit';
export const DETAIL_HINT_ASCII = 'up/down scroll  left/right slice  d breakdown  Enter back  ? help  q quit';
