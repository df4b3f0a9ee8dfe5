/**
 * The slice table's columns: what each shows, how slices are named, and which optional columns give way
 * so the table fits the terminal width.
 */
import type { Report, SliceReport } from '../../triage/types.js';
import { count, percent, points, signedPoints } from '../format.js';
import { sanitize } from '../../terminal/sanitize.js';
import { displayWidth } from '../../terminal/width.js';
import { naturalWidth, type Column } from './layout.js';

/** The flag mark of a flagged slice. */
export const FLAG_MARK = '*';

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

export function sliceColumns(report: Report, rows: readonly SliceReport[]): Column[] {
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

export interface Fit {
  readonly columns: Column[];
  readonly widths: number[];
  readonly gap: number;
  readonly dropped: string[];
}

/** Chooses separators, dropped columns and the label width so the table fits `width` columns. */
export function fitColumns(all: readonly Column[], width: number): Fit {
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
