import { Box } from 'ink';
import type { Span } from '../theme.js';
import { Line } from './Line.js';

/** One line of a {@link Frame}. */
export interface FrameLine {
  readonly spans: readonly Span[];
  /** the whole line inverse (the cursor) */
  readonly selected?: boolean;
}

/** Props of {@link Frame}. */
export interface FrameProps {
  readonly lines: readonly FrameLine[];
  readonly width: number;
  readonly height: number;
  readonly color: boolean;
}

/** A screen of plain lines (loading, a failed load), cut to the height. */
export function Frame({ lines, width, height, color }: FrameProps) {
  return (
    <Box flexDirection="column" width={width} height={height}>
      {lines.slice(0, height).map((l, i) => (
        <Line key={i} spans={l.spans} color={color} selected={l.selected} />
      ))}
    </Box>
  );
}
