import type { Focus } from '../triage/types.js';
import type { BarPart } from './model.js';

/** Colours of the explorer; every one is decoration only (glyphs and words carry the meaning). */
export const FOCUS_COLOR: Readonly<Record<Focus, string | undefined>> = {
  bias: 'red',
  variance: 'yellow',
  mismatch: 'magenta',
  'at-floor': 'green',
  'below-floor': 'cyan',
  thin: 'gray',
  unclear: undefined,
};

export const BAR_COLOR: Readonly<Record<BarPart, string>> = {
  floor: 'gray',
  bias: 'red',
  variance: 'yellow',
  mismatch: 'magenta',
};

/** A piece of a line with its style; styles apply only when colour is on. */
export interface Span {
  readonly text: string;
  readonly color?: string;
  readonly bold?: boolean;
  readonly dim?: boolean;
  readonly inverse?: boolean;
}

/**
 * A line of one span.
 * @example
 * lineOf('keys', { bold: true }); // => [{ text: 'keys', bold: true }]
 */
export function lineOf(text: string, style: Omit<Span, 'text'> = {}): Span[] {
  return [{ text, ...style }];
}
