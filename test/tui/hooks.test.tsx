import { render } from 'ink-testing-library';
import { Text } from 'ink';
import { describe, expect, it } from 'vitest';
import { FloorgapError } from '../../src/core/errors.js';
import type { SliceReport } from '../../src/triage/types.js';
import type { ExplorerData } from '../../src/tui/data.js';
import type { DetailExtras } from '../../src/tui/detail.js';
import { useDetailData } from '../../src/tui/hooks/use-detail-data.js';
import { useExit, type Exit, type Failed } from '../../src/tui/hooks/use-exit.js';
import { useTableWindow } from '../../src/tui/hooks/use-table-window.js';
import type { Action } from '../../src/tui/state.js';
import { drillFixture, EXAMPLES_FIXTURE, fakeExplorerData, sliceOfRank } from '../helpers/explorer-fixture.js';
import { settle } from '../helpers/ink-frame.js';
import { reportFixture } from '../helpers/report-fixture.js';

// The explorer's hooks, each in a probe component that shows or hands out what the hook returns.

describe('useTableWindow', () => {
  function Probe({ total, cursor, height }: { total: number; cursor: number; height: number }) {
    return <Text>{String(useTableWindow(total, cursor, height))}</Text>;
  }

  it('moves the window only when the cursor leaves it, keeping it from render to render', () => {
    // 40 rows, 10 on screen (invented); starts by hand arithmetic: cursor 12 below rows 0–9 → 12 − 10 + 1 = 3;
    // cursor 5 inside rows 3–12 → stays 3; cursor 2 above it → 2; cursor 20 below rows 2–11 → 20 − 10 + 1 = 11
    const r = render(<Probe total={40} cursor={12} height={10} />);
    const starts = [r.lastFrame()];
    for (const cursor of [5, 2, 20]) {
      r.rerender(<Probe total={40} cursor={cursor} height={10} />);
      starts.push(r.lastFrame());
    }
    r.unmount();
    expect(starts).toEqual(['3', '3', '2', '11']);
  });

  it('a table that fits starts at its top', () => {
    const r = render(<Probe total={7} cursor={6} height={10} />);
    expect(r.lastFrame()).toBe('0');
    r.unmount();
  });
});

describe('useExit', () => {
  let api: { exit: Exit; failed: Failed } | null = null;
  function Probe({ onExit }: { onExit: Exit }) {
    api = useExit(onExit);
    return null;
  }
  const hooks = () => {
    if (!api) throw new Error('the probe did not render');
    return api;
  };

  it('ends once: a second exit is ignored', () => {
    const calls: unknown[][] = [];
    const r = render(<Probe onExit={(...a) => calls.push(a)} />);
    hooks().exit(0);
    hooks().exit(130);
    r.unmount();
    expect(calls).toEqual([[0, undefined]]);
  });

  it('calls the latest onExit', async () => {
    const first: number[] = [];
    const second: number[] = [];
    const r = render(<Probe onExit={(c) => first.push(c)} />);
    r.rerender(<Probe onExit={(c) => second.push(c)} />);
    await settle();
    hooks().exit(2);
    r.unmount();
    expect({ first, second }).toEqual({ first: [], second: [2] });
  });

  it('a FloorgapError in a request is a message; any other error ends the explorer with exit 3', () => {
    const calls: unknown[][] = [];
    const shown: string[] = [];
    const r = render(<Probe onExit={(...a) => calls.push(a)} />);
    hooks().failed('regroup failed', (m) => shown.push(m))(new FloorgapError('no column "shift" in runs/preds.csv'));
    expect({ shown, calls }).toEqual({ shown: ['regroup failed: no column "shift" in runs/preds.csv'], calls: [] });
    const bug = new TypeError('x is undefined');
    hooks().failed('export failed', (m) => shown.push(m))(bug);
    r.unmount();
    // 3: INTERNAL_EXIT, the exit code of anything but a FloorgapError (src/core/errors.ts)
    expect(calls).toEqual([[3, bug]]);
    expect(shown).toHaveLength(1);
  });
});

describe('useDetailData', () => {
  const report = reportFixture();
  const s5 = sliceOfRank(report, 1); // key station=S5, lighting=dome (fixture, hand-built)
  const s2 = sliceOfRank(report, 2);
  const failed: Failed = (what, show) => (e) => show(`${what}: ${e instanceof Error ? e.message : String(e)}`);

  let extras: DetailExtras | null = null;
  interface ProbeProps {
    readonly open: boolean;
    readonly data: ExplorerData;
    readonly selected: SliceReport;
    readonly drillIndex?: number;
    readonly dispatch?: (a: Action) => void;
  }
  const ignore = () => undefined; // one function for every render, as the reducer's dispatch is
  function Probe({ open, data, selected, drillIndex = 0, dispatch = ignore }: ProbeProps) {
    extras = useDetailData({ open, data, selected, drillIndex, dispatch, failed });
    return null;
  }

  it('loads nothing while the pane is closed', async () => {
    const { data, calls } = fakeExplorerData();
    const r = render(<Probe open={false} data={data} selected={s5} />);
    await settle();
    r.unmount();
    expect({ drill: calls.drill, examples: calls.examples }).toEqual({ drill: [], examples: [] });
    // the column the breakdown would use is known all the same: the first column not in S5's key
    expect(extras?.drillColumn).toBe('shift');
  });

  it('loads the breakdown by the next column and the examples when the pane is open', async () => {
    const { data, calls } = fakeExplorerData();
    const r = render(<Probe open data={data} selected={s5} />);
    expect(extras).toEqual({ drillColumn: 'shift', drill: 'loading', examples: 'loading' });
    await settle();
    r.unmount();
    expect(calls.drill).toEqual([{ slice: 'station=S5 · lighting=dome', column: 'shift' }]);
    expect(extras).toEqual({ drillColumn: 'shift', drill: drillFixture('shift'), examples: [...EXAMPLES_FIXTURE] });
  });

  it('`d` goes round the columns not in the key', () => {
    const { data } = fakeExplorerData();
    const s5ByStation: SliceReport = { ...s5, key: { station: 'S5' }, label: 'station=S5' };
    // columns station, lighting, shift (fixture); not in the key: lighting, shift; index 2 → 2 mod 2 = 0 →
    // lighting, index 3 → 3 mod 2 = 1 → shift (hand arithmetic)
    const r = render(<Probe open={false} data={data} selected={s5ByStation} drillIndex={2} />);
    expect(extras?.drillColumn).toBe('lighting');
    r.rerender(<Probe open={false} data={data} selected={s5ByStation} drillIndex={3} />);
    expect(extras?.drillColumn).toBe('shift');
    r.unmount();
  });

  it("another slice's results read 'loading' until its own arrive; going back shows the kept ones at once", async () => {
    const { data: fake } = fakeExplorerData();
    const never = new Promise<never>(() => undefined);
    const data: ExplorerData = {
      ...fake,
      drill: (slice, column) => (slice === s5 ? fake.drill(slice, column) : never),
      examples: (slice) => (slice === s5 ? fake.examples(slice) : never),
    };
    const r = render(<Probe open data={data} selected={s5} />);
    await settle();
    r.rerender(<Probe open data={data} selected={s2} />);
    await settle();
    expect(extras).toEqual({ drillColumn: 'shift', drill: 'loading', examples: 'loading' });
    r.rerender(<Probe open data={data} selected={s5} />);
    // the first render after the move, before any effect: S5's results as they were kept
    expect(extras).toEqual({ drillColumn: 'shift', drill: drillFixture('shift'), examples: [...EXAMPLES_FIXTURE] });
    r.unmount();
  });

  it('a failed breakdown is a message on the status line; failed examples say why in the pane', async () => {
    const { data: fake } = fakeExplorerData();
    const data: ExplorerData = {
      ...fake,
      drill: () => Promise.reject(new FloorgapError('runs/preds.csv went away')),
      examples: () => Promise.reject(new FloorgapError('runs/preds.csv went away')),
    };
    const actions: Action[] = [];
    const r = render(<Probe open data={data} selected={s5} dispatch={(a) => actions.push(a)} />);
    await settle();
    r.unmount();
    expect(actions).toEqual([{ type: 'done', message: 'breakdown: runs/preds.csv went away' }]);
    expect(extras).toEqual({ drillColumn: 'shift', drill: 'loading', examples: 'examples: runs/preds.csv went away' });
  });
});
