// The bench runs under tsx, which compiled this file's JSX for the classic runtime ("React is not
// defined") without the pragma that follows; src/ is compiled by tsc.
/** @jsxRuntime automatic @jsxImportSource react */
/**
 * One explorer frame without a terminal, for the benchmark: the cost of a keypress (the reducer's
 * step) and of drawing the table view that follows it, at a given size.
 */
import { Box, renderToString } from 'ink';
import { sanitize } from '../src/terminal/sanitize.js';
import type { Report } from '../src/triage/types.js';
import { Line } from '../src/tui/components/Line.js';
import { SliceTable } from '../src/tui/components/SliceTable.js';
import { headerLines } from '../src/tui/header.js';
import { barScale, clampCursor, tableColumns, windowStart } from '../src/tui/model.js';
import { initialState, reduce, shownSlices, type ExplorerState } from '../src/tui/state.js';

/**
 * Applies one key to the explorer's state and renders the table view that results.
 * @param key the key, e.g. 's' (next sort column) or 'h' (headroom)
 * @returns the frame as text and the state after the key
 * @example
 * renderFrameForBench(report, 80, 24).frame.split('\n').length; // => 23
 */
export function renderFrameForBench(report: Report, width: number, height: number, key = 'h', from?: ExplorerState): { frame: string; state: ExplorerState } {
  const before = from ?? reduce(initialState, { type: 'loaded', report, columns: [] });
  const state = reduce(before, { type: 'key', input: key, key: {}, defaultExportPath: 'x.csv', fileExists: () => false });
  const shown = shownSlices(state);
  const rows = Math.max(8, height - 1);
  const body = Math.max(1, rows - 6);
  const cursor = clampCursor(state.cursor, shown.length);
  const frame = renderToString(
    <Box flexDirection="column" width={width} height={rows}>
      {headerLines(report, width).map((l, i) => (
        <Line key={i} spans={l} color={false} />
      ))}
      <SliceTable
        slices={shown}
        columns={tableColumns(width, { intervals: state.intervals, mismatch: Boolean(report.overall.gaps.mismatch) })}
        cursor={cursor}
        start={windowStart(shown.length, cursor, body, 0)}
        height={body}
        marked={state.marked}
        grouped={report.by !== null}
        groupHeader={report.by ? sanitize(report.by.join(' · ')) : 'slice'}
        intervals={state.intervals}
        scale={barScale(shown)}
        color={false}
        ascii={false}
      />
    </Box>,
    { columns: width },
  );
  return { frame, state };
}
