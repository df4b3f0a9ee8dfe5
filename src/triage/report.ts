import * as aq from 'arquero';
import { runsOf, type CellTable } from '../cells/cell-table.js';
import { rollupByRun, rollupSlices, type SliceStats } from '../slices/rollup.js';
import { fitBetaPrior, type BetaPrior } from '../stats/index.js';
import { annotatorFloor, ruleCounts } from './annotator-floor.js';
import { sliceCurve } from './curve.js';
import { triage, type SliceExtras } from './triage.js';
import type { InputInfo, Report, TriageOptions } from './types.js';

/** What the report needs besides the cells (all plain data). */
export interface ReportContext {
  readonly inputs: readonly InputInfo[];
  readonly roles: Readonly<Record<string, string | null>>;
  readonly annotators?: readonly string[];
  readonly where: string | null;
  readonly version: string;
  readonly warnings: readonly string[];
}

export const EMPTY: SliceStats = { key: {}, splits: {}, floorParts: [], devFloorParts: [], audit: null };

export function sliceId(key: Readonly<Record<string, string>>): string {
  return JSON.stringify(Object.entries(key));
}

/**
 * The run whose numbers are reported: the one named, else the run with the most training rows
 * (ties: the later name). Null when the cells carry no run.
 */
export function chooseRun(cells: CellTable, wanted: string | null): string | null {
  const runs = runsOf(cells);
  if (runs.length === 0) return null;
  if (wanted !== null) return runs.includes(wanted) ? wanted : null;
  const train = new Map<number, number>();
  const sums = cells.table
    .filter((d: { split: number; run: number }) => d.split === 0 && d.run >= 0)
    .groupby('run')
    .rollup({ rows: aq.op.sum('rows') })
    .objects() as { run: number; rows: number }[];
  for (const r of sums) train.set(r.run, r.rows);
  const rowsOf = (r: string) => train.get(cells.runs.indexOf(r)) ?? 0;
  return runs.reduce((best, r) => (rowsOf(r) >= rowsOf(best) ? r : best), runs[0]);
}

/**
 * What triage needs per slice beyond its sums: annotator floors with one empirical-Bayes prior per
 * grouping, fitted across that grouping's slices (the overall slice takes the first grouping's), and
 * the learning curve from `perRun` (slice id → the slice in every run) when there are runs.
 * @example
 * sliceExtras([{ by: ['station'], slices }], overall, DEFAULT_TRIAGE_OPTIONS, null)(slices[0]).annotatorFloor; // => null without an audit
 */
export function sliceExtras(
  groups: readonly { readonly by: readonly string[]; readonly slices: readonly SliceStats[] }[],
  overall: SliceStats,
  options: TriageOptions,
  perRun: ReadonlyMap<string, SliceStats[]> | null,
): (s: SliceStats) => SliceExtras {
  const priors = new Map<string, BetaPrior>();
  let overallPrior: BetaPrior | null = null;
  // without a usable audit (no labels, or no row with two labels for the panel rule) there is no
  // annotator floor at all: the slices keep the table or --floor
  const overallCounts = overall.audit ? ruleCounts(overall.audit, options.floorRule) : null;
  if (overallCounts) {
    for (const g of groups) {
      const data = g.slices.flatMap((s) => (s.audit ? [ruleCounts(s.audit, options.floorRule)] : [])).filter((x): x is { x: number; n: number } => x !== null);
      if (data.length === 0) continue;
      const prior = fitBetaPrior(data);
      overallPrior ??= prior;
      for (const s of g.slices) priors.set(sliceId(s.key), prior);
    }
    overallPrior ??= fitBetaPrior([overallCounts]);
  }
  return (s: SliceStats): SliceExtras => {
    const id = sliceId(s.key);
    const prior = Object.keys(s.key).length === 0 ? overallPrior : priors.get(id) ?? null;
    return {
      annotatorFloor: s.audit && prior ? annotatorFloor(s.audit, options.floorRule, prior, options.confidence) : null,
      curve: perRun ? sliceCurve(perRun.get(id) ?? [], options.curveExponent, options.confidence) : null,
    };
  };
}

/**
 * cells → slices → triage → the report. With `by` the slices are the cross of those columns; without
 * it, the overview: every one-column slice of every candidate column, ranked together. With several
 * runs, the numbers come from one run and each slice's learning curve from all of them. With annotator
 * audits, each grouping's slices share one empirical-Bayes prior for their floors.
 * @example
 * buildReport(cells, ['station'], [], ctx, DEFAULT_TRIAGE_OPTIONS).slices[0].label; // => 'station=S5'
 */
export function buildReport(
  cells: CellTable,
  by: readonly string[] | null,
  overviewColumns: readonly string[],
  context: ReportContext,
  options: TriageOptions,
): Report {
  const runs = runsOf(cells);
  const run = chooseRun(cells, options.run);
  const groupings: string[][] = by && by.length > 0 ? [[...by]] : overviewColumns.map((c) => [c]);
  const groups = groupings.map((g) => ({ by: g, slices: rollupSlices(cells, g, run) }));
  const overall = rollupSlices(cells, [], run)[0] ?? EMPTY;

  // learning curves: the same slices in every run
  const perRun = new Map<string, SliceStats[]>();
  if (runs.length > 1) {
    // one roll-up per grouping with the run in its key
    const byRun = [{ by: [] as string[] }, ...groups].map((g) => rollupByRun(cells, g.by));
    for (const r of runs) {
      for (const slices of byRun) {
        for (const s of slices.get(r) ?? []) {
          const id = sliceId(s.key);
          const list = perRun.get(id) ?? [];
          list.push(s);
          perRun.set(id, list);
        }
      }
    }
  }
  const extras = sliceExtras(groups, overall, options, runs.length > 1 ? perRun : null);
  const overallCounts = overall.audit ? ruleCounts(overall.audit, options.floorRule) : null;
  const result = triage(
    groups.flatMap((g) => g.slices),
    overall,
    { ...options, run },
    extras,
  );
  return {
    schema: 'floorgap.report/1',
    by: by && by.length > 0 ? [...by] : null,
    confidence: options.confidence,
    fdr: options.fdr,
    fdr_method: options.fdrMethod,
    source: { inputs: context.inputs, roles: context.roles, annotators: context.annotators ?? [], where: context.where, version: context.version },
    run,
    runs,
    overall: result.overall,
    slices: result.slices,
    warnings:
      overall.audit && overall.audit.audited > 0 && !overallCounts
        ? [...context.warnings, `the ${options.floorRule} rule needs rows with at least two annotator labels and there are none: floors fall back to the floor table or --floor`]
        : context.warnings,
  };
}
