import type { Report } from '../../triage/types.js';
import { headerLines } from '../header.js';
import { Line } from './Line.js';

/** Props of {@link Header}. */
export interface HeaderProps {
  readonly report: Report;
  readonly width: number;
  readonly color: boolean;
}

/** The three header lines above every screen of a loaded report (src/tui/header.ts says what they hold). */
export function Header({ report, width, color }: HeaderProps) {
  return (
    <>
      {headerLines(report, width).map((l, i) => (
        <Line key={i} spans={l} color={color} />
      ))}
    </>
  );
}
