/**
 * How many terminal columns text takes, and cutting or padding it to a width: the measure every table,
 * bar and wrapped line of floorgap's text output and explorer uses.
 */

/** [first, last] code point ranges that a terminal draws two columns wide (East Asian Wide and Fullwidth). */
const WIDE: readonly (readonly [number, number])[] = [
  [0x1100, 0x115f], // Hangul Jamo leading consonants
  [0x231a, 0x231b],
  [0x2329, 0x232a],
  [0x23e9, 0x23ec],
  [0x23f0, 0x23f0],
  [0x23f3, 0x23f3],
  [0x25fd, 0x25fe],
  [0x2614, 0x2615],
  [0x2648, 0x2653],
  [0x267f, 0x267f],
  [0x2693, 0x2693],
  [0x26a1, 0x26a1],
  [0x26aa, 0x26ab],
  [0x26bd, 0x26be],
  [0x26c4, 0x26c5],
  [0x26ce, 0x26ce],
  [0x26d4, 0x26d4],
  [0x26ea, 0x26ea],
  [0x26f2, 0x26f3],
  [0x26f5, 0x26f5],
  [0x26fa, 0x26fa],
  [0x26fd, 0x26fd],
  [0x2705, 0x2705],
  [0x270a, 0x270b],
  [0x2728, 0x2728],
  [0x274c, 0x274c],
  [0x274e, 0x274e],
  [0x2753, 0x2755],
  [0x2757, 0x2757],
  [0x2795, 0x2797],
  [0x27b0, 0x27b0],
  [0x27bf, 0x27bf],
  [0x2b1b, 0x2b1c],
  [0x2b50, 0x2b50],
  [0x2b55, 0x2b55],
  [0x2e80, 0x303e], // CJK radicals, Kangxi, CJK symbols and punctuation
  [0x3041, 0x33ff], // Hiragana, Katakana, Bopomofo, Hangul compatibility, CJK compatibility
  [0x3400, 0x4dbf], // CJK extension A
  [0x4e00, 0x9fff], // CJK unified ideographs
  [0xa000, 0xa4cf], // Yi
  [0xa960, 0xa97f], // Hangul Jamo extended A
  [0xac00, 0xd7a3], // Hangul syllables
  [0xf900, 0xfaff], // CJK compatibility ideographs
  [0xfe10, 0xfe19], // vertical forms
  [0xfe30, 0xfe6f], // CJK compatibility forms, small form variants
  [0xff00, 0xff60], // fullwidth forms
  [0xffe0, 0xffe6],
  [0x16fe0, 0x16fe4],
  [0x17000, 0x18cff], // Tangut
  [0x1b000, 0x1b2ff], // Kana supplement and extensions, Nushu
  [0x1f004, 0x1f004],
  [0x1f0cf, 0x1f0cf],
  [0x1f18e, 0x1f18e],
  [0x1f191, 0x1f19a],
  [0x1f200, 0x1f2ff], // enclosed ideographic supplement
  [0x1f300, 0x1f64f], // pictographs and emoticons (approximation: a few in this block are narrow)
  [0x1f680, 0x1f6ff], // transport and map symbols (approximation)
  [0x1f7e0, 0x1f7eb],
  [0x1f90c, 0x1f9ff], // supplemental symbols and pictographs
  [0x1fa70, 0x1faff],
  [0x20000, 0x2fffd], // CJK extensions B–F
  [0x30000, 0x3fffd], // CJK extension G and later
];

/** Ranges drawn zero columns wide: combining marks, zero-width characters and variation selectors. */
const ZERO: readonly (readonly [number, number])[] = [
  [0x0300, 0x036f],
  [0x0483, 0x0489],
  [0x0591, 0x05bd],
  [0x0610, 0x061a],
  [0x064b, 0x065f],
  [0x1ab0, 0x1aff],
  [0x1dc0, 0x1dff],
  [0x200b, 0x200d],
  [0x2060, 0x2064],
  [0x20d0, 0x20ff],
  [0xfe00, 0xfe0f],
  [0xfe20, 0xfe2f],
  [0xfeff, 0xfeff],
  [0xe0100, 0xe01ef],
];

function inRanges(code: number, ranges: readonly (readonly [number, number])[]): boolean {
  let lo = 0;
  let hi = ranges.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const [first, last] = ranges[mid];
    if (code < first) hi = mid - 1;
    else if (code > last) lo = mid + 1;
    else return true;
  }
  return false;
}

function codeWidth(code: number): number {
  if (code < 0x300) return 1; // fast path; sanitized text holds no controls here
  if (inRanges(code, ZERO)) return 0;
  return inRanges(code, WIDE) ? 2 : 1;
}

/**
 * The number of terminal columns a sanitized string takes: one per code point, two for East Asian wide
 * and fullwidth characters and most emoji, zero for combining marks, zero-width characters and variation
 * selectors. An approximation of the Unicode East Asian Width property (UAX #11), not a full grapheme
 * segmentation: an emoji ZWJ sequence counts as the sum of its parts. Controls count one, so measure
 * text after {@link sanitize}. ANSI escape sequences are not recognised; measure before colouring.
 * @param s a string without controls
 * @returns its width in terminal columns
 * @example
 * displayWidth('dome'); // => 4
 * displayWidth('検査'); // => 4
 */
export function displayWidth(s: string): number {
  let width = 0;
  for (const ch of s) width += codeWidth(ch.codePointAt(0) ?? 0);
  return width;
}

/**
 * Cuts a string to at most `width` terminal columns, ending with `…` when anything was cut.
 * A wide character that would straddle the limit is dropped whole.
 * @param s a sanitized string
 * @param width the column budget (0 or less gives the empty string)
 * @returns `s` itself when it fits, else a prefix plus `…`
 * @example
 * truncate('station=S5 · lighting=dome', 12); // => 'station=S5 …'
 */
export function truncate(s: string, width: number): string {
  if (width <= 0) return '';
  if (displayWidth(s) <= width) return s;
  const budget = width - 1; // one column for the ellipsis
  let used = 0;
  let out = '';
  for (const ch of s) {
    const w = codeWidth(ch.codePointAt(0) ?? 0);
    if (used + w > budget) break;
    out += ch;
    used += w;
  }
  return `${out}…`;
}

/**
 * Pads a string with spaces to `width` columns (after truncating it when too long).
 * @param s a sanitized string
 * @param width the column count of the result
 * @param align `left` pads on the right, `right` on the left
 * @returns a string exactly `width` columns wide
 * @example
 * pad('7.0', 5, 'right'); // => '  7.0'
 */
export function pad(s: string, width: number, align: 'left' | 'right' = 'left'): string {
  const cut = truncate(s, width);
  const fill = ' '.repeat(Math.max(0, width - displayWidth(cut)));
  return align === 'left' ? cut + fill : fill + cut;
}
