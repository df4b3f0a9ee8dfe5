import type { Key } from 'ink';
import { describe, expect, it } from 'vitest';
import type { DiscoveredSlice, Discovery } from '../../src/discover/types.js';
import { SORT_KEYS } from '../../src/tui/model.js';
import { initialState, reduce, selectedSlice, shownSlices, type ExplorerState } from '../../src/tui/state.js';
import { FAKE_COLUMNS, FAKE_EXPORT_PATH, regroupedFixture } from '../helpers/explorer-fixture.js';
import { reportFixture } from '../helpers/report-fixture.js';

// The report is the fixture (hand-built) in test/helpers/report-fixture.ts. In report order (rank 1
// first): S5·dome, S2·ring, S7·backlit-polarised, S4·diffuse, S1·ring, S3·dome, S9·dome; S5, S2 and S7
// are flagged. The array lists them S2, S5, S7, S4, S1, S3, S9. Picker columns: FAKE_COLUMNS
// (station, lighting, shift; fixture, hand-built). Key meanings: definition in src/tui/state.ts and
// src/tui/keys.ts.

const LABEL = {
  s5: 'station=S5 · lighting=dome',
  s2: 'station=S2 · lighting=ring',
  s7: 'station=S7-rework-line-north · lighting=backlit-polarised',
  s4: 'station=S4 · lighting=diffuse',
  s1: 'station=S1 · lighting=ring',
  s3: 'station=S3 · lighting=dome',
  s9: 'station=S9 · lighting=dome',
} as const;

/** A key event; `exists` answers the export prompt's "does the file exist?". */
function press(state: ExplorerState, input: string, key: Partial<Key> = {}, exists = false): ExplorerState {
  return reduce(state, { type: 'key', input, key, defaultExportPath: FAKE_EXPORT_PATH, fileExists: () => exists });
}

/** Presses a sequence; strings are typed, objects are special keys. */
function keys(state: ExplorerState, ...seq: (string | Partial<Key>)[]): ExplorerState {
  return seq.reduce<ExplorerState>((s, k) => (typeof k === 'string' ? press(s, k) : press(s, '', k)), state);
}

const ENTER: Partial<Key> = { return: true };
const ESC: Partial<Key> = { escape: true };
const BACKSPACE: Partial<Key> = { backspace: true };
const DOWN: Partial<Key> = { downArrow: true };
const UP: Partial<Key> = { upArrow: true };

function loaded(): ExplorerState {
  return reduce(initialState, { type: 'loaded', report: reportFixture(), columns: FAKE_COLUMNS });
}

function labels(state: ExplorerState): string[] {
  return shownSlices(state).map((s) => s.label);
}

describe('loading', () => {
  it('starts in report order with nothing marked, the picker preset to the grouping', () => {
    const s = loaded();
    expect(s.mode).toBe('table');
    expect(s.sortKey).toBe('rank');
    expect(labels(s)).toEqual([LABEL.s5, LABEL.s2, LABEL.s7, LABEL.s4, LABEL.s1, LABEL.s3, LABEL.s9]);
    expect(selectedSlice(s)?.label).toBe(LABEL.s5);
    expect([...s.picked]).toEqual(['station', 'lighting']); // fixture's `by`
    expect(s.request).toBeNull();
  });

  it('before the report: q quits, Ctrl-C quits with 130, other keys do nothing', () => {
    expect(press(initialState, 'q').request).toEqual({ kind: 'exit', code: 0 });
    expect(press(initialState, 'c', { ctrl: true }).request).toEqual({ kind: 'exit', code: 130 });
    expect(press(initialState, 'j')).toBe(initialState);
    expect(press(initialState, '', ENTER)).toBe(initialState);
  });
});

describe('moving', () => {
  it('moves with arrows and j/k, clamped at both ends', () => {
    let s = loaded();
    s = press(s, '', UP);
    expect(s.cursor).toBe(0);
    s = keys(s, DOWN, 'j');
    expect(s.cursor).toBe(2);
    s = press(s, 'k');
    expect(s.cursor).toBe(1);
    s = keys(s, 'j', 'j', 'j', 'j', 'j', 'j', 'j');
    expect(s.cursor).toBe(6); // 7 slices
  });

  it('moves a page with PgUp/PgDn and to the ends with Home/End', () => {
    let s = reduce(loaded(), { type: 'page', page: 3 });
    expect(s.page).toBe(3);
    s = press(s, '', { pageDown: true });
    expect(s.cursor).toBe(3);
    s = press(s, '', { pageDown: true });
    expect(s.cursor).toBe(6);
    s = press(s, '', { pageDown: true });
    expect(s.cursor).toBe(6);
    s = press(s, '', { pageUp: true });
    expect(s.cursor).toBe(3);
    s = press(s, '', { home: true });
    expect(s.cursor).toBe(0);
    s = press(s, '', { end: true });
    expect(s.cursor).toBe(6);
    expect(selectedSlice(s)?.label).toBe(LABEL.s9);
  });

  it('keeps the state object when the page size does not change', () => {
    const s = loaded();
    expect(reduce(s, { type: 'page', page: s.page })).toBe(s);
  });
});

describe('sorting', () => {
  it('cycles s through SORT_KEYS in order (definition in src/tui/model.ts), names A→Z', () => {
    let s = loaded();
    const seen: string[] = [];
    for (let i = 0; i < SORT_KEYS.length; i++) {
      s = press(s, 's');
      seen.push(s.sortKey);
      expect(s.descending, s.sortKey).toBe(s.sortKey !== 'name');
    }
    expect(seen).toEqual([...SORT_KEYS.slice(1), SORT_KEYS[0]]);
  });

  it('reverses with r', () => {
    const s = press(loaded(), 'r');
    expect(s.descending).toBe(false);
    expect(labels(s)).toEqual([LABEL.s9, LABEL.s3, LABEL.s1, LABEL.s4, LABEL.s7, LABEL.s2, LABEL.s5]);
    expect(press(s, 'r').descending).toBe(true);
  });

  it('jumps to headroom, largest first, with h from any sort and direction', () => {
    // headroom totals (fixture): S5 .02, S2 .01375, S7 .0105, S4 .00192, S1 .0008, S3 0, S9 null
    const headroomOrder = [LABEL.s5, LABEL.s2, LABEL.s7, LABEL.s4, LABEL.s1, LABEL.s3, LABEL.s9];
    let s = loaded();
    for (let i = 0; i < SORT_KEYS.length; i++) {
      for (const reversed of [false, true]) {
        const from = reversed ? press(s, 'r') : s;
        const after = press(from, 'h');
        expect(after.sortKey, `from ${from.sortKey}`).toBe('headroom');
        expect(after.descending).toBe(true);
        expect(labels(after)).toEqual(headroomOrder);
      }
      s = press(s, 's');
    }
    // from the detail pane too
    const detail = press(press(loaded(), 'r'), '', ENTER);
    expect(press(detail, 'h')).toMatchObject({ sortKey: 'headroom', descending: true, mode: 'detail' });
  });

  it('keeps the selection on the same slice across re-sorts', () => {
    let s = press(loaded(), 'j'); // S2, index 1 in report order
    s = press(s, 'r'); // S9 S3 S1 S4 S7 S2 S5
    expect(s.cursor).toBe(5);
    expect(selectedSlice(s)?.label).toBe(LABEL.s2);
    s = keys(s, 's', 's'); // yield (descending): S2 .0061 first
    expect(s.sortKey).toBe('yield');
    expect(s.cursor).toBe(0);
    expect(selectedSlice(s)?.label).toBe(LABEL.s2);
    s = keys(s, 's', 's', 's', 's', 's', 's'); // name A→Z: S1 S2 S3 …
    expect(s.sortKey).toBe('name');
    expect(selectedSlice(s)?.label).toBe(LABEL.s2);
    expect(s.cursor).toBe(1);
  });
});

describe('filtering', () => {
  it('types a draft, edits it, applies it with Enter', () => {
    let s = press(loaded(), '/');
    expect(s.mode).toBe('filter');
    expect(s.draft).toBe('');
    s = keys(s, 'd', 'o', 'm', 'e', 'x', BACKSPACE);
    expect(s.draft).toBe('dome');
    expect(s.filter).toBe(''); // not applied while typing
    s = press(s, '', ENTER);
    expect(s.mode).toBe('table');
    expect(s.filter).toBe('dome');
    expect(labels(s)).toEqual([LABEL.s5, LABEL.s3, LABEL.s9]);
  });

  it('treats q, s and space as text while typing, and strips control characters', () => {
    let s = keys(loaded(), '/', 'q', 's', ' ');
    expect(s.mode).toBe('filter');
    expect(s.request).toBeNull();
    expect(s.draft).toBe('qs ');
    s = press(s, 'a\u0007b\u007f');
    expect(s.draft).toBe('qs ab');
    expect(press(s, '', { delete: true }).draft).toBe('qs a');
  });

  it('clears the filter with Esc, in the prompt and in the table', () => {
    let s = keys(loaded(), '/', 'r', 'i', 'n', 'g', ENTER);
    expect(labels(s)).toEqual([LABEL.s2, LABEL.s1]);
    expect(press(s, '/').draft).toBe('ring'); // the prompt starts from the filter
    const cleared = keys(s, '/', ESC);
    expect(cleared).toMatchObject({ mode: 'table', filter: '' });
    expect(press(s, '', ESC).filter).toBe('');
  });

  it('keeps the selected slice when it survives the filter, else goes to the first', () => {
    let s = press(loaded(), '', { end: true }); // S9
    s = keys(s, '/', 'd', 'o', 'm', 'e', ENTER); // S5 S3 S9
    expect(selectedSlice(s)?.label).toBe(LABEL.s9);
    expect(s.cursor).toBe(2);
    s = keys(s, '/', BACKSPACE, BACKSPACE, BACKSPACE, BACKSPACE, 'f', 'l', 'a', 'g', 'g', 'e', 'd', ENTER); // S5 S2 S7
    expect(s.cursor).toBe(0);
    expect(selectedSlice(s)?.label).toBe(LABEL.s5);
  });

  it('does not open the detail pane when nothing is shown', () => {
    const s = keys(loaded(), '/', 'z', 'z', ENTER);
    expect(labels(s)).toEqual([]);
    expect(press(s, '', ENTER).mode).toBe('table');
    expect(selectedSlice(s)).toBeUndefined();
  });
});

describe('grouping picker', () => {
  it('opens on g with the report grouping ticked, moves within the columns', () => {
    let s = press(loaded(), 'g');
    expect(s.mode).toBe('picker');
    expect(s.pickerCursor).toBe(0);
    expect([...s.picked].sort()).toEqual(['lighting', 'station']);
    s = keys(s, 'k', UP);
    expect(s.pickerCursor).toBe(0);
    s = keys(s, 'j', DOWN, 'j', 'j');
    expect(s.pickerCursor).toBe(2); // three columns
  });

  it('toggles with space and asks for a regroup by the picked columns, in column order', () => {
    let s = keys(loaded(), 'g', 'j', ' ', 'j', ' '); // lighting off, shift on
    expect([...s.picked].sort()).toEqual(['shift', 'station']);
    const before = s.requestId;
    s = press(s, '', ENTER);
    expect(s.request).toEqual({ kind: 'regroup', by: ['station', 'shift'] });
    expect(s.requestId).toBe(before + 1);
    expect(s.mode).toBe('table');
    expect(s.busy).toBe('regrouping…');
  });

  it('asks for the overview ([]) when nothing is picked', () => {
    const s = keys(loaded(), 'g', ' ', 'j', ' ', ENTER);
    expect(s.request).toEqual({ kind: 'regroup', by: [] });
  });

  it('cancels with Esc without a request; other keys do nothing there', () => {
    let s = keys(loaded(), 'g', ' ', 'q', 'x');
    expect(s.mode).toBe('picker');
    expect(s.request).toBeNull();
    s = press(s, '', ESC);
    expect(s.mode).toBe('table');
    expect(s.request).toBeNull();
    // reopening starts again from the report's grouping
    expect([...press(s, 'g').picked].sort()).toEqual(['lighting', 'station']);
  });

  it('takes the new report: marks cleared, cursor at the top, message shown, detail closed', () => {
    let s = keys(loaded(), ' ', 'j', ENTER); // marks S5 (cursor → S2), j → S7, opens the detail pane
    expect(s.marked.size).toBe(1);
    expect(s.mode).toBe('detail');
    s = reduce(s, { type: 'regrouped', report: regroupedFixture(), message: 'grouped by lighting' });
    expect(s).toMatchObject({ mode: 'table', cursor: 0, busy: null, message: 'grouped by lighting' });
    expect(s.marked.size).toBe(0);
    expect(labels(s)).toEqual(['lighting=dome', 'lighting=ring', 'lighting=diffuse']); // regroupedFixture (hand-built)
  });
});

describe('detail pane', () => {
  it('opens and closes with Enter (Esc also closes)', () => {
    const s = press(loaded(), '', ENTER);
    expect(s.mode).toBe('detail');
    expect(press(s, '', ENTER).mode).toBe('table');
    expect(press(s, '', ESC).mode).toBe('table');
  });

  it('scrolls with ↑↓ j k and PgUp/PgDn, never above the top', () => {
    let s = reduce(press(loaded(), '', ENTER), { type: 'page', page: 5 });
    s = keys(s, 'j', DOWN, 'j');
    expect(s.detailScroll).toBe(3);
    expect(s.cursor).toBe(0); // the selection stays
    s = press(s, '', { pageDown: true });
    expect(s.detailScroll).toBe(8);
    s = press(s, '', { pageUp: true });
    expect(s.detailScroll).toBe(3);
    s = keys(s, 'k', UP, 'k', 'k', 'k');
    expect(s.detailScroll).toBe(0);
  });

  it('shows the previous and next slice with ←/→, resetting the scroll', () => {
    let s = keys(loaded(), '', ENTER, 'j', 'j');
    s = press(s, '', { rightArrow: true });
    expect(s).toMatchObject({ mode: 'detail', cursor: 1, detailScroll: 0 });
    expect(selectedSlice(s)?.label).toBe(LABEL.s2);
    s = keys(s, { leftArrow: true }, { leftArrow: true });
    expect(s.cursor).toBe(0);
  });

  it('breaks down by the next column with d', () => {
    let s = keys(loaded(), ENTER, 'j', 'd');
    expect(s).toMatchObject({ drillIndex: 1, detailScroll: 0 });
    s = press(s, 'd');
    expect(s.drillIndex).toBe(2);
  });
});

describe('marks and export', () => {
  it('marks with space and moves down; space again unmarks', () => {
    let s = keys(loaded(), ' ', ' ');
    expect([...s.marked].sort()).toEqual([LABEL.s2, LABEL.s5].sort());
    expect(s.cursor).toBe(2);
    s = keys(s, 'k', ' ');
    expect([...s.marked]).toEqual([LABEL.s5]);
    // on the last slice: marks and stays
    s = keys(s, { end: true }, ' ');
    expect(s.marked.has(LABEL.s9)).toBe(true);
    expect(s.cursor).toBe(6);
  });

  it('asks for the path with e, proposing the default', () => {
    const s = press(loaded(), 'e');
    expect(s).toMatchObject({ mode: 'export-path', draft: FAKE_EXPORT_PATH });
  });

  it('exports the marked slices (report array order) to a new file', () => {
    const s = keys(loaded(), ' ', 'j', 'j', ' ', 'e', ENTER); // marks S5, then S4
    expect(s.request).toEqual({
      kind: 'export',
      path: FAKE_EXPORT_PATH,
      force: false,
      slices: [reportFixture().slices[1], reportFixture().slices[3]], // S5, S4 in the fixture's array order
    });
    expect(s.mode).toBe('table');
    expect(s.busy).toBe('exporting 2 slices…');
  });

  it('exports the flagged slices when none is marked', () => {
    const s = keys(loaded(), 'e', ENTER);
    expect(s.request?.kind).toBe('export');
    if (s.request?.kind !== 'export') return;
    expect(s.request.slices.map((x) => x.label)).toEqual([LABEL.s2, LABEL.s5, LABEL.s7]); // flagged, array order
  });

  it('takes an edited path, trimmed', () => {
    const s = keys(loaded(), 'e', ...Array<Partial<Key>>(FAKE_EXPORT_PATH.length).fill(BACKSPACE), 'o', 'u', 't', '.', 'c', 's', 'v', ' ', ENTER);
    expect(s.request).toMatchObject({ kind: 'export', path: 'out.csv', force: false });
  });

  it('refuses an empty path', () => {
    const s = keys(loaded(), 'e', ...Array<Partial<Key>>(FAKE_EXPORT_PATH.length).fill(BACKSPACE), ' ', ENTER);
    expect(s).toMatchObject({ mode: 'export-path', message: 'export: give a file name', request: null });
  });

  it('asks before overwriting an existing file: y exports with force, n cancels', () => {
    const confirm = press(press(loaded(), 'e'), '', ENTER, true);
    expect(confirm.mode).toBe('export-confirm');
    expect(confirm.request).toBeNull();
    const yes = press(confirm, 'y');
    expect(yes.request).toMatchObject({ kind: 'export', path: FAKE_EXPORT_PATH, force: true });
    expect(press(confirm, 'Y').request).toMatchObject({ force: true });
    const no = press(confirm, 'n');
    expect(no).toMatchObject({ mode: 'table', request: null, message: 'export cancelled: the file was kept' });
    expect(press(confirm, '', ESC).request).toBeNull();
  });

  it('says so when there is nothing to export', () => {
    const report = reportFixture();
    const none = reduce(initialState, { type: 'loaded', report: { ...report, slices: report.slices.map((x) => ({ ...x, flagged: false })) }, columns: [] });
    const s = keys(none, 'e', ENTER);
    expect(s).toMatchObject({ mode: 'table', request: null, message: 'nothing to export: no slice is marked or flagged' });
  });

  it('cancels the path prompt with Esc', () => {
    expect(keys(loaded(), 'e', ESC)).toMatchObject({ mode: 'table', request: null });
  });
});

describe('help, intervals and quitting', () => {
  it('opens help with ?, closes it with any key but q', () => {
    const help = press(loaded(), '?');
    expect(help.mode).toBe('help');
    expect(press(help, 'j')).toMatchObject({ mode: 'table', cursor: 0 });
    expect(press(help, 'q').request).toEqual({ kind: 'exit', code: 0 });
  });

  it('toggles interval half-widths with i', () => {
    expect(press(loaded(), 'i').intervals).toBe(true);
    expect(keys(loaded(), 'i', 'i').intervals).toBe(false);
  });

  it('quits with q (exit 0) from the table and the detail pane', () => {
    expect(press(loaded(), 'q').request).toEqual({ kind: 'exit', code: 0 });
    expect(keys(loaded(), ENTER, 'q').request).toEqual({ kind: 'exit', code: 0 });
  });

  it('quits with Ctrl-C (exit 130) from every mode, even while typing', () => {
    const modes = [loaded(), press(loaded(), '/'), press(loaded(), 'e'), press(press(loaded(), 'e'), '', ENTER, true), press(loaded(), 'g'), press(loaded(), '?'), press(loaded(), '', ENTER)];
    expect(modes.map((s) => s.mode)).toEqual(['table', 'filter', 'export-path', 'export-confirm', 'picker', 'help', 'detail']);
    for (const s of modes) expect(press(s, 'c', { ctrl: true }).request, s.mode).toEqual({ kind: 'exit', code: 130 });
  });

  it('numbers every request, so the same request twice runs twice', () => {
    const once = press(loaded(), 'q');
    const twice = press(once, 'q');
    expect(twice.request).toEqual(once.request);
    expect(twice.requestId).toBe(once.requestId + 1);
  });

  it('ignores keys without a meaning', () => {
    const s = loaded();
    expect(press(s, 'x')).toBe(s);
    expect(press(s, 'Z')).toBe(s);
  });
});

describe('a burst of keys', () => {
  it('applies each key to the state the previous one left', () => {
    // j j space → S7 marked, cursor on S4; / flag Enter → only S5 S2 S7 shown, S4 filtered out → cursor 0;
    // h → headroom order S5 S2 S7; End → S7; Enter → detail; → stays on the last; q → exit
    const seq: (string | Partial<Key>)[] = ['j', 'j', ' ', '/', 'f', 'l', 'a', 'g', ENTER, 'h', { end: true }, ENTER, { rightArrow: true }];
    const s = keys(loaded(), ...seq);
    expect(s).toMatchObject({ mode: 'detail', filter: 'flag', sortKey: 'headroom', descending: true, cursor: 2 });
    expect([...s.marked]).toEqual([LABEL.s7]);
    expect(selectedSlice(s)?.label).toBe(LABEL.s7);
    expect(press(s, 'q').request).toEqual({ kind: 'exit', code: 0 });
  });

  it('takes a chunk of text typed at once in the prompts, control characters stripped', () => {
    expect(press(press(loaded(), '/'), 'do\u0000me').draft).toBe('dome');
    expect(press(press(loaded(), 'e'), '.bak').draft).toBe(`${FAKE_EXPORT_PATH}.bak`);
  });
});

describe('the discovered view (f)', () => {
  // a discovery of two slices built from fixture slices (hand-built): S3 · dome found on bias (rank 1),
  // S1 · ring on variance (rank 2); only the fields the reducer reads are filled in
  const report = reportFixture();
  const of = (rank: number, to: number, part: 'bias' | 'variance'): DiscoveredSlice =>
    ({ ...report.slices.find((s) => s.rank === rank)!, rank: to, part, part_headroom: { value: 0.01 * to, lo: 0.005 }, lift: { part, value: 0.02, lo: 0.01, hi: 0.03, p: 0.01, over: {} } }) as unknown as DiscoveredSlice;
  const discovery = { slices: [of(6, 1, 'bias'), of(5, 2, 'variance')] } as unknown as Discovery;

  it('starts the search once, keeps each view where it was, and lists the discovery when it comes', () => {
    let s = keys(loaded(), 'j', 'j', ' ', 's'); // the grouping: S4 selected after marking S7, sorted by headroom
    const grouping = { cursor: s.cursor, marked: [...s.marked], sortKey: s.sortKey };
    s = press(s, 'f');
    expect(s.view).toBe('found');
    expect(s.search).toEqual({ done: 0, total: 0 });
    expect(shownSlices(s)).toEqual([]);
    expect([s.cursor, [...s.marked], s.sortKey]).toEqual([0, [], 'rank']);
    s = reduce(s, { type: 'search-progress', done: 3, total: 45 });
    expect(s.search).toEqual({ done: 3, total: 45 });
    s = press(s, 'f');
    expect(s.view).toBe('grouping');
    expect({ cursor: s.cursor, marked: [...s.marked], sortKey: s.sortKey }).toEqual(grouping);
    expect(s.search).toEqual({ done: 3, total: 45 }); // still running
    s = reduce(s, { type: 'discovered', discovery });
    expect(s.search).toBeNull();
    expect(s.message).toBe('slice search done: 2 slices found (f shows them)');
    s = keys(s, 'f', 'j', ' ');
    expect(labels(s)).toEqual([LABEL.s3, LABEL.s1]);
    expect([...s.marked]).toEqual([LABEL.s1]);
    s = keys(s, 'f', 'f');
    expect(s.search).toBeNull(); // never a second search
    expect([...s.marked]).toEqual([LABEL.s1]);
  });

  it('cycles its own sorts: rank, headroom (point), lift, name', () => {
    let s = reduce(press(loaded(), 'f'), { type: 'discovered', discovery });
    const seen: string[] = [];
    for (let i = 0; i < 4; i++) {
      s = press(s, 's');
      seen.push(s.sortKey);
    }
    expect(seen).toEqual(['headroom', 'lift', 'name', 'rank']);
    s = press(s, 'h');
    expect(labels(s)).toEqual([LABEL.s1, LABEL.s3]); // headroom 0.02 before 0.01 (the values above)
  });

  it('exports the marked discovered slices, or all listed ones when none is marked', () => {
    const exported = (st: ExplorerState) => (st.request?.kind === 'export-found' ? st.request.slices.map((x) => x.label) : null);
    let s = reduce(press(loaded(), 'f'), { type: 'discovered', discovery });
    s = keys(s, 'e', ENTER);
    expect(s.request).toMatchObject({ kind: 'export-found', path: FAKE_EXPORT_PATH, force: false });
    expect(exported(s)).toEqual([LABEL.s3, LABEL.s1]);
    s = keys(s, 'j', ' ', 'e', ENTER);
    expect(exported(s)).toEqual([LABEL.s1]);
  });

  it('goes back to the grouping when the search fails, and may search again', () => {
    let s = press(loaded(), 'f');
    s = reduce(s, { type: 'search-failed', message: 'slice search failed: preds.csv went away' });
    expect([s.view, s.search, s.message]).toEqual(['grouping', null, 'slice search failed: preds.csv went away']);
    expect(press(s, 'f').search).toEqual({ done: 0, total: 0 });
  });
});
