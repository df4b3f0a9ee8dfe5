/**
 * Every temporary file floorgap creates beside an output (atomic writes, exports, the cells cache) is
 * registered here, so that an interrupted run (Ctrl-C, SIGTERM, SIGHUP) can remove whatever is still
 * half-written before it exits. A finished write renames its temporary away; removing a name that no
 * longer exists is harmless.
 */
import { existsSync, rmSync } from 'node:fs';

const live = new Set<string>();

/** Registers a temporary file that must not outlive the process. */
export function trackTemp(path: string): string {
  live.add(path);
  return path;
}

/** Forgets a temporary file that was renamed into place or removed. */
export function releaseTemp(path: string): void {
  live.delete(path);
}

/**
 * Removes every registered temporary file that still exists (synchronously: it runs in signal and
 * exit handlers). Returns how many files it removed.
 */
export function removeTempsSync(): number {
  let n = 0;
  for (const path of live) {
    try {
      if (existsSync(path)) {
        rmSync(path, { force: true });
        n++;
      }
    } catch {
      // a folder that went away, or one we may no longer write: nothing more to do
    }
  }
  live.clear();
  return n;
}

