import { useEffect, useState, type Dispatch } from 'react';
import { exitCodeOf } from '../../core/errors.js';
import type { ExplorerData } from '../data.js';
import type { Action, Request } from '../state.js';
import type { Exit, Failed } from './use-exit.js';

/** Loading progress as the engine reports it. */
export interface LoadProgress {
  readonly percent: number | null;
  readonly rows?: number | null;
}

/** What {@link useExplorerData} is given. */
export interface ExplorerDataOptions {
  /** loads the data, once, on the first render */
  readonly load: () => Promise<ExplorerData>;
  /** polled every 250 ms while loading */
  readonly progress?: () => LoadProgress | null;
  /** the reducer's request and its id (a new id is a new request, even for the same work) */
  readonly request: Request | null;
  readonly requestId: number;
  readonly dispatch: Dispatch<Action>;
  readonly exit: Exit;
  readonly failed: Failed;
}

/** The explorer's data side as its screens see it. */
export interface ExplorerDataState {
  /** null until the load resolves */
  readonly data: ExplorerData | null;
  /** set when loading failed; the explorer then ends 1.2 s later (or at a key) */
  readonly failure: { readonly error: unknown } | null;
  readonly progress: LoadProgress | null;
  /** milliseconds since loading started, updated with the progress */
  readonly elapsed: number;
}

/**
 * Loads the explorer's data (polling the progress meanwhile), tells the reducer when it is loaded, and
 * carries out what the reducer requests: regroup, export (of the grouping's or of discovered slices), exit. A request that fails with a
 * FloorgapError leaves its message on the status line; any other failure ends the explorer.
 * @example
 * const { data, failure, progress, elapsed } = useExplorerData({ load, progress, request, requestId, dispatch, exit, failed });
 */
export function useExplorerData(options: ExplorerDataOptions): ExplorerDataState {
  const { load, progress: poll, request, requestId, dispatch, exit, failed } = options;
  const [data, setData] = useState<ExplorerData | null>(null);
  const [failure, setFailure] = useState<{ readonly error: unknown } | null>(null);
  const [progress, setProgress] = useState<LoadProgress | null>(null);
  const [elapsed, setElapsed] = useState(0);

  // load once; poll progress meanwhile
  useEffect(() => {
    let alive = true;
    const t0 = Date.now();
    const timer = setInterval(() => {
      if (!alive) return;
      setElapsed(Date.now() - t0);
      if (poll) setProgress(poll());
    }, 250);
    load().then(
      (d) => {
        if (!alive) return;
        clearInterval(timer);
        setData(d);
        dispatch({ type: 'loaded', report: d.report, columns: d.columns });
      },
      (e: unknown) => {
        if (!alive) return;
        clearInterval(timer);
        setFailure({ error: e });
        setTimeout(() => exit(exitCodeOf(e), e), 1200);
      },
    );
    return () => {
      alive = false;
      clearInterval(timer);
    };
    // the data is loaded once, with the first render's load and progress; a later prop never reloads it
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  // carry out what the reducer asked for
  useEffect(() => {
    if (!request) return;
    if (request.kind === 'exit') return exit(request.code);
    if (!data) return;
    const say = (message: string) => dispatch({ type: 'done', message });
    if (request.kind === 'regroup') {
      const { by } = request;
      data.regroup(by).then(
        (next) => dispatch({ type: 'regrouped', report: next, message: by.length ? `grouped by ${by.join(' × ')}` : 'overview: one-column slices' }),
        failed('regroup failed', say),
      );
    } else if (request.kind === 'export') {
      data.exportSlices(request.slices, request.path, request.force).then(say, failed('export failed', say));
    } else if (request.kind === 'export-found') {
      data.exportFound(request.slices, request.path, request.force).then(say, failed('export failed', say));
    }
    // each request runs once, when its id changes: the request stays in the state after it ran, and data,
    // dispatch, exit and failed do not change once a request can be made
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [requestId]);

  return { data, failure, progress, elapsed };
}
