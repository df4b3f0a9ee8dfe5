/**
 * Every temporary file floorgap creates beside an output (atomic writes, exports, the cells cache) is
 * registered here, and so is the engine's spill folder, so that an interrupted run (Ctrl-C, SIGTERM,
 * SIGHUP) can remove whatever is still half-written before it exits. A finished write renames its
 * temporary away; removing a name that no longer exists is harmless.
 */
import { existsSync, rmSync } from 'node:fs';

/** Registered paths: true for an unfinished output, false for scratch space (the spill folder). */
const live = new Map<string, boolean>();

/** Registers a temporary file that must not outlive the process. */
export function trackTemp(path: string): string {
  live.set(path, true);
  return path;
}

/** Registers a scratch folder of floorgap's own (removed with its content, never counted as an output). */
export function trackScratch(path: string): string {
  live.set(path, false);
  return path;
}

/** Forgets a temporary file that was renamed into place or removed. */
export function releaseTemp(path: string): void {
  live.delete(path);
}

/**
 * Removes every registered temporary file and scratch folder that still exists (synchronously: it runs
 * in signal and exit handlers). Returns how many unfinished output files it removed.
 */
export function removeTempsSync(): number {
  let n = 0;
  for (const [path, output] of live) {
    try {
      if (existsSync(path)) {
        rmSync(path, { recursive: !output, force: true });
        if (output) n++;
      }
    } catch {
      // a folder that went away, or one we may no longer write: nothing more to do
    }
  }
  live.clear();
  return n;
}
