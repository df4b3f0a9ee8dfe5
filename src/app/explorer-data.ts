/**
 * The explorer's data side: the loaded cells stay in memory (and the engine stays open on the rows),
 * so regrouping, drilling down, examples and export never re-read what they do not need. A read that
 * fails later (the file changed or went away) is a FloorgapError naming the file, as when loading.
 */
import type { Analysis } from './analysis.js';
import type { Duck } from '../sql/duck.js';
import { topErrors } from '../rows/examples.js';
import type { Exporter, ExplorerData } from '../tui/data.js';
import { groupingCovers, scanGrouping } from '../cells/load.js';
import { cellsFor } from '../slices/rollup.js';
import type { Cell } from '../core/cell.js';
import { buildReport } from '../triage/report.js';
import { withReadErrors } from '../read/read-errors.js';
import { error } from '../core/errors.js';

export type { Exporter, ExplorerData };

function matches(cell: Cell, key: Readonly<Record<string, string>>): boolean {
  for (const [k, v] of Object.entries(key)) if (cell.key[k] !== v) return false;
  return true;
}

/**
 * Wraps an analysis for the explorer. `duck` stays open on the rows until `close`.
 * @example
 * const data = explorerData(duck, analysis, exporter);
 * (await data.regroup(['station', 'lighting'])).slices.length; // => 24
 */
export function explorerData(duck: Duck | null, analysis: Analysis, exporter: Exporter | null): ExplorerData {
  const { loaded, context, options } = analysis;
  let cells: Cell[] = [...loaded.cells];
  const scanned = new Set<string>();

  async function cellsCovering(by: readonly string[]): Promise<readonly Cell[]> {
    const id = [...by].sort().join('\u0000');
    if (groupingCovers(loaded.grouping, by) || scanned.has(id)) return cells;
    if (!duck) throw error('this grouping needs the rows, and only cells were loaded');
    const open = duck;
    cells = [...cells, ...(await withReadErrors(loaded.source.inputs, loaded.source.where, () => scanGrouping(open, loaded.plan, by)))];
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
      const use = cellsFor(await cellsCovering(by), by).filter((c) => matches(c, slice.key));
      return buildReport(use, [column], [], context, options).slices;
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
  };
}
