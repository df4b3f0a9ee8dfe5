import { count, NULL_MARK, points, signedPoints } from '../render/format.js';
import { sanitize } from '../terminal/sanitize.js';
import { truncate } from '../terminal/width.js';
import type { Report } from '../triage/types.js';
import type { Span } from './theme.js';

/**
 * The explorer's three header lines: inputs and rows per split; grouping and counts; the overall
 * floor, errors and decomposition.
 */
export function headerLines(report: Report, width: number): Span[][] {
  const o = report.overall;
  const names = report.source.inputs.map((i) => sanitize(i.path.split(/[\\/]/).pop() ?? i.path)).join(', ');
  const splits = (['train', 'train_dev', 'dev', 'test'] as const)
    .filter((s) => o.rows[s] !== null)
    .map((s) => `${s} ${count(o.rows[s])}`)
    .join(' · ');
  const run = report.run !== null ? ` · run ${sanitize(report.run)}` : '';
  const flagged = report.slices.filter((s) => s.flagged).length;
  const grouping = report.by ? `by ${report.by.map((b) => sanitize(b)).join(' × ')}` : 'overview (one-column slices)';
  const errors = (['train', 'train_dev', 'dev', 'test'] as const)
    .filter((s) => o.error[s])
    .map((s) => `${s} ${points(o.error[s]?.value)}`)
    .join(' · ');
  const gaps = [
    `bias ${signedPoints(o.gaps.avoidable_bias?.value)}`,
    `var ${signedPoints(o.gaps.variance?.value)}`,
    ...(o.gaps.mismatch ? [`mism ${signedPoints(o.gaps.mismatch.value)}`] : []),
    ...(o.gaps.dev_overfit ? [`overfit ${signedPoints(o.gaps.dev_overfit.value)}`] : []),
  ].join(' · ');
  return [
    [{ text: 'floorgap ', bold: true }, { text: truncate(`${names} · ${splits}${run}`, Math.max(10, width - 9)) }],
    [{ text: truncate(`grouping ${grouping} · ${count(report.slices.length)} slices · ${count(flagged)} flagged · floor from ${o.floor.source}`, width) }],
    [{ text: truncate(`overall  floor ${points(o.floor.value)} · ${errors || NULL_MARK}  │  ${gaps}`, width), dim: true }],
  ];
}
