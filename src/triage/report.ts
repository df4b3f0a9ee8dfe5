import { rollupSlices, type SliceStats } from '../engine/slices.js';
import type { Cell } from '../engine/types.js';
import { triage } from './triage.js';
import type { InputInfo, Report, TriageOptions } from './types.js';

/** What the report needs besides the cells (all plain data). */
export interface ReportContext {
  readonly inputs: readonly InputInfo[];
  readonly roles: Readonly<Record<string, string | null>>;
  readonly where: string | null;
  readonly version: string;
  readonly warnings: readonly string[];
}

/**
 * cells → slices → triage → the report. With `by` the slices are the cross of those columns; without
 * it, the overview: every one-column slice of every candidate column, ranked together.
 * @example
 * buildReport(cells, ['station'], [], ctx, DEFAULT_TRIAGE_OPTIONS).slices[0].label; // => 'station=S5'
 */
export function buildReport(
  cells: readonly Cell[],
  by: readonly string[] | null,
  overviewColumns: readonly string[],
  context: ReportContext,
  options: TriageOptions,
): Report {
  const overall = rollupSlices(cells, [])[0] ?? ({ key: {}, splits: {}, floorParts: [], devFloorParts: [] } as SliceStats);
  const slices: SliceStats[] = by && by.length > 0 ? rollupSlices(cells, by) : overviewColumns.flatMap((c) => rollupSlices(cells, [c]));
  const result = triage(slices, overall, options);
  return {
    schema: 'floorgap.report/1',
    by: by && by.length > 0 ? [...by] : null,
    confidence: options.confidence,
    fdr: options.fdr,
    fdr_method: options.fdrMethod,
    source: { inputs: context.inputs, roles: context.roles, where: context.where, version: context.version },
    overall: result.overall,
    slices: result.slices,
    warnings: context.warnings,
  };
}
