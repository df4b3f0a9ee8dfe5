/**
 * Renderers of the slice report: text for a terminal, markdown, CSV and JSON.
 */
import type { Report } from '../triage/types.js';
import { error } from '../core/errors.js';
import { renderCsv } from './csv.js';
import { renderJson } from './json.js';
import { renderMarkdown } from './markdown.js';
import { renderText } from './text/report.js';

/** Output formats of `floorgap report`. */
export type Format = 'text' | 'md' | 'csv' | 'json';

/** Every format, e.g. for a CLI choice list. */
export const FORMATS: readonly Format[] = ['text', 'md', 'csv', 'json'];

/** Options of {@link render}. */
export interface RenderOptions {
  /** ANSI colour in `text` (ignored by the other formats) */
  readonly color: boolean;
  /** terminal columns for `text` (default 100) */
  readonly width?: number;
}

/**
 * Renders the slice report in one of the output formats.
 * @param report the slice report (`floorgap.report/1`)
 * @param format `text`, `md`, `csv` or `json`
 * @param options `color` (and `width`) for `text`
 * @returns the rendered report, ending with a line break
 * @example
 * process.stdout.write(render(report, 'text', { color: process.stdout.isTTY === true }));
 */
export function render(report: Report, format: Format, options: RenderOptions): string {
  switch (format) {
    case 'text':
      return renderText(report, { color: options.color, width: options.width });
    case 'md':
      return renderMarkdown(report);
    case 'csv':
      return renderCsv(report);
    case 'json':
      return renderJson(report);
    default: {
      const never: never = format;
      throw error(`unknown output format "${String(never)}": expected one of ${FORMATS.join(', ')}`);
    }
  }
}

export { renderCsv } from './csv.js';
export { renderJson } from './json.js';
export { renderMarkdown, escapeMarkdown } from './markdown.js';
export { renderText } from './text/report.js';
