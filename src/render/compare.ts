/**
 * The comparison (`floorgap.compare/1`) as text for a terminal and as JSON. Text from data is
 * sanitised; JSON escapes what a terminal would act on.
 */
import type { Change, Comparison, SliceComparison, Verdict } from '../compare/types.js';
import { SPLITS } from '../core/split.js';
import { error } from '../core/errors.js';
import type { Style } from '../terminal/ansi.js';
import { sanitize } from '../terminal/sanitize.js';
import { displayWidth, truncate } from '../terminal/width.js';
import { wrap } from '../terminal/wrap.js';
import { count, levelPercent, NULL_MARK, points, pointsInterval, signedPoints } from './format.js';
import { renderJson } from './json.js';
import { keyedLines, layTable, line, naturalWidth, type Column, type Line } from './text/layout.js';
import { FDR_METHOD_NAME } from './words.js';

/** The formats compare writes. */
export type CompareFormat = 'text' | 'json';

const VERDICT_WORD: Readonly<Record<Verdict, string>> = {
  improved: 'improved',
  regressed: 'regressed',
  fell: 'fell',
  rose: 'rose',
  'no-clear-change': 'no clear change',
  'within-margin': 'within margin',
  thin: 'thin',
};
const VERDICT_STYLE: Partial<Record<Verdict, readonly Style[]>> = { improved: ['green'], regressed: ['red'], fell: ['green'], rose: ['red'], thin: ['dim'] };

/**
 * A change as a table cell: the signed change and its verdict when clear (dev error: improved or
 * regressed; a part: fell or rose); with no clear change, the interval's ends (dev error) or the value
 * alone (a part); "within ±M" and "thin" by name.
 */
function changeCell(c: Change | null, dev: boolean): string {
  if (!c) return NULL_MARK;
  const value = signedPoints(c.value);
  if (c.verdict === 'no-clear-change') return dev ? `${value} ${pointsInterval(c.lo, c.hi, true)}` : value;
  return `${value} ${VERDICT_WORD[c.verdict]}`;
}

function tableColumns(rows: readonly SliceComparison[]): { columns: Column[]; optional: string[] } {
  const columns: Column[] = [
    { id: 'slice', header: 'slice', align: 'left', cells: rows.map((s) => sanitize(s.label)) },
    { id: 'dev', header: 'Δdev', align: 'left', cells: rows.map((s) => changeCell(s.change.dev_error, true)) },
    { id: 'bias', header: 'Δbias', align: 'left', cells: rows.map((s) => changeCell(s.change.avoidable_bias, false)) },
    { id: 'var', header: 'Δvar', align: 'left', cells: rows.map((s) => changeCell(s.change.variance, false)) },
    { id: 'mism', header: 'Δmism', align: 'left', cells: rows.map((s) => changeCell(s.change.mismatch, false)) },
    { id: 'reading', header: 'reading', align: 'left', cells: rows.map((s) => sanitize(s.reading)) },
  ];
  return { columns, optional: ['mism', 'var', 'bias'] };
}

function slicesTable(rows: readonly SliceComparison[], width: number, color: boolean): { lines: Line[]; dropped: string[] } {
  const { columns: all, optional } = tableColumns(rows);
  let columns = all;
  const dropped: string[] = [];
  const gap = 2;
  const widths = () => columns.map(naturalWidth);
  const total = (w: number[]) => w.reduce((a, b) => a + b, 0) + gap * (columns.length - 1);
  const minFlexible = 24;
  // the slice and reading columns give way first (down to 24 each), then optional columns go
  const squeezed = (w: number[]) => {
    const si = columns.findIndex((c) => c.id === 'slice');
    const ri = columns.findIndex((c) => c.id === 'reading');
    return total(w) - w[si] - w[ri] + Math.min(w[si], minFlexible) + Math.min(w[ri], minFlexible);
  };
  for (const id of optional) {
    if (squeezed(widths()) <= width) break;
    columns = columns.filter((c) => c.id !== id);
    dropped.push(all.find((c) => c.id === id)!.header);
  }
  const w = widths();
  const ri = columns.findIndex((c) => c.id === 'reading');
  const si = columns.findIndex((c) => c.id === 'slice');
  let over = total(w) - width;
  if (over > 0) {
    const cut = Math.min(over, Math.max(0, w[ri] - minFlexible));
    w[ri] -= cut;
    over -= cut;
  }
  if (over > 0) w[si] = Math.max(8, w[si] - over);
  columns = columns.map((c, i) => ({ ...c, cells: c.cells.map((x) => (displayWidth(x) > w[i] ? truncate(x, w[i]) : x)) }));
  const styles = rows.map((s) => ({
    styles: [] as Style[],
    cellStyles: {
      dev: VERDICT_STYLE[s.change.dev_error?.verdict ?? 'thin'] ?? [],
      bias: VERDICT_STYLE[s.change.avoidable_bias?.verdict ?? 'thin'] ?? [],
      var: VERDICT_STYLE[s.change.variance?.verdict ?? 'thin'] ?? [],
      mism: VERDICT_STYLE[s.change.mismatch?.verdict ?? 'thin'] ?? [],
    },
  }));
  const laid = layTable(columns, w, gap, styles, color, ['bold']);
  const lines = [laid.header, laid.rule, ...laid.body].map((l) => (displayWidth(l.plain) <= width ? l : line(truncate(l.plain, width), [], false)));
  return { lines, dropped };
}

/**
 * Renders the comparison for a terminal: both inputs, how each split was compared, the table of slices
 * (the overall one first) and a legend; no line is wider than `width`.
 * @example
 * process.stdout.write(renderCompareText(comparison, { color: false, width: 100 }));
 */
function renderCompareText(c: Comparison, options: { readonly color: boolean; readonly width?: number }): string {
  const width = Math.max(40, Math.floor(options.width ?? 100));
  const color = options.color;
  const blank: Line = { plain: '', styled: '' };
  const regressed = c.slices.filter((s) => s.change.dev_error?.verdict === 'regressed').length;
  const improved = c.slices.filter((s) => s.change.dev_error?.verdict === 'improved').length;
  const method = FDR_METHOD_NAME[c.fdr_method] ?? c.fdr_method;
  const splits = SPLITS.filter((s) => c.pairing[s].method !== 'absent').map((s) => {
    const p = c.pairing[s];
    return p.method === 'paired' ? `${s} paired (${count(p.pairs)} pairs)` : `${s} unpaired`;
  });
  const lines: Line[] = [
    line(truncate(`floorgap compare · ${count(c.slices.length)} slices · ${improved} improved · ${regressed} regressed`, width), ['bold'], color),
    ...keyedLines('before', c.before.inputs.map((i) => sanitize(i.path)), width, color),
    ...keyedLines('after', c.after.inputs.map((i) => sanitize(i.path)), width, color),
    ...(c.before.run !== null || c.after.run !== null ? keyedLines('runs', [sanitize(c.before.run ?? NULL_MARK), sanitize(c.after.run ?? NULL_MARK)], width, color) : []),
    ...keyedLines('grouping', [c.by ? `--by ${sanitize(c.by.join(','))}` : 'overview: every one-column slice'], width, color),
    ...keyedLines('splits', splits, width, color),
    ...keyedLines(
      'tests',
      [`intervals ${levelPercent(c.confidence)}`, `false discovery rate ${levelPercent(c.fdr)} (${method}) over every slice and measure`, ...(c.margin !== null ? [`margin ±${points(c.margin)} points`] : [])],
      width,
      color,
    ),
  ];
  if (c.warnings.length > 0) lines.push(blank, ...c.warnings.flatMap((w) => wrap(`note: ${sanitize(w)}`, width).map((t) => line(t, ['yellow'], color))));
  lines.push(blank);
  const table = slicesTable([c.overall, ...c.slices], width, color);
  lines.push(...table.lines, blank);
  const legend = [
    'changes in points of error, after - before (-2.0 = 2 points less error)',
    'Δdev = dev error; Δbias = train error (the floor is the same on both sides); Δvar = train_dev - train (dev - train without train_dev); Δmism = dev - train_dev',
    'a verdict needs q at most the false discovery rate and an interval that excludes 0; [lo, hi] = the interval when there is no clear change',
    table.dropped.length > 0 ? `hidden to fit ${width} columns: ${table.dropped.join(', ')}` : '',
  ].filter(Boolean);
  lines.push(...wrap(legend.join('; '), width).map((t) => line(t, ['dim'], color)));
  return `${lines.map((l) => l.styled).join('\n')}\n`;
}

/**
 * Renders the comparison in one of its formats.
 * @example
 * process.stdout.write(renderComparison(comparison, 'json', { color: false }));
 */
export function renderComparison(c: Comparison, format: CompareFormat, options: { readonly color: boolean; readonly width?: number }): string {
  switch (format) {
    case 'text':
      return renderCompareText(c, options);
    case 'json':
      return renderJson(c);
    default:
      throw error(`unknown output format "${String(format)}"`);
  }
}
