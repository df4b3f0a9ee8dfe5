/**
 * Renders the explorer at a fixed terminal size with ink-testing-library and reads its frames.
 * The App takes its size from the `columns` / `rows` props, so frames do not depend on the terminal
 * that runs the tests.
 */
import { render } from 'ink-testing-library';
import { App, type AppProps } from '../../src/tui/App.js';
import { stripAnsi } from '../../src/terminal/ansi.js';
import type { ExplorerData } from '../../src/tui/data.js';
import { FAKE_EXPORT_PATH } from './explorer-fixture.js';

/** Keys as a terminal sends them (VT sequences, as ink's parser reads them). */
export const KEY = {
  enter: '\r',
  escape: '\u001b',
  backspace: '\u007f',
  up: '\u001b[A',
  down: '\u001b[B',
  right: '\u001b[C',
  left: '\u001b[D',
  pageUp: '\u001b[5~',
  pageDown: '\u001b[6~',
  home: '\u001b[H',
  end: '\u001b[F',
  ctrlC: '\u0003',
} as const;

/** Lets ink and React finish what a write started (input parsing, effects, resolved promises). */
export async function settle(ticks = 4): Promise<void> {
  for (let i = 0; i < ticks; i++) await new Promise((r) => setTimeout(r, 0));
}

/** What a test needs from one rendered explorer. */
export interface Explorer {
  /** the last frame, SGR sequences removed */
  frame(): string;
  /** the last frame as ink wrote it */
  rawFrame(): string;
  /** every frame ink wrote so far, as written */
  readonly frames: readonly string[];
  /** writes keys and waits for the frame that follows */
  press(...keys: string[]): Promise<void>;
  readonly exits: { code: number; error?: unknown }[];
  unmount(): void;
}

/** Props of {@link renderExplorer}; everything but `load` has a test default. */
export type ExplorerProps = Partial<AppProps> & { readonly data?: ExplorerData };

/**
 * Renders the App at a fixed size (default 80×24, no colour, Unicode glyphs).
 * @example
 * const x = renderExplorer({ data, columns: 60, rows: 20 }); await settle(); x.frame(); // => 'floorgap …'
 */
export function renderExplorer(props: ExplorerProps): Explorer {
  const exits: { code: number; error?: unknown }[] = [];
  const { data, ...rest } = props;
  const all: AppProps = {
    load: async () => {
      if (!data) throw new Error('renderExplorer: give `data` or `load`');
      return data;
    },
    title: 'runs/2024-06-03/preds.csv',
    color: false,
    ascii: false,
    columns: 80,
    rows: 24,
    defaultExportPath: () => FAKE_EXPORT_PATH,
    fileExists: () => false,
    ...rest,
    onExit: (code, error) => {
      exits.push({ code, error });
      rest.onExit?.(code, error);
    },
  };
  const r = render(<App {...all} />);
  return {
    frame: () => stripAnsi(r.lastFrame() ?? ''),
    rawFrame: () => r.lastFrame() ?? '',
    frames: r.frames,
    async press(...keys) {
      for (const k of keys) {
        r.stdin.write(k);
        await settle();
      }
    },
    exits,
    unmount: () => r.unmount(),
  };
}

/** The frame's lines. */
export function linesOf(frame: string): string[] {
  return frame.split('\n');
}
