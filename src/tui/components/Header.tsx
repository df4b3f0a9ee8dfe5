import type { Discovery } from '../../discover/types.js';
import type { Report } from '../../triage/types.js';
import { foundHeaderLines } from '../found.js';
import { headerLines } from '../header.js';
import { Line } from './Line.js';

/** Props of {@link Header}. */
export interface HeaderProps {
  readonly report: Report;
  readonly width: number;
  readonly color: boolean;
  /** in the discovered view: the discovery (null while searching) and the search's progress */
  readonly found?: { readonly discovery: Discovery | null; readonly search: { readonly done: number; readonly total: number } | null } | null;
}

/**
 * The three header lines above every screen of a loaded report (src/tui/header.ts says what they
 * hold); in the discovered view the last two say what the search found, how to go back, and the
 * caution (src/tui/found.ts).
 */
export function Header({ report, width, color, found }: HeaderProps) {
  const lines = headerLines(report, width);
  const shown = found ? [lines[0], ...foundHeaderLines(found.discovery, found.search, width)] : lines;
  return (
    <>
      {shown.map((l, i) => (
        <Line key={i} spans={l} color={color} />
      ))}
    </>
  );
}
