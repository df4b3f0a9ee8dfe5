import type { Duck } from './duck.js';

/** How far the running query is, as DuckDB estimates it. */
export interface ScanProgress {
  /** 0 … 100 */
  readonly percentage: number;
  /** rows read so far and DuckDB's estimate of all rows (for CSV an estimate from the file size) */
  readonly rowsProcessed: number;
  readonly totalRows: number;
}

/**
 * Polls the progress of whatever query runs on `duck` (DuckDB's `connection.progress`; openDuck turns
 * progress tracking on, with DuckDB's own printing off) every `intervalMs` and hands each reading to
 * `onProgress`; no call while no query runs. The timer does not keep the process alive.
 * @returns a function that stops polling
 * @example
 * const stop = watchProgress(duck, (p) => draw(p.percentage), 100);
 * await duck.all(bigQuery);
 * stop();
 */
export function watchProgress(duck: Duck, onProgress: (p: ScanProgress) => void, intervalMs = 100): () => void {
  let last = -1;
  const timer = setInterval(() => {
    let p;
    try {
      p = duck.connection.progress;
    } catch {
      return;
    }
    if (!(p.percentage >= 0)) return;
    // a new query starts again at 0: report it too, but never the same reading twice
    if (p.percentage === last && p.percentage !== 0) return;
    last = p.percentage;
    onProgress({ percentage: Math.min(100, p.percentage), rowsProcessed: Number(p.rows_processed), totalRows: Number(p.total_rows_to_process) });
  }, intervalMs);
  timer.unref();
  return () => clearInterval(timer);
}
