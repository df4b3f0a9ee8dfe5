import { Box, Text, useInput } from 'ink';
import { useCallback, useEffect, useMemo, useReducer, useRef, useState } from 'react';
import type { ErrorExample } from '../rows/examples.js';
import { failureText } from '../render/failure.js';
import { sanitize } from '../terminal/sanitize.js';
import { truncate } from '../terminal/width.js';
import type { SliceReport } from '../triage/types.js';
import { exitCodeOf, FloorgapError } from '../core/errors.js';
import { Line } from './components/Line.js';
import { SliceTable } from './components/SliceTable.js';
import { wrap } from '../terminal/wrap.js';
import { detailLines } from './detail.js';
import { headerLines } from './header.js';
import { useTerminalSize } from './hooks/use-terminal-size.js';
import { DETAIL_HINT, DETAIL_HINT_ASCII, HINT, HINT_ASCII, KEYS, splitKeys } from './keys.js';
import { barScale, clampCursor, MIN_COLUMNS, MIN_ROWS, screenLayout, SORT_LABEL, tableColumns, windowStart } from './model.js';
import { initialState, reduce, shownSlices } from './state.js';
import type { ExplorerData } from './data.js';
import type { Span } from './theme.js';

/** Loading progress as the engine reports it. */
export interface LoadProgress {
  readonly percent: number | null;
  readonly rows?: number | null;
}

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


function lineOf(text: string, style: Omit<Span, 'text'> = {}): Span[] {
  return [{ text, ...style }];
}

/** What a terminal too small to draw in shows (src/tui/model.ts, screenLayout). */
const TOO_SMALL = `floorgap: enlarge the window (at least ${MIN_ROWS} rows and ${MIN_COLUMNS} columns)`;

/**
 * The explorer: header, slice table (or detail pane, grouping picker, help), status line and key
 * hints, never taller than the terminal minus one line, at any height (screenLayout in model.ts says
 * what is dropped on short terminals). All keyboard; see keys.ts.
 */
export function App(props: AppProps) {
  const size = useTerminalSize({ columns: props.columns, rows: props.rows });
  const layout = screenLayout(size.columns, size.rows);
  const width = Math.max(MIN_COLUMNS, size.columns);
  const height = layout.lines;
  const [data, setData] = useState<ExplorerData | null>(null);
  const [failure, setFailure] = useState<{ readonly error: unknown } | null>(null);
  const [progress, setProgress] = useState<LoadProgress | null>(null);
  const [elapsed, setElapsed] = useState(0);
  const [state, dispatch] = useReducer(reduce, initialState);
  // the detail pane's breakdown and examples, each with the slice (and column) it was loaded for: one
  // that belongs to another slice is still loading
  const [drillFor, setDrillFor] = useState<{ readonly slice: SliceReport; readonly column: string; readonly value: readonly SliceReport[] } | null>(null);
  const [examplesFor, setExamplesFor] = useState<{ readonly slice: SliceReport; readonly value: readonly ErrorExample[] | string } | null>(null);
  // the first table row on screen, kept from the last frame so the window moves only when the cursor leaves it
  const [shownFrom, setShownFrom] = useState(0);
  const exited = useRef(false);
  const onExit = useRef(props.onExit);
  useEffect(() => {
    onExit.current = props.onExit;
  }, [props.onExit]);
  const exit = useCallback((code: number, error?: unknown) => {
    if (exited.current) return;
    exited.current = true;
    onExit.current(code, error);
  }, []);
  /** a failed request: a FloorgapError is a message on the status line (`what: message`), anything else ends the explorer */
  const failed = useCallback(
    (what: string, show: (message: string) => void = (m) => dispatch({ type: 'done', message: m })) => (e: unknown) => {
      if (e instanceof FloorgapError) show(`${what}: ${e.message}`);
      else exit(exitCodeOf(e), e);
    },
    [exit],
  );
  const { report, mode, sortKey, descending, filter, draft, marked, intervals, pickerCursor, picked, detailScroll, message, busy } = state;

  // load once; poll progress meanwhile
  useEffect(() => {
    let alive = true;
    const t0 = Date.now();
    const timer = setInterval(() => {
      if (!alive) return;
      setElapsed(Date.now() - t0);
      if (props.progress) setProgress(props.progress());
    }, 250);
    props.load().then(
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
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  const shown = useMemo(() => shownSlices(state), [report, filter, sortKey, descending]); // eslint-disable-line react-hooks/exhaustive-deps
  const cursor = clampCursor(state.cursor, shown.length);
  const selected: SliceReport | undefined = shown[cursor];
  const hasMismatch = Boolean(report?.overall.gaps.mismatch);
  const columns = useMemo(() => tableColumns(width, { intervals, mismatch: hasMismatch }), [width, intervals, hasMismatch]);
  const scale = useMemo(() => barScale(shown), [shown]);
  const bodyHeight = Math.max(1, layout.body - 1); // table rows: the body less the table's header line
  const start = windowStart(shown.length, cursor, bodyHeight, shownFrom);
  if (start !== shownFrom) setShownFrom(start); // React's pattern for state kept from the previous render
  const drillColumns = useMemo(() => (data && selected ? data.columns.filter((c) => !(c in selected.key)) : []), [data, selected]);
  const drillColumn = drillColumns.length > 0 ? drillColumns[state.drillIndex % drillColumns.length] : null;

  useEffect(() => {
    dispatch({ type: 'page', page: bodyHeight });
  }, [bodyHeight]);

  // carry out what the reducer asked for
  useEffect(() => {
    const r = state.request;
    if (!r) return;
    if (r.kind === 'exit') return exit(r.code);
    if (!data) return;
    if (r.kind === 'regroup') {
      data.regroup(r.by).then(
        (next) => dispatch({ type: 'regrouped', report: next, message: r.by.length ? `grouped by ${r.by.join(' × ')}` : 'overview: one-column slices' }),
        failed('regroup failed'),
      );
    } else if (r.kind === 'export') {
      data.exportSlices(r.slices, r.path, r.force).then((m) => dispatch({ type: 'done', message: m }), failed('export failed'));
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [state.requestId]);

  // the detail pane's breakdown and examples, loaded when it shows a slice
  useEffect(() => {
    if (mode !== 'detail' || !data || !selected) return;
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
  }, [mode, data, selected, drillColumn, failed]);
  const drill = !drillColumn ? null : drillFor && drillFor.slice === selected && drillFor.column === drillColumn ? drillFor.value : 'loading';
  const examples = examplesFor && examplesFor.slice === selected ? examplesFor.value : 'loading';

  // the detail pane's lines, and how far they can scroll (told to the reducer so ↑ works at once)
  const detailRoom = Math.max(1, layout.body);
  const detail = useMemo(
    () => (mode === 'detail' && selected && report ? detailLines(selected, report, { drillColumn, drill, examples }, width) : null),
    [mode, selected, report, drillColumn, drill, examples, width],
  );
  const detailMax = detail ? Math.max(0, detail.length - detailRoom) : 0;
  useEffect(() => {
    if (detail) dispatch({ type: 'detail-limit', max: detailMax });
  }, [detail, detailMax]);

  useInput((input, key) => {
    if (failure) return key.ctrl && input === 'c' ? exit(130) : exit(exitCodeOf(failure.error), failure.error);
    const common = { defaultExportPath: props.defaultExportPath(), fileExists: props.fileExists };
    // several keys in one read (key repeat, a paste, a burst over SSH) are applied one by one, in order
    for (const k of splitKeys(input, key)) dispatch({ type: 'key', input: k.input, key: k.key, ...common });
  });

  // ---- frame -------------------------------------------------------------------------------------
  if (layout.tooSmall) {
    return (
      <Box flexDirection="column" width={Math.max(1, size.columns)} height={height}>
        {height > 0 ? <Line spans={lineOf(truncate(TOO_SMALL, size.columns))} color={props.color} /> : null}
      </Box>
    );
  }
  const lines: { spans: Span[]; selected?: boolean }[] = [];
  if (!report) {
    if (failure) {
      const message = wrap(failureText(failure.error, false).trimEnd(), width, { long: 'break' });
      // the title and a blank line above the message, when they fit with it
      if (message.length + 2 <= height) lines.push({ spans: lineOf('floorgap', { bold: true }) }, { spans: lineOf('') });
      for (const l of message) lines.push({ spans: lineOf(l, { color: 'red' }) });
    } else {
      lines.push({ spans: lineOf('floorgap', { bold: true }) });
      const pct = progress?.percent;
      const bar = pct !== null && pct !== undefined ? progressBar(pct, Math.min(40, width - 20), props.ascii) : '';
      lines.push({ spans: lineOf(truncate(`loading ${sanitize(props.title)}`, width)) });
      lines.push({ spans: lineOf(`${bar}${pct !== null && pct !== undefined ? ` ${pct.toFixed(0)}%` : ''}  ${(elapsed / 1000).toFixed(1)} s`, { dim: true }) });
    }
    return <Frame lines={lines} width={width} height={height} color={props.color} />;
  }

  if (layout.header) for (const l of headerLines(report, width)) lines.push({ spans: l });
  if (mode === 'help') {
    lines.push({ spans: lineOf('keys', { bold: true }) });
    for (const [k, what] of KEYS) lines.push({ spans: lineOf(truncate(`  ${k.padEnd(20)} ${what}`, width)) });
    lines.push({ spans: lineOf('  gap bar: ' + (props.ascii ? '. floor  # bias  = variance  ~ mismatch' : '░ floor  █ bias  ▓ variance  ▒ mismatch') + '   * flagged  + marked', { dim: true }) });
    lines.push({ spans: lineOf('  any key closes this help', { dim: true }) });
  } else if (mode === 'picker') {
    const cols = data?.columns ?? [];
    lines.push({ spans: lineOf('group by (space toggles, Enter applies, Esc cancels; none = overview)', { bold: true }) });
    const top = windowStart(cols.length, pickerCursor, bodyHeight, 0);
    cols.slice(top, top + bodyHeight).forEach((c, i) => {
      const at = top + i;
      lines.push({ spans: lineOf(truncate(`  [${picked.has(c) ? 'x' : ' '}] ${sanitize(c)}`, width)), selected: at === pickerCursor });
    });
  } else if (mode === 'detail' && selected) {
    const all = detail ?? [];
    const scroll = Math.min(detailScroll, detailMax);
    for (const l of all.slice(scroll, scroll + detailRoom)) lines.push({ spans: l });
  } else {
    return (
      <Box flexDirection="column" width={width} height={height}>
        {lines.map((l, i) => (
          <Line key={i} spans={l.spans} color={props.color} />
        ))}
        <SliceTable
          slices={shown}
          columns={columns}
          cursor={cursor}
          start={start}
          height={bodyHeight}
          marked={marked}
          grouped={report.by !== null}
          groupHeader={report.by ? truncate(sanitize(report.by.join(' · ')), 40) : 'slice'}
          intervals={intervals}
          scale={scale}
          color={props.color}
          ascii={props.ascii}
        />
        {shown.length === 0 ? <Text>{filter ? '  no slice matches the filter (Esc clears it)' : '  no slices'}</Text> : null}
        <Box flexGrow={1} />
        {layout.status ? <Line spans={statusSpans()} color={props.color} /> : null}
        <Line spans={bottomSpans()} color={props.color} />
      </Box>
    );
  }
  return (
    <Box flexDirection="column" width={width} height={height}>
      {lines.slice(0, Math.max(0, height - (layout.status ? 2 : 1))).map((l, i) => (
        <Line key={i} spans={l.spans} color={props.color} selected={l.selected} />
      ))}
      <Box flexGrow={1} />
      {layout.status ? <Line spans={statusSpans()} color={props.color} /> : null}
      <Line spans={bottomSpans()} color={props.color} />
    </Box>
  );

  function statusSpans(): Span[] {
    const arrow = props.ascii ? (descending ? 'v' : '^') : descending ? '↓' : '↑';
    const parts = [
      `sort ${SORT_LABEL[sortKey]} ${arrow}`,
      filter ? `filter "${truncate(sanitize(filter), 24)}" (${shown.length} of ${report!.slices.length})` : `${shown.length} slices`,
      `${marked.size} marked`,
    ];
    if (intervals) parts.push('± on');
    if (selected) parts.push(`${cursor + 1}/${shown.length}`);
    const note = busy ?? message;
    return [{ text: truncate(parts.join(' · ') + (note ? `  ${sanitize(note)}` : ''), width), dim: !note }];
  }

  function bottomSpans(): Span[] {
    if (mode === 'filter') return [{ text: truncate(`/${sanitize(draft)}▏ (Enter keeps, Esc clears)`, width), bold: true }];
    if (mode === 'export-path') return [{ text: truncate(`export rows to: ${sanitize(draft)}▏ (Enter writes, Esc cancels)`, width), bold: true }];
    if (mode === 'export-confirm') return [{ text: truncate(`${sanitize(draft.trim())} exists: overwrite it and its manifest? (y/n)`, width), bold: true, color: 'yellow' }];
    const hint = mode === 'detail' ? (props.ascii ? DETAIL_HINT_ASCII : DETAIL_HINT) : props.ascii ? HINT_ASCII : HINT;
    return [{ text: truncate(hint, width), dim: true }];
  }
}

function progressBar(percent: number, width: number, ascii: boolean): string {
  const filled = Math.round((Math.max(0, Math.min(100, percent)) / 100) * width);
  return ascii ? `[${'#'.repeat(filled)}${'-'.repeat(width - filled)}]` : `${'█'.repeat(filled)}${'░'.repeat(width - filled)}`;
}


/** Props of {@link Frame}. */
interface FrameProps {
  readonly lines: readonly { spans: Span[]; selected?: boolean }[];
  readonly width: number;
  readonly height: number;
  readonly color: boolean;
}

function Frame({ lines, width, height, color }: FrameProps) {
  return (
    <Box flexDirection="column" width={width} height={height}>
      {lines.slice(0, height).map((l, i) => (
        <Line key={i} spans={l.spans} color={color} selected={l.selected} />
      ))}
    </Box>
  );
}
