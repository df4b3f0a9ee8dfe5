import { useEffect, type Dispatch } from 'react';
import type { ExplorerData } from '../data.js';
import type { Action } from '../state.js';
import type { Failed } from './use-exit.js';

/** What {@link useDiscovery} is given. */
export interface DiscoveryOptions {
  readonly data: ExplorerData | null;
  /** the reducer asks for the search (its `search` is set): it runs until it ends or the explorer does */
  readonly searching: boolean;
  readonly dispatch: Dispatch<Action>;
  readonly failed: Failed;
}

/**
 * Runs the slice search in the background while the reducer asks for it, telling it each step, the
 * discovery, or a FloorgapError's line (any other failure ends the explorer). The search is stopped
 * (aborted at its next step) when the explorer ends, so quitting never waits for it.
 * @example
 * useDiscovery({ data, searching: state.search !== null, dispatch, failed }); // dispatches search-progress …, then discovered
 */
export function useDiscovery({ data, searching, dispatch, failed }: DiscoveryOptions): void {
  useEffect(() => {
    if (!searching || !data) return;
    const controller = new AbortController();
    let alive = true;
    data
      .discover((done, total) => {
        if (alive) dispatch({ type: 'search-progress', done, total });
      }, controller.signal)
      .then(
        (discovery) => {
          if (alive) dispatch({ type: 'discovered', discovery });
        },
        (e: unknown) => {
          // a search stopped because the explorer ended rejects with the abort: nothing is left to tell
          if (alive) failed('slice search failed', (message) => dispatch({ type: 'search-failed', message }))(e);
        },
      );
    return () => {
      alive = false;
      controller.abort();
    };
  }, [data, searching, dispatch, failed]);
}
