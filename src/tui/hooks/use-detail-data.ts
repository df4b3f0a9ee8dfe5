import { useEffect, useMemo, useState, type Dispatch } from 'react';
import type { ErrorExample } from '../../rows/examples.js';
import type { SliceReport } from '../../triage/types.js';
import type { ExplorerData } from '../data.js';
import type { DetailExtras } from '../detail.js';
import type { Action } from '../state.js';
import type { Failed } from './use-exit.js';

/** What {@link useDetailData} is given. */
export interface DetailDataOptions {
  /** the detail pane is open: only then is anything loaded */
  readonly open: boolean;
  readonly data: ExplorerData | null;
  readonly selected: SliceReport | undefined;
  /** how many times `d` was pressed: the breakdown column is the next one each time, round the list */
  readonly drillIndex: number;
  readonly dispatch: Dispatch<Action>;
  readonly failed: Failed;
}

/**
 * The detail pane's breakdown (by the next column not in the slice's key) and its most confident
 * errors, loaded when the pane shows a slice. Each result is kept with the slice (and column) it was
 * loaded for, so one that belongs to another slice reads `'loading'` until its own arrives. A failed
 * breakdown leaves its message on the status line; failed examples say why in the pane.
 * @example
 * useDetailData({ open: true, data, selected: s5, drillIndex: 0, dispatch, failed }); // => { drillColumn: 'shift', drill: 'loading', examples: 'loading' } until they load
 */
export function useDetailData(options: DetailDataOptions): DetailExtras {
  const { open, data, selected, drillIndex, dispatch, failed } = options;
  const [drillFor, setDrillFor] = useState<{ readonly slice: SliceReport; readonly column: string; readonly value: readonly SliceReport[] } | null>(null);
  const [examplesFor, setExamplesFor] = useState<{ readonly slice: SliceReport; readonly value: readonly ErrorExample[] | string } | null>(null);
  const drillColumns = useMemo(() => (data && selected ? data.columns.filter((c) => !(c in selected.key)) : []), [data, selected]);
  const drillColumn = drillColumns.length > 0 ? drillColumns[drillIndex % drillColumns.length] : null;

  useEffect(() => {
    if (!open || !data || !selected) return;
    let alive = true;
    if (drillColumn) {
      data.drill(selected, drillColumn).then(
        (d) => alive && setDrillFor({ slice: selected, column: drillColumn, value: d }),
        failed('breakdown', (m) => alive && dispatch({ type: 'done', message: m })),
      );
    }
    data.examples(selected).then(
      (x) => alive && setExamplesFor({ slice: selected, value: x }),
      failed('examples', (m) => alive && setExamplesFor({ slice: selected, value: m })),
    );
    return () => {
      alive = false;
    };
  }, [open, data, selected, drillColumn, dispatch, failed]);

  const drill = !drillColumn ? null : drillFor && drillFor.slice === selected && drillFor.column === drillColumn ? drillFor.value : 'loading';
  const examples = examplesFor && examplesFor.slice === selected ? examplesFor.value : 'loading';
  return useMemo(() => ({ drillColumn, drill, examples }), [drillColumn, drill, examples]);
}
