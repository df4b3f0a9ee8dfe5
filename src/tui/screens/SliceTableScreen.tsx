import { Text } from 'ink';
import { useMemo } from 'react';
import { sanitize } from '../../terminal/sanitize.js';
import { truncate } from '../../terminal/width.js';
import type { SliceReport } from '../../triage/types.js';
import { SliceTable } from '../components/SliceTable.js';
import { barScale, tableColumns } from '../model.js';

/** Props of {@link SliceTableScreen}. */
export interface SliceTableScreenProps {
  /** the slices in display order (sorted and filtered) */
  readonly slices: readonly SliceReport[];
  /** the report's grouping (null = the overview) */
  readonly by: readonly string[] | null;
  /** the report has a mismatch gap (a train_dev split): the table shows its column */
  readonly mismatch: boolean;
  /** the filter text, to say why nothing is shown */
  readonly filter: string;
  readonly cursor: number;
  /** the first row on screen (src/tui/hooks/use-table-window.ts) */
  readonly start: number;
  /** table rows available (below the table's header line) */
  readonly height: number;
  readonly marked: ReadonlySet<string>;
  readonly intervals: boolean;
  readonly width: number;
  readonly color: boolean;
  readonly ascii: boolean;
}

/**
 * The main screen: the slice table with the columns that fit the width and gap bars scaled to the
 * slices shown, or a line saying there are no slices (or none that match the filter).
 * @example
 * <SliceTableScreen slices={[]} filter="zzz" … /> // => the table's header line, then '  no slice matches the filter (Esc clears it)'
 */
export function SliceTableScreen(p: SliceTableScreenProps) {
  const columns = useMemo(() => tableColumns(p.width, { intervals: p.intervals, mismatch: p.mismatch }), [p.width, p.intervals, p.mismatch]);
  const scale = useMemo(() => barScale(p.slices), [p.slices]);
  return (
    <>
      <SliceTable
        slices={p.slices}
        columns={columns}
        cursor={p.cursor}
        start={p.start}
        height={p.height}
        marked={p.marked}
        grouped={p.by !== null}
        groupHeader={p.by ? truncate(sanitize(p.by.join(' · ')), 40) : 'slice'}
        intervals={p.intervals}
        scale={scale}
        color={p.color}
        ascii={p.ascii}
      />
      {p.slices.length === 0 ? <Text>{p.filter ? '  no slice matches the filter (Esc clears it)' : '  no slices'}</Text> : null}
    </>
  );
}
