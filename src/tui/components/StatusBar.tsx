import { sanitize } from '../../terminal/sanitize.js';
import { truncate } from '../../terminal/width.js';
import { FOUND_SORT_LABEL, SORT_LABEL, type SortKey } from '../model.js';
import { Line } from './Line.js';

/** Props of {@link StatusBar}. */
export interface StatusBarProps {
  readonly sortKey: SortKey;
  readonly descending: boolean;
  /** the filter text ('' = none) */
  readonly filter: string;
  /** slices shown (after the filter) and in the report */
  readonly shown: number;
  readonly total: number;
  readonly marked: number;
  readonly intervals: boolean;
  /** 1-based place of the selected slice among those shown; null when none is */
  readonly position: number | null;
  /** what is running, or the last message (data text: sanitised here); null or '' = none */
  readonly note: string | null;
  readonly width: number;
  readonly ascii: boolean;
  readonly color: boolean;
  /** the discovered view is shown: its sorts are named as its table's */
  readonly found?: boolean;
}

/**
 * The status line: sort, filter or count, marks, intervals, the cursor's place, and the running work or
 * last message after them (dim when there is none).
 * @example
 * <StatusBar sortKey="rank" descending filter="" shown={7} total={7} marked={0} intervals={false} position={1} note={null} … />
 * // => 'sort report order ↓ · 7 slices · 0 marked · 1/7'
 */
export function StatusBar(p: StatusBarProps) {
  const arrow = p.ascii ? (p.descending ? 'v' : '^') : p.descending ? '↓' : '↑';
  const parts = [
    `sort ${(p.found ? (FOUND_SORT_LABEL as Partial<Record<SortKey, string>>)[p.sortKey] : undefined) ?? SORT_LABEL[p.sortKey]} ${arrow}`,
    p.filter ? `filter "${truncate(sanitize(p.filter), 24)}" (${p.shown} of ${p.total})` : `${p.shown} slices`,
    `${p.marked} marked`,
  ];
  if (p.intervals) parts.push('± on');
  if (p.position !== null) parts.push(`${p.position}/${p.shown}`);
  const text = truncate(parts.join(' · ') + (p.note ? `  ${sanitize(p.note)}` : ''), p.width);
  return <Line spans={[{ text, dim: !p.note }]} color={p.color} />;
}
