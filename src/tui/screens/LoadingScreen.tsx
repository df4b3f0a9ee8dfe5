import { sanitize } from '../../terminal/sanitize.js';
import { truncate } from '../../terminal/width.js';
import { Frame } from '../components/Frame.js';
import type { LoadProgress } from '../hooks/use-explorer-data.js';
import { lineOf } from '../theme.js';

/** Props of {@link LoadingScreen}. */
export interface LoadingScreenProps {
  /** what is being loaded (data text: sanitised here) */
  readonly title: string;
  readonly progress: LoadProgress | null;
  /** milliseconds since loading started */
  readonly elapsed: number;
  readonly width: number;
  readonly height: number;
  readonly color: boolean;
  readonly ascii: boolean;
}

function progressBar(percent: number, width: number, ascii: boolean): string {
  const filled = Math.round((Math.max(0, Math.min(100, percent)) / 100) * width);
  return ascii ? `[${'#'.repeat(filled)}${'-'.repeat(width - filled)}]` : `${'█'.repeat(filled)}${'░'.repeat(width - filled)}`;
}

/**
 * The first screen, until the data is loaded: the title, what is loading, and a bar of the progress
 * when the engine reports one, with the seconds elapsed.
 * @example
 * <LoadingScreen title="preds.csv" progress={null} elapsed={0} … /> // => 'floorgap' / 'loading preds.csv' / '  0.0 s'
 */
export function LoadingScreen({ title, progress, elapsed, width, height, color, ascii }: LoadingScreenProps) {
  const pct = progress?.percent;
  const known = pct !== null && pct !== undefined;
  const bar = known ? progressBar(pct, Math.min(40, width - 20), ascii) : '';
  const lines = [
    { spans: lineOf('floorgap', { bold: true }) },
    { spans: lineOf(truncate(`loading ${sanitize(title)}`, width)) },
    { spans: lineOf(`${bar}${known ? ` ${pct.toFixed(0)}%` : ''}  ${(elapsed / 1000).toFixed(1)} s`, { dim: true }) },
  ];
  return <Frame lines={lines} width={width} height={height} color={color} />;
}
