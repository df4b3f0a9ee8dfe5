// Must come first: chalk decides on colour when ink loads it (see the helper).
import { restoreColorEnv } from '../helpers/force-color.js';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import yargs from 'yargs';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { Analysis } from '../../src/app/analysis.js';
import { explorerData } from '../../src/app/explorer-data.js';
import { explorerExporter } from '../../src/cli/commands/explore-terminal.js';
import type { ExploreArgs } from '../../src/cli/commands/explore.js';
import { commandOptions } from '../../src/cli/options.js';
import { discover, discoverAsync } from '../../src/discover/search.js';
import { DISCOVER_DEFAULTS, type DiscoveredSlice, type Discovery } from '../../src/discover/types.js';
import { count, points, pointsInterval, pValue, signedPoints } from '../../src/render/format.js';
import type { Duck } from '../../src/sql/duck.js';
import { displayWidth } from '../../src/terminal/width.js';
import type { ExplorerData } from '../../src/tui/data.js';
import { FOUND_HINT, FOUND_HINT_ASCII, HINT } from '../../src/tui/keys.js';
import { parseCsv, records } from '../helpers/engine-fixture.js';
import { KEY, linesOf, renderExplorer, settle, type Explorer, type ExplorerProps } from '../helpers/ink-frame.js';
import { Captured } from '../helpers/run-main.js';
import { FLOORS, SAMPLE, sampleAnalysis } from '../helpers/sample-analysis.js';

restoreColorEnv();

// The explorer's discovered view (key f) on real data: the demo sample (data-samples/, seed 24)
// analysed as `floorgap explore` loads it (test/helpers/sample-analysis.ts). Expected values come from
// discover() on the same cells with the default search options (DISCOVER_DEFAULTS) and the
// explorer's triage options; numbers are formatted with src/render/format.ts as the screen does.
// The search runs in 45 steps there: 9 candidate columns at depth 2 give 9 + 36 column sets (hand arithmetic).

let duck: Duck;
let analysis: Analysis;
let want: Discovery;
let dir: string;
const open: Explorer[] = [];

beforeAll(async () => {
  ({ duck, analysis } = await sampleAnalysis());
  want = discover(analysis.loaded.table, analysis.loaded.overviewColumns, analysis.context, analysis.options, DISCOVER_DEFAULTS);
  dir = mkdtempSync(join(tmpdir(), 'floorgap-found-'));
}, 60_000);
afterAll(() => {
  duck.close();
  rmSync(dir, { recursive: true, force: true });
});
afterEach(() => {
  while (open.length > 0) open.pop()?.unmount();
});

async function explorer(props: ExplorerProps): Promise<Explorer> {
  const x = renderExplorer(props);
  open.push(x);
  await settle();
  return x;
}

function screen(x: Explorer): string[] {
  return linesOf(x.frame()).map((l) => l.trimEnd());
}

/** Waits (turn by turn) until the screen passes `test`. */
async function until(x: Explorer, test: (lines: string[]) => boolean, what: string, ms = 20_000): Promise<string[]> {
  const deadline = Date.now() + ms;
  while (!test(screen(x))) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}:\n${screen(x).join('\n')}`);
    await settle(1);
  }
  return screen(x);
}

const searched = (x: Explorer) => until(x, (l) => l.some((s) => s.startsWith('discovered slices (f: back) · ') && s.includes(' found · ')), 'the search to end');

function expectFits(x: Explorer, columns: number, rows: number): void {
  const lines = linesOf(x.frame());
  expect(lines.length).toBeLessThanOrEqual(rows - 1);
  for (const l of lines) expect(displayWidth(l), l).toBeLessThanOrEqual(columns);
}

/** A pause the test opens step by step: the search waits in it after each step until released. */
function gate() {
  let waiting: (() => void)[] = [];
  let opened = false;
  return {
    pause: () => (opened ? Promise.resolve() : new Promise<void>((r) => waiting.push(r))),
    async step() {
      waiting.shift()?.();
      await settle();
    },
    async open() {
      opened = true;
      for (const r of waiting.splice(0)) r();
      await settle();
    },
  };
}

/** The explorer's data on the sample, its search held by `g` (and every search's signal recorded). */
function gatedData(g: ReturnType<typeof gate>, signals: AbortSignal[] = []): ExplorerData {
  const real = explorerData(duck, analysis, null);
  return {
    ...real,
    discover(onProgress, signal) {
      signals.push(signal);
      return discoverAsync(analysis.loaded.table, analysis.loaded.overviewColumns, analysis.context, analysis.options, DISCOVER_DEFAULTS, { onProgress, signal, pause: g.pause });
    },
  };
}

/** A discovered table row as the 80-column table lays it out (foundColumns in src/tui/found.ts: conditions 24 wide). */
function row80(s: DiscoveredSlice): string {
  const gap = s.part === 'bias' ? s.gaps.avoidable_bias : s.part === 'variance' ? s.gaps.variance : s.gaps.mismatch;
  const label = s.label.length > 24 ? `${s.label.slice(0, 23)}…` : s.label.padEnd(24);
  return [
    ' ',
    String(s.rank).padStart(3),
    label,
    s.part.padEnd(8),
    `${points(s.part_headroom.lo, 2)} (${points(s.part_headroom.value, 2)})`.padStart(13),
    signedPoints(s.lift.value).padStart(6),
    signedPoints(gap?.value).padStart(6),
    pValue(s.q).padStart(6),
    points(s.error.dev?.value).padStart(5),
  ].join(' ');
}

describe('f: the discovered slices', () => {
  it('searches in the background the first time, with a progress line, while the keys keep working; f goes back and forth', async () => {
    const g = gate();
    const signals: AbortSignal[] = [];
    // 100 columns, so that the grouping's status line holds the whole progress note
    const x = await explorer({ data: gatedData(g, signals), columns: 100 });
    const before = screen(x);
    expect(before[1]).toMatch(/^grouping overview \(one-column slices\)/);
    await x.press('f');
    let lines = screen(x);
    // the first roll-up ran, then the search waits in the gate: 1 of 45
    expect(lines[1]).toBe('discovered slices (f: back) · searching slices: column sets 1 of 45');
    expect(lines[2]).toBe('caution: a discovered slice is a lead to investigate, not a verdict');
    expect(lines[4]).toBe('  searching slices: column sets 1 of 45');
    expect(lines[21]).toBe('sort rank ↓ · 0 slices · 0 marked  searching slices: column sets 1 of 45');
    expect(lines[22]).toBe(FOUND_HINT);
    await g.step();
    await g.step();
    expect(screen(x)[21]).toMatch(/searching slices: column sets 3 of 45$/);
    // back to the grouping while it searches: the table moves, the progress stays on the status line
    await x.press('f', 'j', 'j');
    lines = screen(x);
    expect(lines.slice(0, 4)).toEqual(before.slice(0, 4));
    expect(lines[21]).toMatch(new RegExp(`· 3/${analysis.report.slices.length}  searching slices: column sets 3 of 45$`));
    expect(lines[22]).toBe(`${HINT.slice(0, 99)}…`);
    await g.step();
    expect(screen(x)[21]).toMatch(/column sets 4 of 45$/);
    await g.open();
    lines = await until(x, (l) => l[21].includes('slice search done'), 'the search to end');
    expect(lines[21]).toMatch(new RegExp(`· 3/\\d+  slice search done: ${want.slices.length} slices found \\(f shows them\\)$`));
    // f shows them; back with f and again with f: one search for the session
    await x.press('f');
    expect(screen(x)[1]).toBe(`discovered slices (f: back) · ${want.slices.length} found · ${count(want.counts.examined)} examined · ${count(want.counts.hypotheses)} tests`);
    await x.press('f', 'f');
    expect(screen(x)[1]).toMatch(/^discovered slices \(f: back\) · \d+ found/);
    expect(signals).toHaveLength(1);
    expect(x.exits).toEqual([]);
  }, 60_000);

  it('lists what discover() finds on the same cells, ranked, within 80×24', async () => {
    const x = await explorer({ data: explorerData(duck, analysis, null) });
    await x.press('f');
    const lines = await searched(x);
    expect(want.slices.length).toBeGreaterThan(1);
    // a 1-column mark, the rank right-aligned in 3, then the conditions (24 wide)
    expect(lines[3]).toBe('    # conditions               part     headroom (pt)   lift    gap      q   dev');
    want.slices.forEach((s, i) => expect(lines[4 + i]).toBe(row80(s)));
    expect(lines[4 + want.slices.length]).toBe('');
    expect(lines[21]).toBe(`sort rank ↓ · ${want.slices.length} slices · 0 marked · 1/${want.slices.length}  ${want.slices.length} slices found`);
    expectFits(x, 80, 24);
    expect(linesOf(x.frame())).toHaveLength(23);
  }, 60_000);

  it('sorts by rank, headroom (point), lift and name; h sorts by headroom', async () => {
    const x = await explorer({ data: explorerData(duck, analysis, null) });
    await x.press('f');
    await searched(x);
    const order = () => screen(x).slice(4, 4 + want.slices.length).map((l) => Number(l.slice(2, 5)));
    const ranksBy = (f: (s: DiscoveredSlice) => number | string, desc: boolean) =>
      [...want.slices].sort((a, b) => (f(a) < f(b) ? (desc ? 1 : -1) : f(a) > f(b) ? (desc ? -1 : 1) : a.rank - b.rank)).map((s) => s.rank);
    const seen: [string, number[]][] = [];
    for (let i = 0; i < 4; i++) {
      await x.press('s');
      seen.push([screen(x)[21].split(' · ')[0], order()]);
    }
    expect(seen).toEqual([
      ['sort headroom (point) ↓', ranksBy((s) => s.part_headroom.value, true)],
      ['sort lift ↓', ranksBy((s) => s.lift.value, true)],
      ['sort name ↑', ranksBy((s) => s.label, false)],
      ['sort rank ↓', want.slices.map((s) => s.rank)],
    ]);
    await x.press('h');
    expect(screen(x)[21].split(' · ')[0]).toBe('sort headroom (point) ↓');
  }, 60_000);

  it('says no slice passed, with what was examined and tested, when the search lists nothing', async () => {
    // a headroom of 50 points asked of every slice (hand-chosen): no slice of the sample comes near it
    const strict = await sampleAnalysis({ 'min-headroom': 0.5 });
    try {
      const none = discover(strict.analysis.loaded.table, strict.analysis.loaded.overviewColumns, strict.analysis.context, strict.analysis.options, DISCOVER_DEFAULTS);
      expect(none.slices).toEqual([]);
      const x = await explorer({ data: explorerData(strict.duck, strict.analysis, null) });
      await x.press('f');
      const lines = await searched(x);
      expect(lines[1]).toBe(`discovered slices (f: back) · 0 found · ${count(none.counts.examined)} examined · ${count(none.counts.hypotheses)} tests`);
      expect(lines[4]).toBe(`  no slice passed: ${count(none.counts.examined)} examined, ${count(none.counts.hypotheses)} tests at a false discovery rate of 5%`);
      await x.press(KEY.enter, 'e', KEY.enter);
      expect(screen(x)[21]).toMatch(/nothing to export: no slice passed the search$/);
    } finally {
      strict.duck.close();
    }
  }, 60_000);
});

describe('the detail pane of a discovered slice', () => {
  it("shows its own numbers and its parents', its overlaps, and moves with ← →", async () => {
    const x = await explorer({ data: explorerData(duck, analysis, null), columns: 120, rows: 40 });
    await x.press('f');
    await searched(x);
    await x.press(KEY.enter);
    const lines = screen(x);
    const s = want.slices[0];
    expect(lines[3]).toBe(`${s.label}  focus ${s.focus}  ${s.flagged ? '* flagged' : 'not flagged'}  rank 1`);
    expect(lines[4]).toBe(`found on ${s.part} · headroom ${points(s.part_headroom.lo, 2)} (point ${points(s.part_headroom.value, 2)}) of overall dev error · q ${pValue(s.q)}`);
    expect(lines[5]).toBe(`  lift ${signedPoints(s.lift.value)} ${pointsInterval(s.lift.lo, s.lift.hi, true)} over all other rows (the weakest parent)`);
    expect(lines[6]).toBe('  a discovered slice is a lead to investigate, not a verdict');
    // one condition: its one parent is all rows, whose numbers are the overall's
    expect(s.parents).toHaveLength(1);
    const p = s.parents[0];
    expect(lines[7]).toBe(`  ${'parent'.padEnd(24)} ${'gap'.padStart(6)} ${'dev'.padStart(5)} ${'floor'.padStart(5)} ${'share'.padStart(5)} ${'lift'.padStart(6)}  95% interval`);
    expect(lines[8]).toBe(
      `  ${'all rows'.padEnd(24)} ${signedPoints(p.gap?.value).padStart(6)} ${points(p.dev_error?.value).padStart(5)} ${points(p.floor).padStart(5)} ${'100%'.padStart(5)} ${signedPoints(p.lift.value).padStart(6)}  ${pointsInterval(p.lift.lo, p.lift.hi, true)}`,
    );
    expect(p.dev_error?.value).toBe(want.overall.error.dev?.value);
    expect(lines[9]).toBe('overlap  none with a higher-ranked discovered slice');
    // the slice's own numbers, as the normal pane shows a slice
    expect(lines).toContain(`  ${'dev'.padEnd(15)}${points(s.error.dev?.value).padStart(6)}  ${pointsInterval(s.error.dev?.lo, s.error.dev?.hi).padEnd(15)}  n ${count(Math.round(s.error.dev!.n))}`);
    await x.press(KEY.right);
    const second = want.slices[1];
    expect(screen(x)[3]).toMatch(new RegExp(`^${second.label.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}  focus .*  rank 2$`));
    const overlaps = second.overlap.map((o) => `#${want.slices.find((w) => w.label === o.label)!.rank} ${o.label} ${Math.round(o.share! * 100)}%`);
    expect(screen(x)[9]).toBe(overlaps.length ? `overlap  ${overlaps.join(' · ')} of its dev rows` : 'overlap  none with a higher-ranked discovered slice');
    await x.press(KEY.left);
    expect(screen(x)[3].startsWith(`${s.label}  focus`)).toBe(true);
    expectFits(x, 120, 40);
  }, 60_000);
});

describe('marks and export in the discovered view', () => {
  it("space marks a discovered slice and e writes its rows, each with the slice's part as focus", async () => {
    const argv = ['explore', SAMPLE, '--floor-table', FLOORS, '--threads', '1', '--no-cache'];
    let args: ExploreArgs | null = null;
    await yargs(argv)
      .strict()
      .command('explore [files..]', '', (y) => commandOptions(y, 'explore'), (a) => {
        args = a as unknown as ExploreArgs;
      })
      .parseAsync();
    const io = { stdout: new Captured(), stderr: new Captured(), env: process.env, cwd: process.cwd() };
    const out = join(dir, 'marked.csv');
    const x = await explorer({ data: explorerData(duck, analysis, explorerExporter(args!, io, argv)), defaultExportPath: () => out, columns: 120, rows: 40 });
    await x.press('f');
    await searched(x);
    await x.press('j', ' '); // marks the second discovered slice
    const marked = want.slices[1];
    expect(screen(x)[5].startsWith('+   2 ')).toBe(true);
    await x.press('e', KEY.enter);
    const lines = await until(x, (l) => /wrote \d+ rows/.test(l[37]), 'the export', 30_000);
    // its train and dev rows (the export's default splits), counted in the sample itself
    const rows = records(parseCsv(readFileSync(SAMPLE, 'utf8')));
    const n = rows.filter((r) => (r.split === 'train' || r.split === 'dev') && Object.entries(marked.key).every(([k, v]) => r[k] === v)).length;
    expect(n).toBeGreaterThan(0);
    expect(lines[37]).toContain(`wrote ${n} rows of 1 slice to ${out}`);
    const written = records(parseCsv(readFileSync(out, 'utf8')));
    expect(written).toHaveLength(n);
    expect(new Set(written.map((r) => r.fg_focus))).toEqual(new Set([marked.part]));
    expect(new Set(written.map((r) => r.fg_slice))).toEqual(new Set([marked.label]));
  }, 60_000);
});

describe('other keys in the discovered view', () => {
  it('g regroups and shows the grouping; Esc in the picker keeps the discovered view', async () => {
    const x = await explorer({ data: explorerData(duck, analysis, null) });
    await x.press('f');
    await searched(x);
    await x.press('g', KEY.escape);
    expect(screen(x)[1]).toMatch(/^discovered slices \(f: back\) · /);
    await x.press('g', ' ', KEY.enter); // station
    const lines = await until(x, (l) => l[1].startsWith('grouping by station'), 'the regroup');
    expect(lines[21]).toMatch(/grouped by station$/);
    await x.press('f'); // the discovered slices come back as they were, without a new search
    expect(screen(x)[1]).toMatch(/^discovered slices \(f: back\) · \d+ found/);
  }, 60_000);

  it('writes no colour with color={false}, and ASCII hints with --ascii', async () => {
    const x = await explorer({ data: explorerData(duck, analysis, null), color: false, ascii: true });
    await x.press('f');
    await searched(x);
    await x.press(' ', KEY.enter, KEY.right, KEY.enter, 's', '?', 'x');
    const sgr = new Set<string>();
    for (const f of x.frames) for (const m of f.matchAll(/\x1b\[([0-9;]*)m/g)) for (const p of m[1].split(';')) sgr.add(p);
    // bold on/off and the inverse cursor only (as in test/tui/App.test.tsx): no colour, no dim
    expect([...sgr].sort()).toEqual(['1', '22', '27', '7']);
    expect(screen(x)[22]).toBe(`${FOUND_HINT_ASCII.slice(0, 79)}…`);
    expect(x.frame()).not.toMatch(/[↑↓⏎␣]/);
  }, 60_000);
});

describe('quitting during the search', () => {
  it('q exits at once and stops the search at its next step', async () => {
    const g = gate();
    const signals: AbortSignal[] = [];
    const x = await explorer({ data: gatedData(g, signals) });
    await x.press('f');
    await g.step();
    expect(screen(x)[21]).toMatch(/column sets 2 of 45$/);
    await x.press('q');
    expect(x.exits.map((e) => e.code)).toEqual([0]);
    x.unmount(); // as the CLI does on exit (src/cli/commands/explore-terminal.tsx)
    expect(signals.map((s) => s.aborted)).toEqual([true]);
    const frames = x.frames.length;
    await g.open(); // the search wakes, sees the abort and ends: nothing more is drawn
    await settle(10);
    expect(x.frames.length).toBe(frames);
  }, 60_000);
});
