/**
 * The explorer's state and the pure reducer that moves it on each key. Keys that arrive together (a
 * paste, a burst over SSH) are applied one after another to the latest state, never to a stale copy.
 * Side effects (regroup, export, quit) are requested in `request` and carried out by the App.
 */
import type { Key } from 'ink';
import type { DiscoveredSlice, Discovery } from '../discover/types.js';
import type { Report, SliceReport } from '../triage/types.js';
import { clampCursor, defaultDescending, FOUND_SORT_KEYS, SORT_KEYS, sliceFilter, sortSlices, type SortKey } from './model.js';

export type Mode = 'table' | 'detail' | 'picker' | 'help' | 'filter' | 'export-path' | 'export-confirm';

/** Which slices the table lists: the report's grouping, or the slices the search found. */
export type View = 'grouping' | 'found';

/** What each view keeps of its own while the other is shown: the cursor, the marks, the sort and the filter. */
export interface ViewPlace {
  readonly cursor: number;
  readonly marked: ReadonlySet<string>;
  readonly sortKey: SortKey;
  readonly descending: boolean;
  readonly filter: string;
}

const FRESH_PLACE: ViewPlace = { cursor: 0, marked: new Set(), sortKey: 'rank', descending: true, filter: '' };

/** Work the App must do for the reducer (the reducer itself stays pure). */
export type Request =
  | { readonly kind: 'regroup'; readonly by: readonly string[] }
  | { readonly kind: 'export'; readonly path: string; readonly force: boolean; readonly slices: readonly SliceReport[] }
  | { readonly kind: 'export-found'; readonly path: string; readonly force: boolean; readonly slices: readonly DiscoveredSlice[] }
  | { readonly kind: 'exit'; readonly code: number };

export interface ExplorerState {
  readonly report: Report | null;
  readonly columns: readonly string[];
  readonly mode: Mode;
  readonly sortKey: SortKey;
  readonly descending: boolean;
  readonly filter: string;
  readonly draft: string;
  readonly cursor: number;
  readonly marked: ReadonlySet<string>;
  readonly intervals: boolean;
  readonly pickerCursor: number;
  readonly picked: ReadonlySet<string>;
  readonly detailScroll: number;
  /** how far the detail pane can scroll (reported by the App once it knows the pane's length) */
  readonly detailMax: number;
  readonly drillIndex: number;
  readonly message: string;
  readonly busy: string | null;
  /** the body height, for page moves */
  readonly page: number;
  readonly request: Request | null;
  /** increases with every request, so the same request twice still runs twice */
  readonly requestId: number;
  readonly view: View;
  /** the view not shown: its place, restored when it comes back */
  readonly away: ViewPlace;
  /** the slices the search found, kept for the session once it has run */
  readonly discovery: Discovery | null;
  /** the search while it runs (column sets rolled up of all; 0 of 0 before the first), else null */
  readonly search: { readonly done: number; readonly total: number } | null;
}

export const initialState: ExplorerState = {
  report: null,
  columns: [],
  mode: 'table',
  sortKey: 'rank',
  descending: true,
  filter: '',
  draft: '',
  cursor: 0,
  marked: new Set(),
  intervals: false,
  pickerCursor: 0,
  picked: new Set(),
  detailScroll: 0,
  detailMax: Number.MAX_SAFE_INTEGER,
  drillIndex: 0,
  message: '',
  busy: null,
  page: 10,
  request: null,
  requestId: 0,
  view: 'grouping',
  away: FRESH_PLACE,
  discovery: null,
  search: null,
};

/** What the reducer is told. */
export type Action =
  | { readonly type: 'loaded'; readonly report: Report; readonly columns: readonly string[] }
  | { readonly type: 'regrouped'; readonly report: Report; readonly message: string }
  | { readonly type: 'done'; readonly message: string }
  | { readonly type: 'search-progress'; readonly done: number; readonly total: number }
  | { readonly type: 'discovered'; readonly discovery: Discovery }
  /** the search failed with a FloorgapError (its line); another search may be started */
  | { readonly type: 'search-failed'; readonly message: string }
  | { readonly type: 'page'; readonly page: number }
  /** the detail pane's largest useful scroll (its lines − the room for them) */
  | { readonly type: 'detail-limit'; readonly max: number }
  | { readonly type: 'key'; readonly input: string; readonly key: Partial<Key>; readonly defaultExportPath: string; readonly fileExists: (path: string) => boolean };

/** The slices on screen: the report's (or in the discovered view, the discovered ones), filtered then sorted. */
export function shownSlices(state: Pick<ExplorerState, 'report' | 'filter' | 'sortKey' | 'descending' | 'view' | 'discovery'>): SliceReport[] {
  if (state.view === 'found') return shownFound(state);
  if (!state.report) return [];
  return sortSlices(state.report.slices.filter(sliceFilter(state.filter)), state.sortKey, state.descending);
}

/** The discovered slices on screen, filtered then sorted ([] before the search has ended). */
function shownFound(state: Pick<ExplorerState, 'filter' | 'sortKey' | 'descending' | 'discovery'>): DiscoveredSlice[] {
  if (!state.discovery) return [];
  return sortSlices(state.discovery.slices.filter(sliceFilter(state.filter)), state.sortKey, state.descending);
}

/** The place of the view shown. */
function placeOf(state: ExplorerState): ViewPlace {
  return { cursor: state.cursor, marked: state.marked, sortKey: state.sortKey, descending: state.descending, filter: state.filter };
}

/**
 * Shows the other view, where it was left; the first time the discovered view shows, the search
 * starts (its hook runs while `search` is set), and it is kept for the session once it has ended.
 */
function switchView(state: ExplorerState): ExplorerState {
  const view: View = state.view === 'found' ? 'grouping' : 'found';
  const start = view === 'found' && !state.discovery && !state.search;
  return { ...state, ...state.away, away: placeOf(state), view, mode: 'table', detailScroll: 0, search: start ? { done: 0, total: 0 } : state.search };
}

/** The selected slice, if any. */
export function selectedSlice(state: ExplorerState): SliceReport | undefined {
  const shown = shownSlices(state);
  return shown[clampCursor(state.cursor, shown.length)];
}

function request(state: ExplorerState, r: Request, extra: Partial<ExplorerState> = {}): ExplorerState {
  return { ...state, ...extra, request: r, requestId: state.requestId + 1 };
}

/** Re-sorts or re-filters, keeping the same slice selected when it is still shown. */
function reorder(state: ExplorerState, next: Partial<ExplorerState>): ExplorerState {
  const label = selectedSlice(state)?.label;
  const after = { ...state, ...next };
  const shown = shownSlices(after);
  const i = label === undefined ? -1 : shown.findIndex((s) => s.label === label);
  return { ...after, cursor: i >= 0 ? i : 0 };
}

function move(state: ExplorerState, to: number): ExplorerState {
  return { ...state, cursor: clampCursor(to, shownSlices(state).length), detailScroll: 0 };
}

function toggle(set: ReadonlySet<string>, value: string): Set<string> {
  const next = new Set(set);
  if (next.has(value)) next.delete(value);
  else next.add(value);
  return next;
}

/**
 * The explorer's reducer.
 * @example
 * reduce(state, { type: 'key', input: 'h', key: {}, ... }).sortKey; // => 'headroom'
 */
export function reduce(state: ExplorerState, action: Action): ExplorerState {
  switch (action.type) {
    case 'loaded':
      return { ...state, report: action.report, columns: action.columns, picked: new Set(action.report.by ?? []) };
    case 'regrouped': {
      // a regroup asked for in the discovered view shows the grouping, with its sort and filter
      const back = state.view === 'found' ? { ...state.away, view: 'grouping' as const, away: placeOf(state) } : {};
      return { ...state, ...back, report: action.report, marked: new Set(), cursor: 0, detailScroll: 0, busy: null, message: action.message, mode: state.mode === 'detail' ? 'table' : state.mode };
    }
    case 'done':
      return { ...state, busy: null, message: action.message };
    case 'search-progress':
      return state.search ? { ...state, search: { done: action.done, total: action.total } } : state;
    case 'discovered': {
      const n = action.discovery.slices.length;
      const found = n === 0 ? 'no slice passed' : `${n} slice${n === 1 ? '' : 's'} found`;
      return { ...state, search: null, discovery: action.discovery, message: state.view === 'found' ? found : `slice search done: ${found} (f shows them)` };
    }
    case 'search-failed': {
      // back to the grouping, unless a prompt or the picker is open there
      const after = state.view === 'found' && (state.mode === 'table' || state.mode === 'detail') ? switchView(state) : state;
      return { ...after, search: null, message: action.message };
    }
    case 'page':
      return action.page === state.page ? state : { ...state, page: action.page };
    case 'detail-limit':
      return action.max === state.detailMax && state.detailScroll <= action.max
        ? state
        : { ...state, detailMax: action.max, detailScroll: Math.min(state.detailScroll, action.max) };
    case 'key':
      return onKey(state, action);
  }
}

function onKey(state: ExplorerState, a: Extract<Action, { type: 'key' }>): ExplorerState {
  const { input, key } = a;
  if (key.ctrl && input === 'c') return request(state, { kind: 'exit', code: 130 });
  if (!state.report) return input === 'q' ? request(state, { kind: 'exit', code: 0 }) : state;
  const report = state.report;

  if (state.mode === 'filter' || state.mode === 'export-path') {
    if (key.escape) return state.mode === 'filter' ? reorder(state, { filter: '', mode: 'table' }) : { ...state, mode: 'table' };
    if (key.return) {
      if (state.mode === 'filter') return reorder(state, { filter: state.draft, mode: 'table' });
      const path = state.draft.trim();
      if (!path) return { ...state, message: 'export: give a file name' };
      if (a.fileExists(path)) return { ...state, mode: 'export-confirm' };
      return startExport(state, path, false);
    }
    if (key.backspace || key.delete) return { ...state, draft: state.draft.slice(0, -1) };
    if (input && !key.ctrl && !key.meta) return { ...state, draft: state.draft + input.replace(/[\x00-\x1f\x7f]/g, '') };
    return state;
  }
  if (state.mode === 'export-confirm') {
    if (input === 'y' || input === 'Y') return startExport(state, state.draft.trim(), true);
    return { ...state, mode: 'table', message: 'export cancelled: the file was kept' };
  }
  if (state.mode === 'help') return input === 'q' ? request(state, { kind: 'exit', code: 0 }) : { ...state, mode: 'table' };
  if (state.mode === 'picker') {
    const cols = state.columns;
    if (key.escape) return { ...state, mode: 'table' };
    if (key.upArrow || input === 'k') return { ...state, pickerCursor: Math.max(0, state.pickerCursor - 1) };
    if (key.downArrow || input === 'j') return { ...state, pickerCursor: Math.min(cols.length - 1, state.pickerCursor + 1) };
    if (input === ' ') {
      const col = cols[state.pickerCursor];
      return col === undefined ? state : { ...state, picked: toggle(state.picked, col) };
    }
    if (key.return) {
      const by = cols.filter((c) => state.picked.has(c));
      return request(state, { kind: 'regroup', by }, { mode: 'table', busy: 'regrouping…' });
    }
    return state;
  }

  if (input === 'q') return request(state, { kind: 'exit', code: 0 });
  if (input === '?') return { ...state, mode: 'help' };
  if (input === 'f') return switchView(state);
  const found = state.view === 'found';
  if (state.mode === 'detail') {
    if (key.return || key.escape) return { ...state, mode: 'table' };
    if (key.upArrow || input === 'k') return { ...state, detailScroll: Math.max(0, state.detailScroll - 1) };
    if (key.downArrow || input === 'j') return { ...state, detailScroll: Math.min(state.detailMax, state.detailScroll + 1) };
    if (key.pageUp) return { ...state, detailScroll: Math.max(0, state.detailScroll - state.page) };
    if (key.pageDown) return { ...state, detailScroll: Math.min(state.detailMax, state.detailScroll + state.page) };
    if (key.leftArrow) return move(state, state.cursor - 1);
    if (key.rightArrow) return move(state, state.cursor + 1);
    if (input === 'd') return { ...state, detailScroll: 0, drillIndex: state.drillIndex + 1 };
  } else {
    const total = shownSlices(state).length;
    if (key.upArrow || input === 'k') return move(state, state.cursor - 1);
    if (key.downArrow || input === 'j') return move(state, state.cursor + 1);
    if (key.pageUp) return move(state, state.cursor - state.page);
    if (key.pageDown) return move(state, state.cursor + state.page);
    if (key.home) return move(state, 0);
    if (key.end) return move(state, total - 1);
    if (key.return) return total > 0 ? { ...state, mode: 'detail', detailScroll: 0 } : state;
    if (key.escape && state.filter) return reorder(state, { filter: '' });
  }
  if (input === 's') {
    const keys: readonly SortKey[] = found ? FOUND_SORT_KEYS : SORT_KEYS;
    const next = keys[(keys.indexOf(state.sortKey) + 1) % keys.length];
    return reorder(state, { sortKey: next, descending: defaultDescending(next) });
  }
  if (input === 'r') return reorder(state, { descending: !state.descending });
  if (input === 'h') return reorder(state, { sortKey: 'headroom', descending: true });
  if (input === 'i') return found ? { ...state, message: 'i: the discovered table shows no intervals; the detail pane (Enter) does' } : { ...state, intervals: !state.intervals };
  if (input === '/') return { ...state, mode: 'filter', draft: state.filter };
  if (input === 'g') return { ...state, mode: 'picker', pickerCursor: 0, picked: new Set(report.by ?? []) };
  if (input === ' ') {
    const s = selectedSlice(state);
    return s ? move({ ...state, marked: toggle(state.marked, s.label) }, state.cursor + 1) : state;
  }
  if (input === 'e') return { ...state, mode: 'export-path', draft: a.defaultExportPath };
  return state;
}

function startExport(state: ExplorerState, path: string, force: boolean): ExplorerState {
  if (state.view === 'found') {
    const listed = state.discovery?.slices.filter((s) => s.rank > 0) ?? [];
    const slices = state.marked.size > 0 ? listed.filter((s) => state.marked.has(s.label)) : listed;
    if (slices.length === 0) return { ...state, mode: 'table', message: state.discovery ? 'nothing to export: no slice passed the search' : 'nothing to export yet: the search is still running' };
    return request(state, { kind: 'export-found', path, force, slices }, { mode: 'table', busy: `exporting ${slices.length} discovered slice${slices.length === 1 ? '' : 's'}…` });
  }
  const report = state.report!;
  const slices = state.marked.size > 0 ? report.slices.filter((s) => state.marked.has(s.label)) : report.slices.filter((s) => s.flagged);
  if (slices.length === 0) return { ...state, mode: 'table', message: 'nothing to export: no slice is marked or flagged' };
  return request(state, { kind: 'export', path, force, slices }, { mode: 'table', busy: `exporting ${slices.length} slice${slices.length === 1 ? '' : 's'}…` });
}
