import { Box } from 'ink';
import type { SliceReport } from '../../triage/types.js';
import { BAR_GLYPHS, cellText, displayLabel, fit, gapBar, type TableColumn } from '../model.js';
import { BAR_COLOR, FOCUS_COLOR, type Span } from '../theme.js';
import { Line } from './Line.js';

/** Props of {@link SliceTable}. */
export interface SliceTableProps {
  /** the slices in display order (sorted and filtered) */
  readonly slices: readonly SliceReport[];
  readonly columns: readonly TableColumn[];
  /** index of the selected slice in `slices` */
  readonly cursor: number;
  /** index of the first visible row */
  readonly start: number;
  /** body rows available */
  readonly height: number;
  /** labels of marked slices */
  readonly marked: ReadonlySet<string>;
  /** show only values in the label column (a `--by` grouping) */
  readonly grouped: boolean;
  readonly groupHeader: string;
  readonly intervals: boolean;
  /** the gap bars' full width in points of error */
  readonly scale: number;
  readonly color: boolean;
  readonly ascii: boolean;
}

/** The header line of the slice table. */
function headerSpans(columns: readonly TableColumn[], groupHeader: string): Span[] {
  return [{ text: columns.map((c) => fit(c.id === 'label' ? groupHeader : c.header, c)).join(' '), bold: true }];
}

/** One slice as a table row: text cells, the focus coloured, the gap bar in glyphs. */
function rowSpans(s: SliceReport, p: Omit<SliceTableProps, 'slices' | 'cursor' | 'start' | 'height'>): Span[] {
  const spans: Span[] = [];
  const dim = s.focus === 'thin';
  p.columns.forEach((c, i) => {
    const sep = i === 0 ? '' : ' ';
    if (c.id === 'bar') {
      const glyphs = BAR_GLYPHS[p.ascii ? 'ascii' : 'unicode'];
      let used = 0;
      spans.push({ text: sep });
      for (const part of gapBar(s, p.scale, c.width)) {
        spans.push({ text: glyphs[part.part].repeat(part.cells), color: BAR_COLOR[part.part], dim });
        used += part.cells;
      }
      spans.push({ text: ' '.repeat(Math.max(0, c.width - used)) });
      return;
    }
    const text = fit(cellText(s, c.id, { intervals: p.intervals, marked: p.marked.has(s.label), label: displayLabel(s, p.grouped) }), c);
    const color = c.id === 'focus' ? FOCUS_COLOR[s.focus] : undefined;
    spans.push({ text: sep + text, color, dim, bold: c.id === 'mark' && s.flagged });
  });
  return p.color ? mergeSpans(spans) : [{ text: spans.map((x) => x.text).join('') }];
}

/** Joins neighbouring spans of the same style, so a row is a handful of text nodes, not one per cell. */
function mergeSpans(spans: readonly Span[]): Span[] {
  const out: Span[] = [];
  for (const s of spans) {
    const last = out[out.length - 1];
    const plain = (x: Span) => !x.color && !x.bold && !x.dim && !x.inverse;
    if (last && ((plain(last) && plain(s)) || (last.color === s.color && last.bold === s.bold && last.dim === s.dim && last.inverse === s.inverse))) {
      out[out.length - 1] = { ...last, text: last.text + s.text };
    } else out.push(s);
  }
  return out;
}

/**
 * The slice table: a header and only the rows that fit (a window around the cursor), so a report of
 * thousands of slices draws as fast as one of twenty. Thin slices are dimmed; the selected row is
 * shown reversed (inverse colours).
 */
export function SliceTable(props: SliceTableProps) {
  const rows = props.slices.slice(props.start, props.start + props.height);
  return (
    <Box flexDirection="column">
      <Line spans={headerSpans(props.columns, props.groupHeader)} color={props.color} />
      {rows.map((s, i) => (
        // keyed by screen position: a re-sort updates the rows in place instead of remounting them
        <Line key={i} spans={rowSpans(s, props)} color={props.color} selected={props.start + i === props.cursor} />
      ))}
    </Box>
  );
}
