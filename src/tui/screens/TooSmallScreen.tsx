import { Box } from 'ink';
import { truncate } from '../../terminal/width.js';
import { Line } from '../components/Line.js';
import { MIN_COLUMNS, MIN_ROWS } from '../model.js';
import { lineOf } from '../theme.js';

/** What a terminal too small to draw in shows (src/tui/model.ts, screenLayout). */
const TOO_SMALL = `floorgap: enlarge the window (at least ${MIN_ROWS} rows and ${MIN_COLUMNS} columns)`;

/** Props of {@link TooSmallScreen}. */
export interface TooSmallScreenProps {
  /** the terminal's columns */
  readonly columns: number;
  /** lines the frame may use (0 or 1 here) */
  readonly height: number;
  readonly color: boolean;
}

/** The one line a terminal too small for the explorer shows instead of it (nothing at 1 row). */
export function TooSmallScreen({ columns, height, color }: TooSmallScreenProps) {
  return (
    <Box flexDirection="column" width={Math.max(1, columns)} height={height}>
      {height > 0 ? <Line spans={lineOf(truncate(TOO_SMALL, columns))} color={color} /> : null}
    </Box>
  );
}
