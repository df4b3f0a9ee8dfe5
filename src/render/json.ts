/**
 * The report as JSON (`floorgap.report/1`), always valid and safe to print: non-finite numbers become
 * null, and the characters JSON allows raw inside strings but a terminal would act on or reorder (DEL,
 * C1 controls, bidi marks and overrides, line and paragraph separators) are written as `\uXXXX` escapes,
 * which parse back to the same string.
 */
import type { Report } from '../triage/types.js';

/** Characters JSON.stringify leaves raw that must not reach a terminal. */
const UNSAFE_IN_STRINGS = /[\u007f-\u009f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069]/g;

function finite(_key: string, value: unknown): unknown {
  return typeof value === 'number' && !Number.isFinite(value) ? null : value;
}

/**
 * Renders the slice report as pretty-printed JSON.
 * @param report the slice report
 * @returns JSON text with two-space indent, ending with a newline
 * @example
 * JSON.parse(renderJson(report)).schema; // => 'floorgap.report/1'
 */
export function renderJson(report: Report | object): string {
  const json = JSON.stringify(report, finite, 2).replace(
    UNSAFE_IN_STRINGS,
    (ch) => `\\u${ch.charCodeAt(0).toString(16).padStart(4, '0')}`,
  );
  return `${json}\n`;
}
