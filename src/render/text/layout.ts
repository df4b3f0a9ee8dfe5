/**
 * The generic text layout of the terminal report: lines with their styles, tables with content-derived
 * column widths, and items flowed after a key column. Nothing here knows what a slice is.
 */
import { paint, type Style } from '../../terminal/ansi.js';
import { wrap } from '../../terminal/wrap.js';
import { displayWidth, pad, truncate } from '../../terminal/width.js';

/** Width of the key column of the header block ("inputs", "grouping", …). */
export const KEY_WIDTH = 10;

/** One output line: plain text (already sanitized and fitted) plus how to colour it. */
export interface Line {
  readonly plain: string;
  /** the coloured line; equals `plain` once SGR codes are stripped */
  readonly styled: string;
}

/** A line of plain text, painted with `styles` when `color` is on. */
export function line(plain: string, styles: readonly Style[], color: boolean): Line {
  return { plain, styled: paint(plain, styles, color) };
}

// ---------------------------------------------------------------------------------------------------
// Tables: columns with content-derived widths, padded cells, per-cell and per-row styles.

export interface Column {
  readonly id: string;
  readonly header: string;
  readonly align: 'left' | 'right';
  /** one cell per row, sanitized */
  readonly cells: readonly string[];
  /** separator before this column (spaces); the first column has none */
  readonly gapBefore?: number;
}

export interface TableRow {
  readonly styles: readonly Style[];
  /** column id → styles of that cell */
  readonly cellStyles?: Readonly<Record<string, readonly Style[]>>;
}

export function naturalWidth(column: Column): number {
  let w = displayWidth(column.header);
  for (const cell of column.cells) w = Math.max(w, displayWidth(cell));
  return w;
}

/**
 * Lays out a table: `widths` gives each column's width, `gap` the default separator.
 * Returns the header line, a rule, and one line per row.
 */
export function layTable(
  columns: readonly Column[],
  widths: readonly number[],
  gap: number,
  rows: readonly TableRow[],
  color: boolean,
  headerStyles: readonly Style[],
): { header: Line; rule: Line; body: Line[] } {
  const sep = (i: number): string => (i === 0 ? '' : ' '.repeat(columns[i].gapBefore ?? gap));
  const headerPlain = columns.map((c, i) => sep(i) + pad(c.header, widths[i], c.align)).join('').trimEnd();
  const total = columns.reduce((sum, c, i) => sum + sep(i).length + widths[i], 0);
  const body = rows.map((row, r) => {
    let plain = '';
    let styled = '';
    columns.forEach((c, i) => {
      const cell = pad(c.cells[r], widths[i], c.align);
      const core = cell.trim();
      const lead = cell.length - cell.trimStart().length;
      plain += sep(i) + cell;
      styled +=
        sep(i) +
        (core === ''
          ? cell
          : cell.slice(0, lead) + paint(core, row.cellStyles?.[c.id] ?? [], color) + cell.slice(lead + core.length));
    });
    // trailing padding sits outside every SGR span, so both strings lose the same spaces
    return { plain: plain.trimEnd(), styled: paint(styled.replace(/ +$/, ''), row.styles, color) };
  });
  return {
    header: line(headerPlain, headerStyles, color),
    rule: line('─'.repeat(total), ['dim'], color),
    body,
  };
}

// ---------------------------------------------------------------------------------------------------
// Items flowed after a key column: the header block's lines.

/**
 * Items joined by `sep`, wrapped so no item is split across lines unless it is wider than a line on its
 * own; then it is word-wrapped (`wrapLong`) or truncated.
 */
function flow(
  items: readonly string[],
  width: number,
  first: string,
  indent: string,
  sep: string,
  wrapLong: boolean,
): string[] {
  const lines: string[] = [];
  let current = first;
  let empty = true;
  for (const item of items) {
    const candidate = empty ? current + item : current + sep + item;
    // room for the separator's mark should the next item move to a new line
    if (displayWidth(candidate) + sep.trimEnd().length <= width) {
      current = candidate;
      empty = false;
      continue;
    }
    if (!empty) {
      lines.push(current + sep.trimEnd());
      current = indent;
    }
    if (displayWidth(current + item) <= width || !wrapLong) {
      current += item;
    } else {
      const wrapped = wrap(item, width, { first: current, indent });
      lines.push(...wrapped.slice(0, -1));
      current = wrapped[wrapped.length - 1];
    }
    empty = false;
  }
  lines.push(current);
  return lines.map((l) => truncate(l, width));
}

/** Items joined by ` · `, wrapped after a key column; an item too long for a line is truncated. */
function keyed(key: string, items: readonly string[], width: number): string[] {
  return flow(items, width, key.padEnd(KEY_WIDTH), ' '.repeat(KEY_WIDTH), ' · ', false);
}

export function keyedLines(key: string, items: readonly string[], width: number, color: boolean): Line[] {
  return keyed(key, items, width).map((plain) => {
    const k = plain.slice(0, KEY_WIDTH);
    return { plain, styled: paint(k, ['dim'], color) + plain.slice(KEY_WIDTH) };
  });
}
