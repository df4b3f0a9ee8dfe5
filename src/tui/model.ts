/**
 * The explorer's view model: pure functions from a report and the UI state to what the screen shows
 * (sort, filter, visible window, table columns, gap bars, the plain-language lever). No React here, so
 * every rule is testable on its own.
 */
import { count, NULL_MARK, points, signedPoints } from '../render/format.js';
import { sanitize } from '../terminal/sanitize.js';
import { pad } from '../terminal/width.js';
import type { DiscoveredSlice } from '../discover/types.js';
import type { Focus, SliceReport } from '../triage/types.js';

/** Sort columns, in the order the sort key cycles through them. */
export const SORT_KEYS = ['rank', 'headroom', 'yield', 'bias', 'variance', 'mismatch', 'dev', 'rows', 'name'] as const;
/** The discovered table's sort columns: rank (the lower end of the part headroom), its point value, the lift, the name. */
export const FOUND_SORT_KEYS = ['rank', 'headroom', 'lift', 'name'] as const;
export type SortKey = (typeof SORT_KEYS)[number] | (typeof FOUND_SORT_KEYS)[number];

/** How the status line names the discovered table's sorts. */
export const FOUND_SORT_LABEL: Readonly<Record<(typeof FOUND_SORT_KEYS)[number], string>> = {
  rank: 'rank',
  headroom: 'headroom (point)',
  lift: 'lift',
  name: 'name',
};

function isFound(s: SliceReport): s is DiscoveredSlice {
  return 'part_headroom' in s;
}

export const SORT_LABEL: Readonly<Record<SortKey, string>> = {
  rank: 'report order',
  headroom: 'headroom',
  yield: 'yield',
  bias: 'avoidable bias',
  variance: 'variance',
  mismatch: 'mismatch',
  dev: 'dev error',
  rows: 'dev rows',
  name: 'name',
  lift: 'lift',
};

function sortValue(s: SliceReport, key: SortKey): number | string | null {
  switch (key) {
    case 'rank':
      return -s.rank;
    case 'headroom':
      // a discovered slice by the headroom of the part it was found on
      return isFound(s) ? s.part_headroom.value : s.headroom?.total ?? null;
    case 'lift':
      return isFound(s) ? s.lift.value : null;
    case 'yield':
      return s.yield;
    case 'bias':
      return s.gaps.avoidable_bias?.value ?? null;
    case 'variance':
      return s.gaps.variance?.value ?? null;
    case 'mismatch':
      return s.gaps.mismatch?.value ?? null;
    case 'dev':
      return s.error.dev?.value ?? null;
    case 'rows':
      return s.rows.dev ?? null;
    case 'name':
      return s.label;
  }
}

/**
 * Sorts slices by a column; missing values always go last, ties keep the report's rank order.
 * `descending` is the natural direction for numbers (largest first); names sort A→Z when descending
 * is false.
 * @example
 * sortSlices(report.slices, 'headroom', true)[0].label; // => the slice with the most headroom
 */
export function sortSlices<T extends SliceReport>(slices: readonly T[], key: SortKey, descending: boolean): T[] {
  const dir = descending ? -1 : 1;
  return [...slices].sort((a, b) => {
    const va = sortValue(a, key);
    const vb = sortValue(b, key);
    if (va === null || vb === null) {
      if (va === vb) return a.rank - b.rank;
      return va === null ? 1 : -1;
    }
    if (va < vb) return -dir;
    if (va > vb) return dir;
    return a.rank - b.rank;
  });
}

/** The natural direction of a sort key: numbers largest first, names A→Z, the report's rank 1 first. */
export function defaultDescending(key: SortKey): boolean {
  return key !== 'name';
}

/**
 * A filter from the `/` prompt: space-separated terms, all of which must match. `focus=variance`
 * matches the focus, `flagged` (or `flag`) flagged slices, `col=value` a key, anything else is a
 * case-insensitive substring of the slice label.
 * @example
 * sliceFilter('focus=bias station')(slice); // => true for a bias slice whose label mentions station
 */
export function sliceFilter(text: string): (s: SliceReport) => boolean {
  const terms = text.trim().toLowerCase().split(/\s+/).filter(Boolean);
  if (terms.length === 0) return () => true;
  const tests = terms.map((term): ((s: SliceReport) => boolean) => {
    if (term === 'flagged' || term === 'flag') return (s) => s.flagged;
    const eq = term.indexOf('=');
    if (eq > 0) {
      const name = term.slice(0, eq);
      const value = term.slice(eq + 1);
      if (name === 'focus') return (s) => s.focus.startsWith(value);
      return (s) => Object.entries(s.key).some(([k, v]) => k.toLowerCase() === name && v.toLowerCase().includes(value));
    }
    return (s) => s.label.toLowerCase().includes(term);
  });
  return (s) => tests.every((t) => t(s));
}

/**
 * The first visible row so that `cursor` stays on screen, moving the window as little as possible.
 * @example
 * windowStart(40, 12, 10, 0); // => 3
 */
export function windowStart(total: number, cursor: number, height: number, previous: number): number {
  if (height <= 0 || total <= height) return 0;
  let start = Math.min(Math.max(previous, 0), total - height);
  if (cursor < start) start = cursor;
  if (cursor >= start + height) start = cursor - height + 1;
  return Math.max(0, Math.min(start, total - height));
}

/** Clamps a cursor into [0, total − 1] (0 when empty). */
export function clampCursor(cursor: number, total: number): number {
  return total <= 0 ? 0 : Math.max(0, Math.min(cursor, total - 1));
}

// ---------------------------------------------------------------------------------------------------
// Screen layout

/** The smallest terminal the explorer draws in; below it, one line asks for a larger window. */
export const MIN_ROWS = 4;
export const MIN_COLUMNS = 20;

/** What the frame holds at a terminal size; it never uses more than rows − 1 lines. */
export interface ScreenLayout {
  /** lines the frame may use: rows − 1, so the last row stays free and the frame never fills the screen */
  readonly lines: number;
  /** fewer than MIN_ROWS rows or MIN_COLUMNS columns: only the note asking for a larger window (none at 1 row) */
  readonly tooSmall: boolean;
  /** the three header lines (10 rows or more) */
  readonly header: boolean;
  /** the status line (5 rows or more); the key line (or the open prompt) is always the last line */
  readonly status: boolean;
  /** lines between the header and the status line: the table (its header line and rows), detail, picker, help */
  readonly body: number;
}

/**
 * The layout for a terminal of `columns` × `rows`. Short terminals drop the header lines first (below
 * 10 rows), then the status line (below 5), so the table, its key line and any prompt stay.
 * @example
 * screenLayout(80, 24); // => { lines: 23, tooSmall: false, header: true, status: true, body: 18 }
 * screenLayout(80, 4);  // => { lines: 3, tooSmall: false, header: false, status: false, body: 2 }
 */
export function screenLayout(columns: number, rows: number): ScreenLayout {
  const lines = Math.max(0, rows - 1);
  if (rows < MIN_ROWS || columns < MIN_COLUMNS) return { lines: Math.min(lines, 1), tooSmall: true, header: false, status: false, body: 0 };
  const header = rows >= 10;
  const status = rows >= 5;
  return { lines, tooSmall: false, header, status, body: lines - (header ? 3 : 0) - (status ? 1 : 0) - 1 };
}

// ---------------------------------------------------------------------------------------------------
// Table columns

export type ColumnId = 'mark' | 'label' | 'rows' | 'share' | 'floor' | 'train' | 'dev' | 'bias' | 'variance' | 'mismatch' | 'headroom' | 'yield' | 'focus' | 'bar';

export interface TableColumn {
  readonly id: ColumnId;
  readonly header: string;
  readonly width: number;
  readonly align: 'left' | 'right';
}

const BASE: Readonly<Record<Exclude<ColumnId, 'label'>, TableColumn>> = {
  mark: { id: 'mark', header: '', width: 2, align: 'left' },
  rows: { id: 'rows', header: 'dev rows', width: 8, align: 'right' },
  share: { id: 'share', header: 'share', width: 5, align: 'right' },
  floor: { id: 'floor', header: 'floor', width: 5, align: 'right' },
  train: { id: 'train', header: 'train', width: 5, align: 'right' },
  dev: { id: 'dev', header: 'dev', width: 5, align: 'right' },
  bias: { id: 'bias', header: 'bias', width: 5, align: 'right' },
  variance: { id: 'variance', header: 'var', width: 5, align: 'right' },
  mismatch: { id: 'mismatch', header: 'mism', width: 5, align: 'right' },
  headroom: { id: 'headroom', header: 'head', width: 5, align: 'right' },
  yield: { id: 'yield', header: 'yield', width: 5, align: 'right' },
  focus: { id: 'focus', header: 'focus', width: 10, align: 'left' },
  bar: { id: 'bar', header: 'gaps', width: 10, align: 'left' },
};

/** Optional columns, least important first: narrower terminals drop them in this order. */
export const DROP_ORDER: readonly ColumnId[] = ['share', 'yield', 'train', 'rows', 'mismatch', 'bar', 'variance', 'floor'];

const MIN_LABEL = 14;
const MAX_LABEL = 34;

/**
 * The table's columns for a terminal width: the label takes what is left (14–34 columns), and the
 * least important columns go first when it would get narrower than 14. With intervals on, the
 * dev and gap columns widen to show "value±half-width".
 */
export function tableColumns(width: number, options: { intervals: boolean; mismatch: boolean }): TableColumn[] {
  const widen = (c: TableColumn): TableColumn =>
    options.intervals && (c.id === 'dev' || c.id === 'bias' || c.id === 'variance' || c.id === 'mismatch') ? { ...c, width: c.width + 5 } : c;
  let ids: ColumnId[] = ['mark', 'label', 'rows', 'share', 'floor', 'train', 'dev', 'bias', 'variance', 'mismatch', 'headroom', 'yield', 'focus', 'bar'];
  if (!options.mismatch) ids = ids.filter((id) => id !== 'mismatch');
  const fixedWidth = (list: ColumnId[]) => list.filter((id) => id !== 'label').reduce((a, id) => a + widen(BASE[id as Exclude<ColumnId, 'label'>]).width + 1, 0);
  for (const drop of DROP_ORDER) {
    if (width - fixedWidth(ids) >= MIN_LABEL) break;
    ids = ids.filter((id) => id !== drop);
  }
  const labelWidth = Math.max(6, Math.min(MAX_LABEL, width - fixedWidth(ids)));
  return ids.map((id) => (id === 'label' ? { id, header: 'slice', width: labelWidth, align: 'left' } : widen(BASE[id])));
}

function half(lo: number | null | undefined, hi: number | null | undefined): string {
  if (lo === null || lo === undefined || hi === null || hi === undefined) return '';
  return `±${Math.abs((hi - lo) * 50).toFixed(1)}`;
}

/** The text of one cell (numbers in percentage points). */
export function cellText(s: SliceReport, id: ColumnId, options: { intervals: boolean; marked: boolean; label: string }): string {
  switch (id) {
    case 'mark':
      return `${options.marked ? '+' : ' '}${s.flagged ? '*' : ' '}`;
    case 'label':
      return options.label;
    case 'rows':
      return count(s.rows.dev);
    case 'share':
      return `${Math.round(s.share * 100)}%`;
    case 'floor':
      return points(s.floor.value);
    case 'train':
      return points(s.error.train?.value);
    case 'dev':
      return points(s.error.dev?.value) + (options.intervals ? half(s.error.dev?.lo, s.error.dev?.hi) : '');
    case 'bias':
      return signedPoints(s.gaps.avoidable_bias?.value) + (options.intervals ? half(s.gaps.avoidable_bias?.lo, s.gaps.avoidable_bias?.hi) : '');
    case 'variance':
      return signedPoints(s.gaps.variance?.value) + (options.intervals ? half(s.gaps.variance?.lo, s.gaps.variance?.hi) : '');
    case 'mismatch':
      return signedPoints(s.gaps.mismatch?.value) + (options.intervals ? half(s.gaps.mismatch?.lo, s.gaps.mismatch?.hi) : '');
    case 'headroom':
      return s.headroom ? points(s.headroom.total) : NULL_MARK;
    case 'yield':
      return s.yield === null ? NULL_MARK : points(s.yield, 2);
    case 'focus':
      return s.focus;
    case 'bar':
      return '';
  }
}

/** Pads or truncates a cell to its column. */
export function fit(text: string, column: TableColumn): string {
  return pad(text, column.width, column.align);
}

/**
 * A slice's label for the table: in a `--by` grouping only the values (the header names the
 * columns), in the overview `col=value`. Sanitised: no control sequence from the data reaches the
 * terminal.
 */
export function displayLabel(s: SliceReport, grouped: boolean): string {
  const text = grouped ? Object.values(s.key).join(' · ') : s.label;
  return sanitize(text);
}

// ---------------------------------------------------------------------------------------------------
// Gap bar

export type BarPart = 'floor' | 'bias' | 'variance' | 'mismatch';
export const BAR_PARTS: readonly BarPart[] = ['floor', 'bias', 'variance', 'mismatch'];

/** Glyphs of the bar's parts: each part differs by glyph as well as colour, so it reads without colour. */
export const BAR_GLYPHS: Readonly<Record<'unicode' | 'ascii', Readonly<Record<BarPart, string>>>> = {
  unicode: { floor: '░', bias: '█', variance: '▓', mismatch: '▒' },
  ascii: { floor: '.', bias: '#', variance: '=', mismatch: '~' },
};

/**
 * The compact gap bar: floor, avoidable bias, variance and mismatch side by side, each as many cells as
 * its share of `scale` (the largest dev error on screen) of `width`; negative parts are not drawn.
 * @example
 * gapBar(slice, 0.2, 10); // => [{ part: 'floor', cells: 3 }, { part: 'bias', cells: 4 }, ...]
 */
export function gapBar(s: SliceReport, scale: number, width: number): { part: BarPart; cells: number }[] {
  if (!(scale > 0) || width <= 0) return [];
  const values: Record<BarPart, number> = {
    floor: Math.max(0, s.floor.value),
    bias: Math.max(0, s.gaps.avoidable_bias?.value ?? 0),
    variance: Math.max(0, s.gaps.variance?.value ?? 0),
    mismatch: Math.max(0, s.gaps.mismatch?.value ?? 0),
  };
  const out: { part: BarPart; cells: number }[] = [];
  let used = 0;
  let acc = 0;
  for (const part of BAR_PARTS) {
    acc += values[part];
    const end = Math.min(width, Math.round((acc / scale) * width));
    const cells = Math.max(0, end - used);
    if (cells > 0) out.push({ part, cells });
    used += cells;
  }
  return out;
}

/** The bar's scale: the largest floor + positive gaps among the slices shown. */
export function barScale(slices: readonly SliceReport[]): number {
  let max = 0;
  for (const s of slices) {
    const total = Math.max(0, s.floor.value) + Math.max(0, s.gaps.avoidable_bias?.value ?? 0) + Math.max(0, s.gaps.variance?.value ?? 0) + Math.max(0, s.gaps.mismatch?.value ?? 0);
    if (total > max) max = total;
  }
  return max;
}

// ---------------------------------------------------------------------------------------------------
// Words

/** What each focus suggests, in plain language (shown in the detail pane and the help). */
export const LEVER: Readonly<Record<Focus, string>> = {
  bias: 'the model underfits here: try a larger model, longer training, or a better architecture or features.',
  variance: 'the model overfits here: get more training data for this slice, regularise, or augment.',
  mismatch: 'the dev rows do not look like the training rows: add training data that resembles this slice (collect, relabel or synthesise it).',
  'at-floor': 'already at the human floor: little to gain here.',
  'below-floor': 'train error is below the floor: check the floor estimate, or look for training labels leaking into features.',
  thin: 'too few rows to judge: collect more evaluation rows for this slice.',
  unclear: 'no significant gap yet, but too little evidence to call it at the floor.',
};

/** Width of a string on screen (re-exported for components). */
