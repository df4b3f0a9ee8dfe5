import { Text } from 'ink';
import type { Span } from '../theme.js';

/** Props of {@link Line}. */
export interface LineProps {
  readonly spans: readonly Span[];
  /** colours and dimming only when true (NO_COLOR, --no-color); inverse (the cursor) always */
  readonly color: boolean;
  /** the whole line inverse (the selected row) */
  readonly selected?: boolean;
}

/** One screen line made of styled spans, never wrapped (the caller fits it to the width). */
export function Line({ spans, color, selected = false }: LineProps) {
  return (
    <Text wrap="truncate-end" inverse={selected}>
      {spans.some((s) => s.text !== '')
        ? spans.map((s, i) => (
            <Text key={i} color={color ? s.color : undefined} bold={s.bold} dimColor={color ? s.dim : undefined} inverse={s.inverse}>
              {s.text}
            </Text>
          ))
        : ' ' /* an empty Text takes no line at all; a blank line must still take one */}
    </Text>
  );
}
