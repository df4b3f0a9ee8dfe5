import { truncate } from '../../terminal/width.js';
import { Line } from '../components/Line.js';
import { FOUND_CAUTION } from '../found.js';
import { KEYS } from '../keys.js';
import { lineOf, type Span } from '../theme.js';

/** Props of {@link HelpScreen}. */
export interface HelpScreenProps {
  readonly width: number;
  /** lines available; the help is cut to them */
  readonly height: number;
  readonly color: boolean;
  readonly ascii: boolean;
}

/**
 * The help: every key (src/tui/keys.ts, KEYS), what the gap bar's glyphs and the marks mean.
 * @example
 * <HelpScreen width={80} height={18} color={false} ascii={false} /> // => 'keys' / '  ↑ ↓  j k            move (in the detail pane: scroll)' / …
 */
export function HelpScreen({ width, height, color, ascii }: HelpScreenProps) {
  const lines: Span[][] = [lineOf('keys', { bold: true })];
  for (const [k, what] of KEYS) lines.push(lineOf(truncate(`  ${k.padEnd(20)} ${what}`, width)));
  lines.push(lineOf('  gap bar: ' + (ascii ? '. floor  # bias  = variance  ~ mismatch' : '░ floor  █ bias  ▓ variance  ▒ mismatch') + '   * flagged  + marked', { dim: true }));
  lines.push(lineOf(truncate(`  discovered slices: ${FOUND_CAUTION}`, width), { color: 'yellow' }));
  lines.push(lineOf('  any key closes this help', { dim: true }));
  // too tall for the terminal (80×24 holds 18 lines): the title goes first, then the last line left
  // says how many more there are, so what closes the help is never cut away
  if (lines.length > height) lines.shift();
  if (lines.length > height && height >= 1) {
    const more = lines.length - (height - 1);
    lines.splice(height - 1, lines.length, lineOf(truncate(`  … ${more} more lines in a taller terminal · any key closes this help`, width), { dim: true }));
  }
  return (
    <>
      {lines.slice(0, height).map((l, i) => (
        <Line key={i} spans={l} color={color} />
      ))}
    </>
  );
}
