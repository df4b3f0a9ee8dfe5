import { Box } from 'ink';
import { useCallback, useEffect, useMemo, useReducer } from 'react';
import { Header } from './components/Header.js';
import { KeyHints } from './components/KeyHints.js';
import { StatusBar } from './components/StatusBar.js';
import type { DiscoveredSlice } from '../discover/types.js';
import type { ExplorerData } from './data.js';
import { searchNote } from './found.js';
import { useDetailData } from './hooks/use-detail-data.js';
import { useDiscovery } from './hooks/use-discovery.js';
import { useExit } from './hooks/use-exit.js';
import { useExplorerData, type LoadProgress } from './hooks/use-explorer-data.js';
import { useExplorerKeys } from './hooks/use-explorer-keys.js';
import { useTableWindow } from './hooks/use-table-window.js';
import { useTerminalSize } from './hooks/use-terminal-size.js';
import { clampCursor, MIN_COLUMNS, screenLayout } from './model.js';
import { DetailPane } from './screens/DetailPane.js';
import { FailureScreen } from './screens/FailureScreen.js';
import { FoundTableScreen } from './screens/FoundTableScreen.js';
import { GroupPicker } from './screens/GroupPicker.js';
import { HelpScreen } from './screens/HelpScreen.js';
import { LoadingScreen } from './screens/LoadingScreen.js';
import { SliceTableScreen } from './screens/SliceTableScreen.js';
import { TooSmallScreen } from './screens/TooSmallScreen.js';
import { initialState, reduce, shownSlices } from './state.js';


/** Props of {@link App}. */
export interface AppProps {
  /** loads the data; the first frame shows before it resolves */
  readonly load: () => Promise<ExplorerData>;
  /** polled while loading */
  readonly progress?: () => LoadProgress | null;
  /** what is being loaded, for the loading screen */
  readonly title: string;
  readonly color: boolean;
  readonly ascii: boolean;
  /** fixed size (tests, benchmarks); otherwise the terminal's, following resizes */
  readonly columns?: number;
  readonly rows?: number;
  /**
   * called once: 0 after q, 130 after Ctrl-C; with the error when one ended the explorer (loading
   * failed, or an internal error in a regroup, the detail pane or an export), and its exit code
   * (`exitCodeOf`: 2 for a FloorgapError, 3 for an internal error); the caller prints the error
   */
  readonly onExit: (code: number, error?: unknown) => void;
  /** the path the export prompt proposes */
  readonly defaultExportPath: () => string;
  readonly fileExists: (path: string) => boolean;
}

/**
 * The explorer: header, slice table (or detail pane, grouping picker, help), status line and key
 * hints, never taller than the terminal minus one line, at any height (screenLayout in model.ts says
 * what is dropped on short terminals). All keyboard; see keys.ts. State is the reducer's (state.ts);
 * the hooks load the data and carry out what it requests; the screens draw it.
 */
export function App(props: AppProps) {
  const size = useTerminalSize({ columns: props.columns, rows: props.rows });
  const layout = screenLayout(size.columns, size.rows);
  const width = Math.max(MIN_COLUMNS, size.columns);
  const [state, dispatch] = useReducer(reduce, initialState);
  const { exit, failed } = useExit(props.onExit);
  const { data, failure, progress, elapsed } = useExplorerData({
    load: props.load,
    progress: props.progress,
    request: state.request,
    requestId: state.requestId,
    dispatch,
    exit,
    failed,
  });
  const { report, mode, sortKey, descending, filter, view, discovery } = state;
  const found = view === 'found';
  const shown = useMemo(() => shownSlices({ report, filter, sortKey, descending, view, discovery }), [report, filter, sortKey, descending, view, discovery]);
  const ranks = useMemo(() => new Map((discovery?.slices ?? []).filter((s) => s.rank > 0).map((s) => [s.label, s.rank])), [discovery]);
  const cursor = clampCursor(state.cursor, shown.length);
  const selected = shown[cursor];
  const tableRows = Math.max(1, layout.body - 1); // the body less the table's header line
  const start = useTableWindow(shown.length, cursor, tableRows);
  useEffect(() => {
    dispatch({ type: 'page', page: tableRows });
  }, [tableRows]);
  const extras = useDetailData({ open: mode === 'detail', data, selected, drillIndex: state.drillIndex, dispatch, failed });
  useDiscovery({ data, searching: state.search !== null, dispatch, failed });
  const foundDetail = useMemo(() => (found && selected ? { slice: selected as DiscoveredSlice, ranks } : null), [found, selected, ranks]);
  const onScrollLimit = useCallback((max: number) => dispatch({ type: 'detail-limit', max }), []);
  useExplorerKeys({ dispatch, exit, failure, defaultExportPath: props.defaultExportPath, fileExists: props.fileExists });

  if (layout.tooSmall) return <TooSmallScreen columns={size.columns} height={layout.lines} color={props.color} />;
  if (!report) {
    return failure ? (
      <FailureScreen error={failure.error} width={width} height={layout.lines} color={props.color} />
    ) : (
      <LoadingScreen title={props.title} progress={progress} elapsed={elapsed} width={width} height={layout.lines} color={props.color} ascii={props.ascii} />
    );
  }
  let body;
  if (mode === 'help') body = <HelpScreen width={width} height={layout.body} color={props.color} ascii={props.ascii} />;
  else if (mode === 'picker') {
    body = <GroupPicker columns={data?.columns ?? []} cursor={state.pickerCursor} picked={state.picked} height={layout.body} width={width} color={props.color} />;
  } else if (mode === 'detail' && selected) {
    body = (
      <DetailPane
        slice={selected}
        report={report}
        extras={extras}
        width={width}
        height={layout.body}
        scroll={state.detailScroll}
        onScrollLimit={onScrollLimit}
        color={props.color}
        found={foundDetail}
      />
    );
  } else if (found) {
    body = (
      <FoundTableScreen
        slices={shown as DiscoveredSlice[]}
        discovery={discovery}
        search={state.search}
        filter={filter}
        cursor={cursor}
        start={start}
        height={tableRows}
        marked={state.marked}
        width={width}
        color={props.color}
      />
    );
  } else {
    body = (
      <SliceTableScreen
        slices={shown}
        by={report.by}
        mismatch={Boolean(report.overall.gaps.mismatch)}
        filter={filter}
        cursor={cursor}
        start={start}
        height={tableRows}
        marked={state.marked}
        intervals={state.intervals}
        width={width}
        color={props.color}
        ascii={props.ascii}
      />
    );
  }
  return (
    <Box flexDirection="column" width={width} height={layout.lines}>
      {layout.header ? <Header report={report} width={width} color={props.color} found={found ? { discovery, search: state.search } : null} /> : null}
      {body}
      <Box flexGrow={1} />
      {layout.status ? (
        <StatusBar
          sortKey={sortKey}
          descending={descending}
          filter={filter}
          shown={shown.length}
          total={found ? discovery?.slices.length ?? 0 : report.slices.length}
          marked={state.marked.size}
          intervals={state.intervals}
          position={selected ? cursor + 1 : null}
          note={state.busy ?? (state.search ? searchNote(state.search) : state.message)}
          width={width}
          ascii={props.ascii}
          color={props.color}
          found={found}
        />
      ) : null}
      <KeyHints mode={mode} draft={state.draft} width={width} ascii={props.ascii} color={props.color} found={found} />
    </Box>
  );
}
