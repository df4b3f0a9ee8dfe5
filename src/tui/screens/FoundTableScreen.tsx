import { Box } from 'ink';
import { useMemo } from 'react';
import type { DiscoveredSlice, Discovery } from '../../discover/types.js';
import { Line } from '../components/Line.js';
import { foundColumns, foundHeaderText, foundRowSpans, noSlicePassed, searchNote } from '../found.js';
import { lineOf } from '../theme.js';

/** Props of {@link FoundTableScreen}. */
export interface FoundTableScreenProps {
  /** the discovered slices in display order (sorted and filtered) */
  readonly slices: readonly DiscoveredSlice[];
  /** null until the search has ended */
  readonly discovery: Discovery | null;
  /** the search's progress while it runs */
  readonly search: { readonly done: number; readonly total: number } | null;
  readonly filter: string;
  readonly cursor: number;
  /** the first row on screen (src/tui/hooks/use-table-window.ts) */
  readonly start: number;
  /** table rows available (below the table's header line) */
  readonly height: number;
  readonly marked: ReadonlySet<string>;
  readonly width: number;
  readonly color: boolean;
}

/**
 * The discovered view's table: rank, conditions, part, headroom (lower end, point value), lift and the
 * optional columns that fit (src/tui/found.ts); or, under its header line, the search's progress, that
 * no slice passed (with what was examined), or that none matches the filter.
 * @example
 * <FoundTableScreen slices={[]} discovery={null} search={{ done: 12, total: 45 }} … /> // => the header line, then '  searching slices: column sets 12 of 45'
 */
export function FoundTableScreen(p: FoundTableScreenProps) {
  const columns = useMemo(() => foundColumns(p.width), [p.width]);
  const rows = p.slices.slice(p.start, p.start + p.height);
  let note: string | null = null;
  if (!p.discovery) note = p.search ? searchNote(p.search) : 'no search yet';
  else if (p.discovery.slices.length === 0) note = noSlicePassed(p.discovery);
  else if (p.slices.length === 0) note = 'no slice matches the filter (Esc clears it)';
  return (
    <Box flexDirection="column">
      <Line spans={lineOf(foundHeaderText(columns), { bold: true })} color={p.color} />
      {rows.map((s, i) => (
        <Line key={i} spans={foundRowSpans(s, columns, p.marked.has(s.label))} color={p.color} selected={p.start + i === p.cursor} />
      ))}
      {note !== null ? <Line spans={lineOf(`  ${note}`)} color={p.color} /> : null}
    </Box>
  );
}
