// Must come first: chalk decides on colour when ink loads it (see the helper).
import { restoreColorEnv } from '../helpers/force-color.js';
import { render } from 'ink-testing-library';
import type { ReactElement } from 'react';
import { describe, expect, it } from 'vitest';
import { stripAnsi } from '../../src/terminal/ansi.js';
import { KeyHints, type KeyHintsProps } from '../../src/tui/components/KeyHints.js';
import { StatusBar, type StatusBarProps } from '../../src/tui/components/StatusBar.js';
import { DETAIL_HINT, DETAIL_HINT_ASCII } from '../../src/tui/keys.js';

restoreColorEnv();

// The explorer's status and key lines drawn alone. Counts and texts are invented for each case; the
// expected lines are spelled out by hand from the component's rules.

function drawn(node: ReactElement): { text: string; raw: string } {
  const r = render(node);
  const raw = r.lastFrame() ?? '';
  r.unmount();
  return { text: stripAnsi(raw).trimEnd(), raw };
}

const STATUS: StatusBarProps = {
  sortKey: 'rank',
  descending: true,
  filter: '',
  shown: 7,
  total: 7,
  marked: 0,
  intervals: false,
  position: 1,
  note: null,
  width: 80,
  ascii: false,
  color: true,
};

describe('StatusBar', () => {
  it('names the sort, the count, the marks and the place of the cursor', () => {
    // 7 slices, cursor on the first: invented counts
    expect(drawn(<StatusBar {...STATUS} />).text).toBe('sort report order ↓ · 7 slices · 0 marked · 1/7');
  });

  it('with a filter: its text (sanitised) and how many of the report it shows; ± on; the note after two spaces', () => {
    const line = drawn(<StatusBar {...STATUS} sortKey="headroom" descending={false} filter={'do\x1bme'} shown={3} marked={2} intervals position={null} note="wrote 2 slices" ascii />);
    // 3 of 7 shown, 2 marked: invented counts; ESC shows as \x1b (sanitize)
    expect(line.text).toBe('sort headroom ^ · filter "do\\x1bme" (3 of 7) · 2 marked · ± on  wrote 2 slices');
  });

  it('is dim without a note and plain with one (colour on)', () => {
    // SGR 2 is "faint" (ECMA-48), what ink writes for dimColor
    expect(drawn(<StatusBar {...STATUS} note="" />).raw).toContain('\x1b[2m');
    expect(drawn(<StatusBar {...STATUS} note="regrouping…" />).raw).not.toContain('\x1b[2m');
  });

  it('is cut to the width with an ellipsis', () => {
    // 'sort report order ↓ · 7 slices · 0 marked · 1/7' cut to 20 columns: 19 characters and '…'
    expect(drawn(<StatusBar {...STATUS} width={20} />).text).toBe('sort report order ↓…');
  });
});

const HINTS: KeyHintsProps = { mode: 'table', draft: '', width: 120, ascii: false, color: false };

describe('KeyHints', () => {
  it('shows the keys of the screen: the detail pane has its own, in Unicode or ASCII', () => {
    expect(drawn(<KeyHints {...HINTS} mode="detail" />).text).toBe(DETAIL_HINT);
    expect(drawn(<KeyHints {...HINTS} mode="detail" ascii />).text).toBe(DETAIL_HINT_ASCII);
    expect(drawn(<KeyHints {...HINTS} mode="help" />).text).toMatch(/^↑↓ move {2}⏎ detail /);
    expect(drawn(<KeyHints {...HINTS} mode="picker" ascii />).text).toMatch(/^arrows move {2}Enter detail /);
  });

  it('shows the open prompt instead, with the draft sanitised', () => {
    expect(drawn(<KeyHints {...HINTS} mode="filter" draft={'do\x1bme'} />).text).toBe('/do\\x1bme▏ (Enter keeps, Esc clears)');
    expect(drawn(<KeyHints {...HINTS} mode="export-path" draft="out.csv" />).text).toBe('export rows to: out.csv▏ (Enter writes, Esc cancels)');
    // the overwrite question names the path as it will be written: trimmed
    expect(drawn(<KeyHints {...HINTS} mode="export-confirm" draft="  out.csv " />).text).toBe('out.csv exists: overwrite it and its manifest? (y/n)');
  });

  it('is cut to the width with an ellipsis', () => {
    // '/dome▏ (Enter keeps, Esc clears)' cut to 12 columns: 11 characters and '…'
    expect(drawn(<KeyHints {...HINTS} mode="filter" draft="dome" width={12} />).text).toBe('/dome▏ (Ent…');
  });
});
