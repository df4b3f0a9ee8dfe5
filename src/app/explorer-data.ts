/**
 * The explorer's data side: the loaded cells stay in memory (and the engine stays open on the rows),
 * so regrouping, drilling down, examples and export never re-read what they do not need. A read that
 * fails later (the file changed or went away) is a FloorgapError naming the file, as when loading.
 */
import type { Analysis } from './analysis.js';
import type { Duck } from '../sql/duck.js';
import { topErrors } from '../rows/examples.js';
import type { Exporter, ExplorerData } from '../tui/data.js';
import { scanGrouping } from '../cells/load.js';
import { groupingCovers } from '../cells/grouping.js';
import { cellsWithin, mergeCells, type CellTable } from '../cells/cell-table.js';
import { buildReport } from '../triage/report.js';
import { withReadErrors } from '../read/read-errors.js';
import { error } from '../core/errors.js';
import { discoverAsync } from '../discover/search.js';
import { DISCOVER_DEFAULTS, type DiscoveredSlice } from '../discover/types.js';
import { signedPoints } from '../render/format.js';

export type { Exporter, ExplorerData };

/** A discovered slice's gap of its part. */
function partGap(s: DiscoveredSlice) {
  return s.part === 'bias' ? s.gaps.avoidable_bias : s.part === 'variance' ? s.gaps.variance : s.gaps.mismatch;
}

/**
 * Why a discovered slice's rows were exported: its part's gap and its lift over the rest of its weakest
 * parent, in points.
 * @example
 * foundReason(s); // => 'bias +12.3 pts, lift +10.1 over the rest of station=S2' ('… over all other rows' for one condition)
 */
export function foundReason(s: DiscoveredSlice): string {
  const over = Object.entries(s.lift.over).map(([k, v]) => `${k}=${v}`);
  const where = over.length > 0 ? `the rest of ${over.join(' · ')}` : 'all other rows';
  return `${s.part} ${signedPoints(partGap(s)?.value)} pts, lift ${signedPoints(s.lift.value)} over ${where}`;
}

/**
 * Wraps an analysis for the explorer. `duck` stays open on the rows until `close`.
 * @example
 * const data = explorerData(duck, analysis, exporter);
 * (await data.regroup(['station', 'lighting'])).slices.length; // => 24
 */
export function explorerData(duck: Duck | null, analysis: Analysis, exporter: Exporter | null): ExplorerData {
  const { loaded, context, options } = analysis;
  let cells: CellTable = loaded.table;
  const scanned = new Set<string>();

  /** The cells, with those of the grouping `by` scanned in when the grouping sets do not hold it. */
  async function cellsCovering(by: readonly string[]): Promise<CellTable> {
    const id = [...by].sort().join('\u0000');
    if (groupingCovers(loaded.grouping, by) || scanned.has(id)) return cells;
    if (!duck) throw error('this grouping needs the rows, and only cells were loaded');
    const open = duck;
    cells = mergeCells(cells, await withReadErrors(loaded.source.inputs, loaded.source.where, () => scanGrouping(open, loaded.plan, by)));
    scanned.add(id);
    return cells;
  }

  const run = analysis.report.run;
  return {
    report: analysis.report,
    columns: loaded.columns.map((c) => c.name),
    async regroup(by) {
      const use = await cellsCovering(by);
      return buildReport(use, by.length > 0 ? by : null, loaded.overviewColumns, context, options);
    },
    async drill(slice, column) {
      const keyCols = Object.keys(slice.key);
      if (keyCols.includes(column)) return [];
      const by = [...keyCols, column];
      // the cells of the slice, by the slice's columns and the breakdown column; their report by that column
      const within = cellsWithin(await cellsCovering(by), slice.key, by);
      return buildReport(within, [column], [], context, options).slices;
    },
    async examples(slice) {
      if (!duck) return 'examples need the rows (the input is ready-made cells)';
      if (!loaded.roles.score) return 'no score column: name it with --score to see the most confident errors';
      const runFilter = run !== null && loaded.roles.run ? { column: loaded.roles.run, value: run } : null;
      const open = duck;
      return withReadErrors(loaded.source.inputs, loaded.source.where, () => topErrors(open, loaded.plan, slice.key, 6, runFilter));
    },
    async exportSlices(slices, path, force) {
      if (!exporter) return 'export needs the rows (the input is ready-made cells)';
      return exporter(slices, path, force);
    },
    discover(onProgress, signal) {
      // the loaded cells, as `floorgap discover` searches them (never those a regroup scanned in)
      return discoverAsync(loaded.table, loaded.overviewColumns, context, options, DISCOVER_DEFAULTS, { onProgress, signal });
    },
    async exportFound(slices, path, force) {
      if (!exporter) return 'export needs the rows (the input is ready-made cells)';
      return exporter(
        slices.map((s) => ({ ...s, focus: s.part })),
        path,
        force,
        slices.map(foundReason),
      );
    },
  };
}
