/**
 * The report as GitHub-flavoured markdown: a heading, an overall summary, warnings, and one table row
 * per slice. Every data string is sanitized (no live controls) and then escaped so it can neither break
 * the table nor turn into markup.
 */
import type { Split } from '../core/split.js';
import type { Gap, Report, SliceReport } from '../triage/types.js';
import { count, levelPercent, NULL_MARK, percent, points, pointsInterval, signedPoints } from './format.js';
import { sanitize } from '../terminal/sanitize.js';
import { FDR_METHOD_NAME, FLOOR_SOURCE_NAME } from './words.js';

/** Characters that are markup anywhere in a line or inside a table cell. */
const INLINE_SPECIAL = /[\\`*_[\]<>|~&]/g;

/**
 * Makes a data string inert in markdown, inside a table cell or running text: sanitizes it (controls,
 * newlines and bidi characters become visible escapes) and backslash-escapes `\`, `` ` ``, `*`, `_`,
 * `[`, `]`, `<`, `>`, `|`, `~` and `&`, plus a leading `#`, `+`, `-`, `=` or `!` that could start a block.
 * @param text any string from data
 * @returns text that renders as itself
 * @example
 * escapeMarkdown('a|b_c'); // => 'a\\|b\\_c'
 */
export function escapeMarkdown(text: string): string {
  const escaped = sanitize(text).replace(INLINE_SPECIAL, (ch) => `\\${ch}`);
  return escaped.replace(/^(\s*)([#+\-=!])/, '$1\\$2');
}

const SPLITS: readonly Split[] = ['train', 'train_dev', 'dev', 'test'];

/** An interval in points without square brackets (they could read as a link). */
function mdInterval(lo: number | null | undefined, hi: number | null | undefined, signed = false): string {
  const f = signed ? signedPoints : points;
  const text = pointsInterval(lo, hi, signed);
  return text === NULL_MARK ? '' : ` (${f(lo)} to ${f(hi)})`;
}

function gapText(name: string, gap: Gap | null): string | null {
  if (gap === null) return null;
  return `${name} ${signedPoints(gap.value)}${mdInterval(gap.lo, gap.hi, true)}`;
}

function summary(report: Report): string[] {
  const o = report.overall;
  const flagged = report.slices.filter((s) => s.flagged).length;
  const grouping =
    report.by === null
      ? ' (overview: one-column slices)'
      : report.by.length === 0
        ? ', no grouping'
        : ` by ${report.by.map((c) => escapeMarkdown(c)).join(', ')}`;
  const inputs = report.source.inputs.map((i) => escapeMarkdown(i.path) + (i.split ? ` (${i.split})` : ''));
  const errors = SPLITS.filter((s) => o.error[s] !== null).map(
    (s) => `${s} ${points(o.error[s]?.value)}${mdInterval(o.error[s]?.lo, o.error[s]?.hi)} on ${count(o.rows[s])} rows`,
  );
  const gaps = [
    gapText('avoidable bias', o.gaps.avoidable_bias),
    gapText('variance', o.gaps.variance),
    gapText('mismatch', o.gaps.mismatch),
    gapText('dev overfit', o.gaps.dev_overfit),
  ].filter((g): g is string => g !== null);
  const n = report.slices.length;
  const floorSource = FLOOR_SOURCE_NAME[o.floor.source] ?? escapeMarkdown(String(o.floor.source));
  const lines = [
    `${count(n)} slice${n === 1 ? '' : 's'}${grouping}; **${count(flagged)} flagged**. ` +
      `Input: ${inputs.length > 0 ? inputs.join(', ') : NULL_MARK}.`,
    '',
    `**Overall** (error in percentage points, ${levelPercent(report.confidence)} intervals): ` +
      `floor ${points(o.floor.value)}${mdInterval(o.floor.lo, o.floor.hi)} from ${floorSource}; ` +
      `${errors.join('; ')}.`,
  ];
  if (gaps.length > 0) lines.push(`Gaps: ${gaps.join('; ')}. Overall focus: ${o.focus}.`);
  return lines;
}

interface MdColumn {
  readonly header: string;
  readonly align: 'left' | 'right' | 'center';
  readonly cell: (s: SliceReport) => string;
}

function columns(report: Report): MdColumn[] {
  const rows = [report.overall, ...report.slices];
  const any = (f: (s: SliceReport) => unknown): boolean => rows.some((s) => f(s) !== null && f(s) !== undefined);
  const list: (MdColumn | null)[] = [
    { header: 'rank', align: 'right', cell: (s) => (s === report.overall ? '' : String(s.rank)) },
    { header: 'flagged', align: 'center', cell: (s) => (s.flagged ? 'yes' : '') },
    { header: 'slice', align: 'left', cell: (s) => (s === report.overall ? '**overall**' : escapeMarkdown(s.label)) },
    { header: 'dev rows', align: 'right', cell: (s) => count(s.rows.dev) },
    { header: 'share', align: 'right', cell: (s) => percent(s.share) },
    { header: 'floor', align: 'right', cell: (s) => points(s.floor.value) },
    { header: 'train', align: 'right', cell: (s) => points(s.error.train?.value) },
    any((s) => s.error.train_dev)
      ? { header: 'train_dev', align: 'right', cell: (s) => points(s.error.train_dev?.value) }
      : null,
    { header: 'dev', align: 'right', cell: (s) => points(s.error.dev?.value) },
    any((s) => s.error.test) ? { header: 'test', align: 'right', cell: (s) => points(s.error.test?.value) } : null,
    { header: 'bias', align: 'right', cell: (s) => signedPoints(s.gaps.avoidable_bias?.value) },
    { header: 'variance', align: 'right', cell: (s) => signedPoints(s.gaps.variance?.value) },
    any((s) => s.gaps.mismatch)
      ? { header: 'mismatch', align: 'right', cell: (s) => signedPoints(s.gaps.mismatch?.value) }
      : null,
    any((s) => s.gaps.dev_overfit)
      ? { header: 'dev overfit', align: 'right', cell: (s) => signedPoints(s.gaps.dev_overfit?.value) }
      : null,
    { header: 'headroom', align: 'right', cell: (s) => points(s.headroom?.total, 2) },
    { header: 'yield', align: 'right', cell: (s) => points(s.yield, 2) },
    { header: 'focus', align: 'left', cell: (s) => escapeMarkdown(s.focus) },
  ];
  return list.filter((c): c is MdColumn => c !== null);
}

const RULE: Readonly<Record<MdColumn['align'], string>> = { left: ':---', right: '---:', center: ':---:' };

function table(report: Report): string[] {
  const cols = columns(report);
  const ranked = [...report.slices].sort((a, b) => a.rank - b.rank || a.label.localeCompare(b.label));
  const row = (cells: readonly string[]): string => `| ${cells.join(' | ')} |`;
  return [
    row(cols.map((c) => c.header)),
    row(cols.map((c) => RULE[c.align])),
    ...[report.overall, ...ranked].map((s) => row(cols.map((c) => c.cell(s)))),
  ];
}

/**
 * Renders the slice report as GitHub-flavoured markdown.
 * @param report the slice report (`floorgap.report/1`)
 * @returns markdown text, ending with a newline
 * @example
 * await writeFile('report.md', renderMarkdown(report));
 */
export function renderMarkdown(report: Report): string {
  const lines = ['# floorgap slice report', '', ...summary(report), ''];
  if (report.warnings.length > 0) {
    lines.push('Warnings:', '', ...report.warnings.map((w) => `- ${escapeMarkdown(w)}`), '');
  }
  lines.push(...table(report), '');
  const fdrMethod = FDR_METHOD_NAME[report.fdr_method] ?? escapeMarkdown(String(report.fdr_method));
  lines.push(
    `Error, gaps and floor in percentage points (7.0 = 7% error). ` +
      `Bias = train − floor; variance = train_dev − train (dev − train without train_dev); ` +
      `mismatch = dev − train_dev; ` +
      `dev overfit = test − dev. Headroom: points of overall dev error regained if the slice reached its floor; ` +
      `yield: headroom points per 1,000 new labelled rows per unit of labelling cost. ` +
      `Flagged: significant after false-discovery control (${levelPercent(report.fdr)}, ${fdrMethod}) ` +
      `and worth acting on. ${NULL_MARK} = not available.`,
  );
  return `${lines.join('\n')}\n`;
}
