/**
 * Progress of long scans on stderr: a bar redrawn in place when stderr is a terminal, else one line
 * when reading starts and one when it ends, nothing more (logs stay short). Only for large inputs
 * unless `--progress always`; never with `--progress never`.
 */
import type { Duck } from '../sql/duck.js';
import type { LoadHooks } from '../cells/load.js';
import { watchProgress, type ScanProgress } from '../sql/progress.js';
import { sanitize } from '../terminal/sanitize.js';
import { truncate } from '../terminal/width.js';
import type { CliIO } from './io.js';

/** Inputs at least this large (bytes, all files together) show progress under `--progress auto`. */
const PROGRESS_MIN_BYTES = 64 * 1024 * 1024;

const BAR = 24;

function mb(bytes: number): string {
  return bytes >= 10 * 1024 * 1024 ? `${Math.round(bytes / 1024 / 1024)} MB` : `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

function seconds(ms: number): string {
  return `${(ms / 1000).toFixed(1)} s`;
}

/**
 * The bar line for a reading: percentage, bytes read of all (from DuckDB's percentage), elapsed time
 * and rate.
 * @example
 * progressLine('preds.csv', 629145600, { percentage: 50, rowsProcessed: 0, totalRows: 0 }, 2000);
 * // => 'reading preds.csv  [############............]  50 %  300 of 600 MB  2.0 s  150 MB/s'
 */
export function progressLine(where: string, bytes: number, p: ScanProgress, elapsedMs: number): string {
  const done = Math.round((p.percentage / 100) * BAR);
  const bar = '#'.repeat(done) + '.'.repeat(BAR - done);
  const read = (p.percentage / 100) * bytes;
  const rate = elapsedMs > 0 ? read / (elapsedMs / 1000) : 0;
  return `reading ${where}  [${bar}]  ${Math.floor(p.percentage)} %  ${mb(read).replace(' MB', '')} of ${mb(bytes)}  ${seconds(elapsedMs)}  ${mb(rate)}/s`;
}

/**
 * The scan watcher for a command's load, or undefined when no progress should show.
 * @param mode the `--progress` option
 */
export function scanProgress(io: Pick<CliIO, 'stderr' | 'env'>, mode: 'auto' | 'always' | 'never' = 'auto'): LoadHooks['onScan'] {
  if (mode === 'never') return undefined;
  return (duck: Duck, info) => {
    if (mode === 'auto' && info.bytes < PROGRESS_MIN_BYTES) return () => undefined;
    const where = sanitize(info.where);
    const tty = Boolean(io.stderr.isTTY);
    const t0 = Date.now();
    let stop = () => undefined as void;
    let drawn = false;
    if (tty) {
      const width = Math.max(40, ((io.stderr as { columns?: number }).columns ?? 80) - 1);
      stop = watchProgress(
        duck,
        (p) => {
          io.stderr.write(`\r\x1b[K${truncate(`floorgap: ${progressLine(where, info.bytes, p, Date.now() - t0)}`, width)}`);
          drawn = true;
        },
        100,
      );
    } else {
      io.stderr.write(`floorgap: reading ${where} (${mb(info.bytes)})\n`);
    }
    return () => {
      stop();
      const ms = Date.now() - t0;
      if (drawn) io.stderr.write('\r\x1b[K');
      const rate = ms > 0 ? mb(info.bytes / (ms / 1000)) : '-';
      io.stderr.write(`floorgap: read ${where} (${mb(info.bytes)}) in ${seconds(ms)} (${rate}/s)\n`);
    };
  };
}

/** Under `--progress auto`, a search shows progress once it has run this long. */
const SEARCH_QUIET_MS = 1000;

/**
 * Progress of discover's search on stderr: a line redrawn in place on a terminal, else one line once
 * it is under way and one when it ends; under `--progress auto` only once the search has run a second.
 * @example
 * searchProgress(io, 'always')?.(3, 28); // writes 'floorgap: searching column sets 3 of 28 …'
 */
export function searchProgress(io: Pick<CliIO, 'stderr'>, mode: 'auto' | 'always' | 'never' = 'auto'): ((done: number, total: number) => void) | undefined {
  if (mode === 'never') return undefined;
  const tty = Boolean(io.stderr.isTTY);
  const t0 = Date.now();
  let shown = false;
  return (done, total) => {
    const ms = Date.now() - t0;
    if (!shown && mode === 'auto' && ms < SEARCH_QUIET_MS && done < total) return;
    if (!shown && done === total && mode === 'auto' && ms < SEARCH_QUIET_MS) return;
    if (tty) {
      io.stderr.write(`\r\x1b[Kfloorgap: searching column sets ${done} of ${total}  ${seconds(ms)}`);
      if (done === total) io.stderr.write(`\r\x1b[Kfloorgap: rolled up ${total} column sets in ${seconds(ms)}\n`);
    } else if (!shown) {
      io.stderr.write(`floorgap: searching ${total} column sets (${done} done)\n`);
    }
    if (!tty && done === total) io.stderr.write(`floorgap: rolled up ${total} column sets in ${seconds(ms)}\n`);
    shown = true;
  };
}
