/**
 * The plain-text report for a terminal: a header block (inputs, grouping, settings, the overall slice,
 * warnings), the slice table fitted to the terminal width, and a legend. Colour is decoration only:
 * without it the output reads the same (flag mark `*`, focus spelled out).
 */
import type { Split } from '../core/cell.js';
import type { Focus, Gap, Report, SliceReport } from '../triage/types.js';
import { paint, type Style } from '../terminal/ansi.js';
import {
  bytes,
  count,
  levelPercent,
  NULL_MARK,
  percent,
  points,
  pointsInterval,
  pValue,
  signedPoints,
} from './format.js';
import { sanitize } from '../terminal/sanitize.js';
import { wrap } from '../terminal/wrap.js';
import { displayWidth, pad, truncate } from '../terminal/width.js';
import { FDR_METHOD_NAME, FLOOR_SOURCE_NAME } from './words.js';

/** Options of {@link renderText}. */
export interface TextOptions {
  /** emit ANSI SGR colour and weight */
  readonly color: boolean;
  /** terminal columns; no line of the output is wider (default 100) */
  readonly width?: number;
}

/** Default terminal width when none is given. */
const DEFAULT_WIDTH = 100;

/** The flag mark of a flagged slice. */
const FLAG_MARK = '*';

const FOCUS_STYLE: Readonly<Record<Focus, readonly Style[]>> = {
  bias: ['red'],
  variance: ['yellow'],
  mismatch: ['magenta'],
  'at-floor': ['green'],
  'below-floor': ['cyan'],
  thin: [],
  unclear: [],
};

const NBSP = '\u00a0';

/** Width of the key column of the header block ("inputs", "grouping", …). */
const KEY_WIDTH = 10;

/** One output line: plain text (already sanitized and fitted) plus how to colour it. */
interface Line {
  readonly plain: string;
  /** the coloured line; equals `plain` once SGR codes are stripped */
  readonly styled: string;
}

function line(plain: string, styles: readonly Style[], color: boolean): Line {
  return { plain, styled: paint(plain, styles, color) };
}

// ---------------------------------------------------------------------------------------------------
// Tables: columns with content-derived widths, padded cells, per-cell and per-row styles.

interface Column {
  readonly id: string;
  readonly header: string;
  readonly align: 'left' | 'right';
  /** one cell per row, sanitized */
  readonly cells: readonly string[];
  /** separator before this column (spaces); the first column has none */
  readonly gapBefore?: number;
}

interface TableRow {
  readonly styles: readonly Style[];
  /** column id → styles of that cell */
  readonly cellStyles?: Readonly<Record<string, readonly Style[]>>;
}

function naturalWidth(column: Column): number {
  let w = displayWidth(column.header);
  for (const cell of column.cells) w = Math.max(w, displayWidth(cell));
  return w;
}

/**
 * Lays out a table: `widths` gives each column's width, `gap` the default separator.
 * Returns the header line, a rule, and one line per row.
 */
function layTable(
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
// Text helpers for the header block.

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

function keyedLines(key: string, items: readonly string[], width: number, color: boolean): Line[] {
  return keyed(key, items, width).map((plain) => {
    const k = plain.slice(0, KEY_WIDTH);
    return { plain, styled: paint(k, ['dim'], color) + plain.slice(KEY_WIDTH) };
  });
}

function timestamp(modified: string): string {
  const m = /^(\d{4}-\d\d-\d\d)T(\d\d:\d\d)(?::\d\d(?:\.\d+)?)?Z$/.exec(modified);
  return m ? `${m[1]} ${m[2]} UTC` : sanitize(modified);
}

function headerBlock(report: Report, width: number, color: boolean): Line[] {
  const lines: Line[] = [];
  const flagged = report.slices.filter((s) => s.flagged).length;
  const n = report.slices.length;
  lines.push(
    line(
      truncate(`floorgap slice report · ${count(n)} slice${n === 1 ? '' : 's'} · ${count(flagged)} flagged`, width),
      ['bold'],
      color,
    ),
  );

  const inputs = report.source.inputs.map((input) => {
    const split = input.split ? ` (${input.split})` : '';
    return `${sanitize(input.path)}${split}, ${bytes(input.bytes)}, modified ${timestamp(input.modified)}`;
  });
  lines.push(...keyedLines('inputs', inputs.length > 0 ? inputs : [NULL_MARK], width, color));

  const roles = Object.entries(report.source.roles)
    .filter((entry): entry is [string, string] => entry[1] !== null)
    .map(([role, column]) => `${sanitize(role)}=${sanitize(column)}`);
  if (report.source.annotators.length > 0) roles.push(`annotators=${report.source.annotators.map((a) => sanitize(a)).join(',')}`);
  if (roles.length > 0) lines.push(...keyedLines('columns', roles, width, color));
  if (report.run !== null) {
    lines.push(...keyedLines('run', [`${sanitize(report.run)} (of ${report.runs.map((r) => sanitize(r)).join(', ')}; learning curves fitted over all runs)`], width, color));
  }
  if (report.source.where !== null) lines.push(...keyedLines('filter', [sanitize(report.source.where)], width, color));

  const grouping =
    report.by === null
      ? ['overview: one-column slices']
      : report.by.length === 0
        ? ['none']
        : [`by ${report.by.map((c) => sanitize(c)).join(', ')}`];
  lines.push(...keyedLines('grouping', grouping, width, color));
  const fdrMethod = FDR_METHOD_NAME[report.fdr_method] ?? sanitize(String(report.fdr_method));
  lines.push(
    ...keyedLines(
      'settings',
      [
        `${levelPercent(report.confidence)} intervals`,
        `false discovery rate ${levelPercent(report.fdr)} (${fdrMethod})`,
        `floorgap ${sanitize(report.source.version)}`,
      ],
      width,
      color,
    ),
  );
  return lines;
}

function overallBlock(report: Report, width: number, color: boolean): Line[] {
  const o = report.overall;
  const splits: readonly Split[] = ['train', 'train_dev', 'dev', 'test'];
  const gaps: readonly [string, Gap | null][] = [
    ['avoidable bias', o.gaps.avoidable_bias],
    ['variance', o.gaps.variance],
    ['mismatch', o.gaps.mismatch],
    ['dev overfit', o.gaps.dev_overfit],
  ];
  const floorNote = [FLOOR_SOURCE_NAME[o.floor.source] ?? sanitize(String(o.floor.source))];
  if (o.floor.source === 'annotators' && o.floor.rule) floorNote[0] = `annotators, ${o.floor.rule} rule, ${count(o.floor.audited ?? 0)} audited`;
  if (o.agreement?.kappa != null) floorNote.push(`kappa ${o.agreement.kappa.toFixed(2)}`);
  if (o.floor.dev !== null && Math.abs(o.floor.dev - o.floor.value) >= 0.0005) {
    floorNote.push(`${points(o.floor.dev)} on dev rows`);
  }
  const interval = `${levelPercent(report.confidence)} interval`;
  const name = ['floor', ...splits, '', ...gaps.map(([g]) => g)];
  const rows = ['', ...splits.map((s) => count(o.rows[s])), '', ...gaps.map(() => '')];
  const value = [
    points(o.floor.value),
    ...splits.map((s) => points(o.error[s]?.value)),
    'gap',
    ...gaps.map(([, g]) => signedPoints(g?.value)),
  ];
  const range = [
    pointsInterval(o.floor.lo, o.floor.hi),
    ...splits.map((s) => pointsInterval(o.error[s]?.lo, o.error[s]?.hi)),
    interval,
    ...gaps.map(([, g]) => pointsInterval(g?.lo, g?.hi, true)),
  ];
  const note = [
    floorNote.join('; '),
    ...splits.map(() => ''),
    '',
    // q when the overall slice was part of the tested family, else its unadjusted p
    ...gaps.map(([, g]) => (g?.q != null ? `q ${pValue(g.q)}` : g?.p != null ? `p ${pValue(g.p)}` : '')),
  ];
  const columns: Column[] = [
    { id: 'name', header: 'overall', align: 'left', cells: name.map((s) => (s === '' ? '' : `  ${s}`)) },
    { id: 'rows', header: 'rows', align: 'right', cells: rows, gapBefore: 2 },
    { id: 'value', header: 'error', align: 'right', cells: value, gapBefore: 2 },
    { id: 'range', header: interval, align: 'left', cells: range, gapBefore: 2 },
    { id: 'note', header: '', align: 'left', cells: note, gapBefore: 2 },
  ];
  const widths = columns.map(naturalWidth);
  const gapHeader = splits.length + 1;
  const laid = layTable(columns, widths, 2, name.map(() => ({ styles: [] })), false, []);
  return [laid.header, ...laid.body].map((l, r) => {
    const plain = truncate(l.plain, width);
    if (r === 0 || r === gapHeader + 1) return line(plain, ['bold'], color);
    const key = plain.slice(0, widths[0]);
    return { plain, styled: paint(key, ['dim'], color) + plain.slice(key.length) };
  });
}

/** Hints of the ranked slices (likely noisy labels, curves that could not be fitted), at most `limit`. */
function hintLines(report: Report, width: number, color: boolean, limit = 6): Line[] {
  const items = report.slices.flatMap((s) => s.hints.map((h) => `${sanitize(s.label)}: ${sanitize(h)}`));
  const lines: Line[] = [];
  items.slice(0, limit).forEach((item, i) => {
    const first = i === 0 ? 'notes'.padEnd(KEY_WIDTH) : ' '.repeat(KEY_WIDTH);
    for (const plain of wrap(`- ${item}`, width, { first, indent: ' '.repeat(KEY_WIDTH + 2) })) {
      const k = plain.slice(0, KEY_WIDTH);
      lines.push({ plain, styled: paint(k, ['dim'], color) + plain.slice(KEY_WIDTH) });
    }
  });
  if (items.length > limit) lines.push(line(`${' '.repeat(KEY_WIDTH)}(${items.length - limit} more in --format json)`, ['dim'], color));
  return lines;
}

function warningLines(report: Report, width: number, color: boolean): Line[] {
  const lines: Line[] = [];
  report.warnings.forEach((warning, i) => {
    const first = i === 0 ? 'warnings'.padEnd(KEY_WIDTH) : ' '.repeat(KEY_WIDTH);
    const wrapped = wrap(`! ${sanitize(warning)}`, width, { first, indent: ' '.repeat(KEY_WIDTH + 2) });
    for (const plain of wrapped) {
      const k = plain.slice(0, KEY_WIDTH);
      lines.push({ plain, styled: paint(k, ['dim'], color) + paint(plain.slice(KEY_WIDTH), ['yellow'], color) });
    }
  });
  return lines;
}

// ---------------------------------------------------------------------------------------------------
// The slice table.

/** Optional columns, dropped in this order when the width is too small for a readable slice label. */
const DROP_ORDER = ['share', 'train', 'rows', 'yield'] as const;

/** Slice labels longer than this are truncated even on a wide terminal. */
const MAX_LABEL = 48;

/**
 * How slices are named in the table. With a `by` grouping where every slice carries exactly those
 * columns, the header names the columns and each cell holds only the values (`S5 · dome` under
 * `station · lighting`); otherwise (overview, or keys that differ) each cell holds the full label.
 */
function sliceLabels(report: Report): { header: string; cell: (s: SliceReport) => string } {
  const by = report.by;
  const byValues =
    by !== null &&
    by.length > 0 &&
    report.slices.every((s) => {
      const keys = Object.keys(s.key);
      return keys.length === by.length && by.every((c) => Object.prototype.hasOwnProperty.call(s.key, c));
    });
  if (!byValues) return { header: 'slice', cell: (s) => sanitize(s.label) };
  return {
    header: by.map((c) => sanitize(c)).join(' · '),
    cell: (s) => by.map((c) => sanitize(s.key[c])).join(' · '),
  };
}

function sliceColumns(report: Report, rows: readonly SliceReport[]): Column[] {
  const overall = report.overall;
  const labels = sliceLabels(report);
  const anyMismatch = rows.some((s) => s.gaps.mismatch !== null);
  const columns: Column[] = [
    { id: 'rank', header: '#', align: 'right', cells: rows.map((s) => (s === overall ? '' : String(s.rank))) },
    { id: 'flag', header: '', align: 'left', cells: rows.map((s) => (s.flagged ? FLAG_MARK : '')), gapBefore: 1 },
    {
      id: 'slice',
      header: labels.header,
      align: 'left',
      cells: rows.map((s) => (s === overall ? 'overall' : labels.cell(s))),
      gapBefore: 1,
    },
    { id: 'rows', header: 'rows', align: 'right', cells: rows.map((s) => count(s.rows.dev)) },
    { id: 'share', header: 'share', align: 'right', cells: rows.map((s) => (s === overall ? '' : percent(s.share))) },
    { id: 'floor', header: 'floor', align: 'right', cells: rows.map((s) => points(s.floor.value)) },
    { id: 'train', header: 'train', align: 'right', cells: rows.map((s) => points(s.error.train?.value)) },
    { id: 'dev', header: 'dev', align: 'right', cells: rows.map((s) => points(s.error.dev?.value)) },
    { id: 'bias', header: 'bias', align: 'right', cells: rows.map((s) => signedPoints(s.gaps.avoidable_bias?.value)) },
    { id: 'var', header: 'var', align: 'right', cells: rows.map((s) => signedPoints(s.gaps.variance?.value)) },
  ];
  if (anyMismatch) {
    const cells = rows.map((s) => signedPoints(s.gaps.mismatch?.value));
    columns.push({ id: 'mism', header: 'mism', align: 'right', cells });
  }
  columns.push(
    { id: 'headroom', header: 'headroom', align: 'right', cells: rows.map((s) => points(s.headroom?.total, 2)) },
    { id: 'yield', header: 'yield', align: 'right', cells: rows.map((s) => points(s.yield, 2)) },
    { id: 'focus', header: 'focus', align: 'left', cells: rows.map((s) => sanitize(s.focus)) },
  );
  return columns;
}

interface Fit {
  readonly columns: Column[];
  readonly widths: number[];
  readonly gap: number;
  readonly dropped: string[];
}

/** Chooses separators, dropped columns and the label width so the table fits `width` columns. */
function fitColumns(all: readonly Column[], width: number): Fit {
  const slice = all.find((c) => c.id === 'slice') as Column;
  const labelNatural = Math.min(MAX_LABEL, naturalWidth(slice));
  // drop columns only while three labels in four would be cut (and never for more than 20 columns)
  const sorted = slice.cells.map(displayWidth).sort((a, b) => a - b);
  const typical = sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * 0.75))] ?? 0;
  const minLabel = Math.min(labelNatural, 20, Math.max(typical, 7));
  const attempts: { gap: number; drop: number; minLabel: number }[] = [
    { gap: 2, drop: 0, minLabel: labelNatural },
    ...[0, 1, 2, 3, 4].map((drop) => ({ gap: 1, drop, minLabel })),
  ];
  let last: Fit | null = null;
  for (const { gap, drop, minLabel } of attempts) {
    const dropped: string[] = DROP_ORDER.slice(0, drop).filter((id) => all.some((c) => c.id === id));
    const columns = all.filter((c) => !dropped.includes(c.id));
    const widths = columns.map((c) => (c.id === 'slice' ? 0 : naturalWidth(c)));
    const fixed = columns.reduce((sum, c, i) => sum + widths[i] + (i === 0 ? 0 : c.gapBefore ?? gap), 0);
    const available = width - fixed;
    const labelWidth = Math.max(1, Math.min(labelNatural, available));
    const fit = { columns, widths: columns.map((c, i) => (c.id === 'slice' ? labelWidth : widths[i])), gap, dropped };
    if (available >= minLabel) return fit;
    last = fit;
  }
  return last as Fit;
}

interface SliceTable {
  readonly lines: Line[];
  /** ids of the columns shown */
  readonly shown: string[];
  /** ids of the optional columns hidden to fit the width */
  readonly dropped: string[];
}

function sliceTable(report: Report, width: number, color: boolean): SliceTable {
  const ranked = [...report.slices].sort((a, b) => a.rank - b.rank || a.label.localeCompare(b.label));
  const rows: SliceReport[] = [report.overall, ...ranked];
  const fit = fitColumns(sliceColumns(report, rows), width);
  const tableRows: TableRow[] = rows.map((s) => ({
    styles: s.flagged ? ['bold'] : s.focus === 'thin' ? ['dim'] : [],
    cellStyles: { focus: FOCUS_STYLE[s.focus] ?? [] },
  }));
  const laid = layTable(fit.columns, fit.widths, fit.gap, tableRows, color, ['bold']);
  const [overallRow, ...body] = laid.body;
  const lines = [laid.header, laid.rule, overallRow, laid.rule, ...body];
  // Layout keeps every line within the width; cut anyway when even the narrowest layout is too wide.
  return {
    lines: lines.map((l) => (displayWidth(l.plain) <= width ? l : line(truncate(l.plain, width), [], false))),
    shown: fit.columns.map((c) => c.id),
    dropped: fit.dropped,
  };
}

function legend(report: Report, table: SliceTable, width: number, color: boolean): Line[] {
  const { shown, dropped } = table;
  const withoutTrainDev = [report.overall, ...report.slices].every((s) => s.error.train_dev === null);
  const has = (id: string): boolean => shown.includes(id);
  const items = [
    'points of error (7.0 = 7%)',
    has('rows') ? 'rows = dev rows' : '',
    has('share') ? 'share = of all dev rows' : '',
    'bias = train - floor',
    withoutTrainDev ? 'var = dev - train' : 'var = train_dev - train (dev - train without train_dev)',
    has('mism') ? 'mism = dev - train_dev' : '',
    'headroom = points of overall dev error regained if the slice reached its floor',
    has('yield') ? 'yield = headroom per 1,000 new labelled rows per unit of labelling cost' : '',
    `${FLAG_MARK} = flagged (significant after false-discovery control, worth acting on)`,
    `${NULL_MARK} = not available`,
    dropped.length > 0 ? `hidden to fit ${width} columns: ${dropped.join(', ')}` : '',
  ].filter((item) => item !== '');
  // short items never break inside, long ones not before their first word after `=`
  const glue = (item: string): string => {
    if (item.length <= 32) return item.replaceAll(' ', NBSP);
    const words = item.split(' ');
    return [words.slice(0, 3).join(NBSP), ...words.slice(3)].join(' ');
  };
  const text = items.map(glue).join('; ');
  return wrap(text, width).map((plain) => line(plain.replaceAll(NBSP, ' '), ['dim'], color));
}

// ---------------------------------------------------------------------------------------------------

/**
 * Renders the slice report for a terminal.
 * @param report the slice report (`floorgap.report/1`)
 * @param options `color` for ANSI styling; `width` in columns (default 100), which no line exceeds
 * @returns the text, ending with a newline
 * @example
 * process.stdout.write(renderText(report, { color: process.stdout.isTTY, width: process.stdout.columns }));
 */
export function renderText(report: Report, options: TextOptions): string {
  const requested = options.width ?? DEFAULT_WIDTH;
  const width = Number.isFinite(requested) ? Math.max(1, Math.floor(requested)) : DEFAULT_WIDTH;
  const color = options.color;
  const table = sliceTable(report, width, color);
  const blank: Line = { plain: '', styled: '' };
  const lines: Line[] = [
    ...headerBlock(report, width, color),
    blank,
    ...overallBlock(report, width, color),
  ];
  if (report.warnings.length > 0) lines.push(blank, ...warningLines(report, width, color));
  lines.push(blank, ...table.lines);
  const hints = hintLines(report, width, color);
  if (hints.length > 0) lines.push(blank, ...hints);
  lines.push(blank, ...legend(report, table, width, color));
  return `${lines.map((l) => l.styled).join('\n')}\n`;
}
