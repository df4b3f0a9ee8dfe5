import { useEffect, useMemo } from 'react';
import type { DiscoveredSlice } from '../../discover/types.js';
import type { Report, SliceReport } from '../../triage/types.js';
import { Line } from '../components/Line.js';
import { detailLines, type DetailExtras } from '../detail.js';
import { foundDetailLines } from '../found.js';

/** Props of {@link DetailPane}. */
export interface DetailPaneProps {
  readonly slice: SliceReport;
  readonly report: Report;
  /** the breakdown and examples as far as they are loaded (src/tui/hooks/use-detail-data.ts) */
  readonly extras: DetailExtras;
  readonly width: number;
  /** lines available */
  readonly height: number;
  /** the reducer's scroll; more than the pane can scroll shows its end */
  readonly scroll: number;
  /** told how far the pane can scroll whenever that changes, so ↑ works at once after a long ↓ */
  readonly onScrollLimit: (max: number) => void;
  readonly color: boolean;
  /** a discovered slice (the same as `slice`) and every listed one's rank by label: its part, lift, parents and overlaps under its title */
  readonly found?: { readonly slice: DiscoveredSlice; readonly ranks: ReadonlyMap<string, number> } | null;
}

/**
 * The detail pane of one slice (src/tui/detail.ts says what it holds), scrolled to `scroll`.
 * @example
 * <DetailPane slice={s5} report={report} extras={{ drillColumn: 'shift', drill: 'loading', examples: 'loading' }} … /> // => 'station=S5  focus bias  * flagged  rank 1' / …
 */
export function DetailPane({ slice, report, extras, width, height, scroll, onScrollLimit, color, found }: DetailPaneProps) {
  const room = Math.max(1, height);
  const lines = useMemo(() => {
    const all = detailLines(slice, report, extras, width);
    return found ? [all[0], ...foundDetailLines(found.slice, report, found.ranks, width), ...all.slice(1)] : all;
  }, [slice, report, extras, width, found]);
  const max = Math.max(0, lines.length - room);
  useEffect(() => {
    onScrollLimit(max);
  }, [lines, max, onScrollLimit]);
  const from = Math.min(scroll, max);
  return (
    <>
      {lines.slice(from, from + room).map((l, i) => (
        <Line key={i} spans={l} color={color} />
      ))}
    </>
  );
}
