/**
 * Runs the built `floorgap` binary in a pseudo-terminal with a headless terminal emulator attached,
 * so end-to-end tests see the screen a user would see: what is on each row, which buffer (main or
 * alternate screen) is active, whether the cursor is shown, and how the process ended.
 */
import xterm from '@xterm/headless';
import pty from 'node-pty';
import { CLI, ROOT } from './run-cli.js';

/** Named keys, as a terminal sends them (normal cursor-key mode). */
export const KEY = {
  enter: '\r',
  escape: '\x1b',
  space: ' ',
  backspace: '\x7f',
  tab: '\t',
  up: '\x1b[A',
  down: '\x1b[B',
  right: '\x1b[C',
  left: '\x1b[D',
  pageUp: '\x1b[5~',
  pageDown: '\x1b[6~',
  home: '\x1b[H',
  end: '\x1b[F',
  ctrlC: '\x03',
} as const;

export interface PtyExit {
  /** the exit code (node-pty reports 0 alongside a signal when the process was killed by one) */
  readonly exitCode: number;
  /** the signal number that ended the process, 0 or undefined when it exited by itself */
  readonly signal: number | undefined;
}

export interface PtyOptions {
  readonly cols?: number;
  readonly rows?: number;
  readonly cwd?: string;
  /** extra environment; `undefined` removes a variable */
  readonly env?: Record<string, string | undefined>;
}

export interface PtySession {
  /** every row of the active buffer's viewport, right-trimmed (always `rows` entries) */
  screen(): string[];
  /** rows of the viewport the terminal marks as continuations of the row above (auto-wrapped) */
  wrappedRows(): number[];
  /** waits until the screen matches; rejects with the screen's contents after `timeoutMs` */
  waitFor(pattern: string | RegExp, timeoutMs?: number): Promise<string[]>;
  /** waits until `test(screen)` holds; rejects with `what` and the screen after `timeoutMs` */
  waitUntil(test: (lines: string[]) => boolean, timeoutMs?: number, what?: string): Promise<string[]>;
  /** sends keys one at a time (ink reads one key per chunk), pausing `pauseMs` after each */
  press(...keys: string[]): Promise<void>;
  /** resizes the pseudo-terminal (the child gets SIGWINCH) and the emulator */
  resize(cols: number, rows: number): void;
  /** sends a signal to the child process */
  kill(signal: NodeJS.Signals): void;
  /** settles once the child has exited and its last output has been drawn */
  readonly exit: Promise<PtyExit>;
  /** `exit`, or a rejection (with the screen) when the child still runs after `timeoutMs` */
  exited(timeoutMs?: number): Promise<PtyExit>;
  /** true while the alternate screen buffer is active */
  isAlternate(): boolean;
  /** the last DECTCEM sequence written (`CSI ?25h` shows, `CSI ?25l` hides); null when none was */
  cursorVisible(): boolean | null;
  /**
   * calls `check` after every chunk of output has been drawn (so on every frame, and on the parts of
   * a frame written in separate chunks); returns a function that stops it
   */
  onDraw(check: (session: PtySession) => void): () => void;
  /** everything the child wrote, escape sequences included */
  raw(): string;
  readonly cols: number;
  readonly rows: number;
  /** kills the child if it still runs and frees the emulator */
  dispose(): void;
}

const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/**
 * Spawns `node dist/cli.js ...args` in a `cols`×`rows` pseudo-terminal. `CI` is removed from the
 * child's environment (ink draws only the final frame when it is set) and TERM is xterm-256color.
 */
export function spawnPty(args: readonly string[], options: PtyOptions & { pauseMs?: number } = {}): PtySession {
  let cols = options.cols ?? 80;
  let rows = options.rows ?? 24;
  const pauseMs = options.pauseMs ?? 60;
  const env: Record<string, string> = {};
  for (const [k, v] of Object.entries(process.env)) if (v !== undefined) env[k] = v;
  // ink switches to "last frame only" output under CI, and probes keyboard protocols on some terminals
  for (const k of ['CI', 'CONTINUOUS_INTEGRATION', 'BUILD_NUMBER', 'RUN_ID', 'KITTY_WINDOW_ID', 'TERM_PROGRAM']) delete env[k];
  env.TERM = 'xterm-256color';
  for (const [k, v] of Object.entries(options.env ?? {})) {
    if (v === undefined) delete env[k];
    else env[k] = v;
  }

  const term = new xterm.Terminal({ cols, rows, allowProposedApi: true, scrollback: 200 });
  const child = pty.spawn(process.execPath, [CLI, ...args], { name: 'xterm-256color', cols, rows, cwd: options.cwd ?? ROOT, env });

  let raw = '';
  let lastData = Date.now();
  let pending = 0;
  let drained: (() => void)[] = [];
  const watchers = new Set<(session: PtySession) => void>();
  const onWritten = () => {
    for (const w of watchers) w(session);
    pending--;
    if (pending === 0) {
      const waiting = drained;
      drained = [];
      for (const w of waiting) w();
    }
  };
  const flush = () => (pending === 0 ? Promise.resolve() : new Promise<void>((r) => drained.push(r)));

  child.onData((d) => {
    raw += d;
    lastData = Date.now();
    pending++;
    term.write(d, onWritten);
  });

  let done = false;
  const exit = new Promise<PtyExit>((resolve) => {
    child.onExit(async ({ exitCode, signal }) => {
      done = true;
      // the pty may deliver the last output after the exit: wait for it to go quiet, then for the parse
      const t0 = Date.now();
      while (Date.now() - lastData < 80 && Date.now() - t0 < 1000) await sleep(20);
      await flush();
      resolve({ exitCode, signal });
    });
  });

  const screen = () => {
    const buf = term.buffer.active;
    const out: string[] = [];
    for (let i = 0; i < term.rows; i++) out.push(buf.getLine(buf.viewportY + i)?.translateToString(true) ?? '');
    return out;
  };

  const waitUntil = async (test: (lines: string[]) => boolean, timeoutMs = 15_000, what = 'condition') => {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      await flush();
      const lines = screen();
      if (test(lines)) return lines;
      if (Date.now() > deadline) {
        throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}; screen:\n${lines.map((l) => `|${l}`).join('\n')}`);
      }
      if (done && Date.now() - lastData > 200) {
        throw new Error(`the process exited while waiting for ${what}; screen:\n${lines.map((l) => `|${l}`).join('\n')}`);
      }
      await sleep(25);
    }
  };

  const session: PtySession = {
    get cols() {
      return cols;
    },
    get rows() {
      return rows;
    },
    screen,
    wrappedRows() {
      const buf = term.buffer.active;
      const out: number[] = [];
      for (let i = 0; i < term.rows; i++) if (buf.getLine(buf.viewportY + i)?.isWrapped) out.push(i);
      return out;
    },
    waitUntil,
    waitFor(pattern, timeoutMs = 15_000) {
      const test = typeof pattern === 'string' ? (l: string[]) => l.some((x) => x.includes(pattern)) : (l: string[]) => l.some((x) => pattern.test(x));
      return waitUntil(test, timeoutMs, String(pattern));
    },
    async press(...keys) {
      for (const k of keys) {
        child.write(k);
        await sleep(pauseMs);
      }
    },
    resize(c, r) {
      cols = c;
      rows = r;
      term.resize(c, r);
      child.resize(c, r);
    },
    kill(signal) {
      child.kill(signal);
    },
    exit,
    exited(timeoutMs = 10_000) {
      let timer: NodeJS.Timeout | undefined;
      const late = new Promise<never>((_, reject) => {
        timer = setTimeout(() => reject(new Error(`still running after ${timeoutMs} ms; screen:\n${screen().map((l) => `|${l}`).join('\n')}`)), timeoutMs);
      });
      return Promise.race([exit, late]).finally(() => clearTimeout(timer));
    },
    isAlternate: () => term.buffer.active.type === 'alternate',
    cursorVisible() {
      const show = raw.lastIndexOf('\x1b[?25h');
      const hide = raw.lastIndexOf('\x1b[?25l');
      if (show < 0 && hide < 0) return null;
      return show > hide;
    },
    onDraw(check) {
      watchers.add(check);
      return () => watchers.delete(check);
    },
    raw: () => raw,
    dispose() {
      watchers.clear();
      if (!done) {
        try {
          child.kill('SIGKILL');
        } catch {
          /* already gone */
        }
      }
      term.dispose();
    },
  };
  return session;
}
