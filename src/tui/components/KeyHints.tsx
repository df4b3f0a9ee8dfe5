import { sanitize } from '../../terminal/sanitize.js';
import { truncate } from '../../terminal/width.js';
import { DETAIL_HINT, DETAIL_HINT_ASCII, FOUND_HINT, FOUND_HINT_ASCII, HINT, HINT_ASCII } from '../keys.js';
import type { Mode } from '../state.js';
import type { Span } from '../theme.js';
import { Line } from './Line.js';

/** Props of {@link KeyHints}. */
export interface KeyHintsProps {
  readonly mode: Mode;
  /** the text typed into the open prompt (data text: sanitised here) */
  readonly draft: string;
  readonly width: number;
  readonly ascii: boolean;
  readonly color: boolean;
  /** the discovered view is shown (its table has keys of its own) */
  readonly found?: boolean;
}

function spans({ mode, draft, width, ascii, found }: KeyHintsProps): Span[] {
  if (mode === 'filter') return [{ text: truncate(`/${sanitize(draft)}▏ (Enter keeps, Esc clears)`, width), bold: true }];
  if (mode === 'export-path') return [{ text: truncate(`export rows to: ${sanitize(draft)}▏ (Enter writes, Esc cancels)`, width), bold: true }];
  if (mode === 'export-confirm') return [{ text: truncate(`${sanitize(draft.trim())} exists: overwrite it and its manifest? (y/n)`, width), bold: true, color: 'yellow' }];
  const table = found ? (ascii ? FOUND_HINT_ASCII : FOUND_HINT) : ascii ? HINT_ASCII : HINT;
  const hint = mode === 'detail' ? (ascii ? DETAIL_HINT_ASCII : DETAIL_HINT) : table;
  return [{ text: truncate(hint, width), dim: true }];
}

/**
 * The last line: the keys of the screen shown (src/tui/keys.ts), or the open prompt in their place
 * (filter, export path, the overwrite question).
 * @example
 * <KeyHints mode="filter" draft="dome" width={80} ascii={false} color={false} /> // => '/dome▏ (Enter keeps, Esc clears)'
 */
export function KeyHints(props: KeyHintsProps) {
  return <Line spans={spans(props)} color={props.color} />;
}
