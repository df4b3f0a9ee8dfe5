/**
 * The report as CSV (RFC 4180): one row per slice, the overall slice first with label `overall`, flat
 * columns, values as fractions, missing values as empty cells. Text cells are made safe to open in a
 * spreadsheet (a leading `=`, `+`, `-`, `@`, tab or CR gets a `'`) and to print in a terminal
 * (controls other than tab, CR and LF become visible escapes; a field holding one of those three is quoted).
 */
import type { Split } from '../core/split.js';
import type { Gap, Report, SliceReport } from '../triage/types.js';
import { plainNumber } from './format.js';
import { sanitize } from '../terminal/sanitize.js';

/** The CSV columns, in order. */
export const CSV_COLUMNS: readonly string[] = [
  'rank',
  'label',
  'flagged',
  'focus',
  'rows_train',
  'rows_train_dev',
  'rows_dev',
  'rows_test',
  'share',
  'floor',
  'floor_lo',
  'floor_hi',
  'floor_source',
  'floor_raw',
  'floor_audited',
  'kappa',
  ...(['train', 'train_dev', 'dev', 'test'] as const).flatMap((s) => [`err_${s}`, `err_${s}_lo`, `err_${s}_hi`]),
  ...(['bias', 'variance', 'mismatch', 'dev_overfit'] as const).flatMap((g) => [g, `${g}_lo`, `${g}_hi`, `${g}_q`]),
  'headroom',
  'headroom_bias',
  'headroom_variance',
  'headroom_mismatch',
  'yield',
  'cost',
  'labels_to_halve',
  'curve_beta',
  'curve_source',
];

const SPLITS: readonly Split[] = ['train', 'train_dev', 'dev', 'test'];

/** A cell holding a number: never neutralised, so `-0.5` stays a number. */
export type Value =
  | { readonly kind: 'number'; readonly value: number | null }
  | { readonly kind: 'text'; readonly value: string };

export const num = (value: number | null | undefined): Value => ({ kind: 'number', value: value ?? null });
export const text = (value: string): Value => ({ kind: 'text', value });

/**
 * Neutralises a text cell against formula injection: a cell starting with `=`, `+`, `-`, `@`, tab or CR
 * gets a leading `'`, so a spreadsheet shows it as text instead of evaluating it.
 * @param value the cell text
 * @returns the text, prefixed when it could start a formula
 * @example
 * neutralizeFormula('=SUM(A1)'); // => "'=SUM(A1)"
 */
export function neutralizeFormula(value: string): string {
  return /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
}

/**
 * Quotes a field per RFC 4180 when it holds a comma, a double quote, CR, LF or TAB (none of them is
 * TEXTDATA in the RFC's grammar; a bare CR or TAB would also move the cursor when the file is viewed);
 * quotes are doubled.
 * @param field the cell text
 * @returns the field ready to join with commas
 * @example
 * quoteField('a,"b"'); // => '"a,""b"""'
 */
export function quoteField(field: string): string {
  return /[",\r\n\t]/.test(field) ? `"${field.replaceAll('"', '""')}"` : field;
}

/** One CSV field: a number as plain digits, text neutralised, sanitised and quoted. */
export function cell(value: Value): string {
  if (value.kind === 'number') return plainNumber(value.value);
  return quoteField(neutralizeFormula(sanitize(value.value, { keepWhitespace: true })));
}

function gapValues(gap: Gap | null): Value[] {
  return [num(gap?.value), num(gap?.lo), num(gap?.hi), num(gap?.q)];
}

/** The {@link CSV_COLUMNS} of one slice. */
export function sliceValues(slice: SliceReport, overall: boolean): Value[] {
  return [
    num(slice.rank),
    text(overall ? 'overall' : slice.label),
    text(slice.flagged ? 'true' : 'false'),
    text(slice.focus),
    ...SPLITS.map((s) => num(slice.rows[s])),
    num(slice.share),
    num(slice.floor.value),
    num(slice.floor.lo),
    num(slice.floor.hi),
    text(slice.floor.source),
    num(slice.floor.raw?.value),
    num(slice.floor.audited),
    num(slice.agreement?.kappa),
    ...SPLITS.flatMap((s) => {
      const rate = slice.error[s];
      return [num(rate?.value), num(rate?.lo), num(rate?.hi)];
    }),
    ...gapValues(slice.gaps.avoidable_bias),
    ...gapValues(slice.gaps.variance),
    ...gapValues(slice.gaps.mismatch),
    ...gapValues(slice.gaps.dev_overfit),
    num(slice.headroom?.total),
    num(slice.headroom?.bias),
    num(slice.headroom?.variance),
    num(slice.headroom?.mismatch),
    num(slice.yield),
    num(slice.cost),
    num(slice.labels_to_halve),
    num(slice.curve.beta),
    text(slice.curve.source),
  ];
}

/**
 * Renders the slice report as CSV with a header row and CRLF line ends (RFC 4180).
 * @param report the slice report (`floorgap.report/1`)
 * @returns CSV text, ending with CRLF
 * @example
 * await writeFile('slices.csv', renderCsv(report));
 */
export function renderCsv(report: Report): string {
  const ranked = [...report.slices].sort((a, b) => a.rank - b.rank || a.label.localeCompare(b.label));
  const rows = [
    CSV_COLUMNS.join(','),
    sliceValues(report.overall, true).map(cell).join(','),
    ...ranked.map((s) => sliceValues(s, false).map(cell).join(',')),
  ];
  return `${rows.join('\r\n')}\r\n`;
}
