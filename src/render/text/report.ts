/**
 * The plain-text report for a terminal: a header block (inputs, grouping, settings, the overall slice,
 * warnings), the slice table fitted to the terminal width, and a legend. Colour is decoration only:
 * without it the output reads the same (flag mark `*`, focus spelled out).
 */
import type { Split } from '../../core/split.js';
import type { Focus, Gap, Report, SliceReport } from '../../triage/types.js';
import { paint, type Style } from '../../terminal/ansi.js';
import { bytes, count, levelPercent, NULL_MARK, points, pointsInterval, pValue, signedPoints } from '../format.js';
import { sanitize } from '../../terminal/sanitize.js';
import { wrap } from '../../terminal/wrap.js';
import { displayWidth, truncate } from '../../terminal/width.js';
import { FDR_METHOD_NAME, FLOOR_SOURCE_NAME } from '../words.js';
import { FLAG_MARK, fitColumns, sliceColumns } from './columns.js';
import { KEY_WIDTH, keyedLines, layTable, line, naturalWidth, type Column, type Line, type TableRow } from './layout.js';

/** Options of {@link renderText}. */
export interface TextOptions {
  /** emit ANSI SGR colour and weight */
  readonly color: boolean;
  /** terminal columns; no line of the output is wider (default 100) */
  readonly width?: number;
}

/** Default terminal width when none is given. */
const DEFAULT_WIDTH = 100;

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
// The slice table (its columns: columns.ts) and its legend.

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
