import { sanitize } from '../../terminal/sanitize.js';
import { truncate } from '../../terminal/width.js';
import { Line } from '../components/Line.js';
import { windowStart } from '../model.js';
import { lineOf } from '../theme.js';

/** Props of {@link GroupPicker}. */
export interface GroupPickerProps {
  /** the columns offered (data text: sanitised here) */
  readonly columns: readonly string[];
  readonly cursor: number;
  readonly picked: ReadonlySet<string>;
  /** lines available (two or more): the title, and under it as many rows as fit */
  readonly height: number;
  readonly width: number;
  readonly color: boolean;
}

/**
 * The grouping picker: a title with its keys, then a checkbox per column, the window of rows kept
 * around the cursor, which is shown reversed.
 * @example
 * <GroupPicker columns={['station', 'lighting']} cursor={0} picked={new Set(['station'])} … /> // => '…' / '  [x] station' / '  [ ] lighting'
 */
export function GroupPicker({ columns, cursor, picked, height, width, color }: GroupPickerProps) {
  const rows = Math.max(1, height - 1);
  const top = windowStart(columns.length, cursor, rows, 0);
  const shown = columns.slice(top, top + rows);
  return (
    <>
      <Line spans={lineOf('group by (space toggles, Enter applies, Esc cancels; none = overview)', { bold: true })} color={color} />
      {shown.map((c, i) => (
        <Line key={i} spans={lineOf(truncate(`  [${picked.has(c) ? 'x' : ' '}] ${sanitize(c)}`, width))} color={color} selected={top + i === cursor} />
      ))}
    </>
  );
}
