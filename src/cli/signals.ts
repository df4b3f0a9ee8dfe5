/**
 * Ctrl-C, SIGTERM and SIGHUP, for every command: the running scan or export is stopped, temporary files
 * beside outputs are removed, one line says what happened, and the process exits 130, 143 or 129 (128 +
 * the signal's number, as shells report it). The explorer claims the signals while it runs, to restore
 * the terminal before it exits with the same codes.
 */
import { interruptAll } from '../sql/duck.js';
import { removeTempsSync } from '../output/temp-files.js';

const SIGNAL_EXIT = { SIGINT: 130, SIGTERM: 143, SIGHUP: 129 } as const;
export type HandledSignal = keyof typeof SIGNAL_EXIT;

type Claim = (signal: HandledSignal, code: number) => void;
let claim: Claim | null = null;

/**
 * Hands the signals to `handler` until the returned function is called (the explorer: it restores the
 * terminal and resolves with the code itself).
 */
export function claimSignals(handler: Claim): () => void {
  claim = handler;
  return () => {
    if (claim === handler) claim = null;
  };
}

let installed = false;

/**
 * Installs the process-wide handlers (once). `stderr` gets the closing line; when it is a terminal the
 * progress line, if any, is cleared first.
 */
export function installSignalHandlers(stderr: NodeJS.WriteStream): void {
  if (installed) return;
  installed = true;
  process.on('exit', () => {
    removeTempsSync();
  });
  for (const signal of Object.keys(SIGNAL_EXIT) as HandledSignal[]) {
    process.on(signal, () => {
      const code = SIGNAL_EXIT[signal];
      if (claim) {
        claim(signal, code);
        return;
      }
      interruptAll();
      const removed = removeTempsSync();
      try {
        const clear = stderr.isTTY ? '\r\x1b[K' : '';
        stderr.write(`${clear}floorgap: stopped by ${signal}${removed > 0 ? '; unfinished output files removed' : ''}\n`);
      } catch {
        // the terminal is gone (SIGHUP)
      }
      process.exit(code);
    });
  }
}
