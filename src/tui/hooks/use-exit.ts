import { useCallback, useEffect, useRef } from 'react';
import { exitCodeOf, FloorgapError } from '../../core/errors.js';

/** Ends the explorer: an exit code, and the error when one ended it. */
export type Exit = (code: number, error?: unknown) => void;

/** What a failed request does with its error; `show` puts a FloorgapError's line on screen. */
export type Failed = (what: string, show: (message: string) => void) => (e: unknown) => void;

/**
 * How the explorer ends: `exit` calls the latest `onExit` once, whatever asks for it again later;
 * `failed(what, show)` handles a failed request: a FloorgapError is a message (`what: message`)
 * given to `show`, anything else ends the explorer with its exit code (`exitCodeOf`).
 * @example
 * const { exit, failed } = useExit(props.onExit);
 * data.regroup(by).then(apply, failed('regroup failed', say)); // a FloorgapError('no such column') says 'regroup failed: no such column'
 */
export function useExit(onExit: Exit): { readonly exit: Exit; readonly failed: Failed } {
  const exited = useRef(false);
  const latest = useRef(onExit);
  useEffect(() => {
    latest.current = onExit;
  }, [onExit]);
  const exit = useCallback<Exit>((code, error) => {
    if (exited.current) return;
    exited.current = true;
    latest.current(code, error);
  }, []);
  const failed = useCallback<Failed>(
    (what, show) => (e) => {
      if (e instanceof FloorgapError) show(`${what}: ${e.message}`);
      else exit(exitCodeOf(e), e);
    },
    [exit],
  );
  return { exit, failed };
}
