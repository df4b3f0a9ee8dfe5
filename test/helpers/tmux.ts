/**
 * A tmux server of its own (its own socket, no configuration file) with one detached session, so a
 * test can see what a real terminal multiplexer keeps: the pane's scrollback (history) and screen.
 * `tmuxAvailable()` says whether the machine has tmux; tests without it say so and skip.
 */
import { execFileSync } from 'node:child_process';

/** true when `tmux` runs here. */
export function tmuxAvailable(): boolean {
  try {
    execFileSync('tmux', ['-V'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

export interface TmuxSession {
  /** the pane's visible rows, right-trimmed */
  screen(): string[];
  /** the pane's scrollback and screen, oldest line first */
  everything(): string[];
  /** how many lines the pane's scrollback holds (tmux's `history_size`) */
  historySize(): number;
  /** types keys (tmux key names such as `q` or `Enter`) into the pane */
  sendKeys(...keys: string[]): void;
  /** resizes the window (and its pane): the program in it gets SIGWINCH */
  resize(cols: number, rows: number): void;
  /** waits until the screen matches; rejects with the screen after `timeoutMs` */
  waitFor(pattern: RegExp, timeoutMs?: number): Promise<string[]>;
  /** ends the server and everything in it */
  kill(): void;
}

const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

/**
 * Starts `command` (run by /bin/sh) in a detached `cols`×`rows` session in `cwd`, with `env` as the
 * whole environment of the server and so of the command.
 */
export function startTmux(command: string, options: { cols: number; rows: number; cwd: string; env: Record<string, string> }): TmuxSession {
  const socket = `floorgap-test-${process.pid}-${Math.random().toString(36).slice(2, 8)}`;
  const tmux = (...args: string[]) => execFileSync('tmux', ['-L', socket, '-f', '/dev/null', ...args], { encoding: 'utf8', env: options.env });
  tmux('new-session', '-d', '-s', 'fg', '-x', String(options.cols), '-y', String(options.rows), '-c', options.cwd, command);
  // keep the pane (and its history) when the command ends
  tmux('set-option', '-t', 'fg', 'remain-on-exit', 'on');
  const lines = (text: string) => text.replace(/\n$/, '').split('\n').map((l) => l.trimEnd());
  const session: TmuxSession = {
    screen: () => lines(tmux('capture-pane', '-p', '-t', 'fg')),
    everything: () => lines(tmux('capture-pane', '-p', '-t', 'fg', '-S', '-', '-E', '-')),
    historySize: () => Number(tmux('display-message', '-p', '-t', 'fg', '#{history_size}').trim()),
    sendKeys: (...keys) => void tmux('send-keys', '-t', 'fg', ...keys),
    resize: (cols, rows) => void tmux('resize-window', '-t', 'fg', '-x', String(cols), '-y', String(rows)),
    async waitFor(pattern, timeoutMs = 15_000) {
      const deadline = Date.now() + timeoutMs;
      for (;;) {
        const screen = session.screen();
        if (screen.some((l) => pattern.test(l))) return screen;
        if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${pattern} in tmux; screen:\n${screen.map((l) => `|${l}`).join('\n')}`);
        await sleep(50);
      }
    },
    kill() {
      try {
        tmux('kill-server');
      } catch {
        /* already gone */
      }
    },
  };
  return session;
}
