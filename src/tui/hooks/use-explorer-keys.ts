import { useInput } from 'ink';
import type { Dispatch } from 'react';
import { exitCodeOf } from '../../core/errors.js';
import { splitKeys } from '../keys.js';
import type { Action } from '../state.js';
import type { Exit } from './use-exit.js';

/** What {@link useExplorerKeys} is given. */
export interface ExplorerKeysOptions {
  readonly dispatch: Dispatch<Action>;
  readonly exit: Exit;
  /** set when loading failed: then any key ends the explorer (Ctrl-C with 130, others with the error) */
  readonly failure: { readonly error: unknown } | null;
  /** the path the export prompt proposes */
  readonly defaultExportPath: () => string;
  readonly fileExists: (path: string) => boolean;
}

/**
 * The keyboard: every key goes to the reducer (src/tui/state.ts), several keys in one read one by one.
 * @example
 * useExplorerKeys({ dispatch, exit, failure: null, defaultExportPath, fileExists }); // 'jj' dispatches two `key` actions
 */
export function useExplorerKeys({ dispatch, exit, failure, defaultExportPath, fileExists }: ExplorerKeysOptions): void {
  useInput((input, key) => {
    if (failure) return key.ctrl && input === 'c' ? exit(130) : exit(exitCodeOf(failure.error), failure.error);
    const common = { defaultExportPath: defaultExportPath(), fileExists };
    // several keys in one read (key repeat, a paste, a burst over SSH) are applied one by one, in order
    for (const k of splitKeys(input, key)) dispatch({ type: 'key', input: k.input, key: k.key, ...common });
  });
}
