import { failureText } from '../../render/failure.js';
import { wrap } from '../../terminal/wrap.js';
import { Frame, type FrameLine } from '../components/Frame.js';
import { lineOf } from '../theme.js';

/** Props of {@link FailureScreen}. */
export interface FailureScreenProps {
  /** why loading failed */
  readonly error: unknown;
  readonly width: number;
  readonly height: number;
  readonly color: boolean;
}

/**
 * What shows when loading failed, until the explorer ends: the failure's message (src/render/failure.ts)
 * wrapped to the width, in red, under the title when both fit.
 * @example
 * <FailureScreen error={new FloorgapError('bad')} width={80} height={23} color={false} /> // => 'floorgap' / '' / 'floorgap: bad'
 */
export function FailureScreen({ error, width, height, color }: FailureScreenProps) {
  const message = wrap(failureText(error, false).trimEnd(), width, { long: 'break' });
  const lines: FrameLine[] = [];
  // the title and a blank line above the message, when they fit with it
  if (message.length + 2 <= height) lines.push({ spans: lineOf('floorgap', { bold: true }) }, { spans: lineOf('') });
  for (const l of message) lines.push({ spans: lineOf(l, { color: 'red' }) });
  return <Frame lines={lines} width={width} height={height} color={color} />;
}
