/**
 * `discover`: the search over conjunctions of 1 to `depth` conditions for slices whose gap is real,
 * adds to every simpler slice, and survives false-discovery control (docs/method.md, "Discovered
 * slices"). Pure: cells and options in, the discovery out.
 */
import type { CellTable } from '../cells/cell-table.js';
import { runsOf } from '../cells/cell-table.js';
import { error } from '../core/errors.js';
import { SPLITS, type Split } from '../core/split.js';
import { rollupSlices, type SliceStats } from '../slices/rollup.js';
import { benjaminiHochberg, benjaminiYekutieli } from '../stats/index.js';
import { chooseRun, EMPTY, sliceExtras, sliceId, type ReportContext } from '../triage/report.js';
import { draft, triage } from '../triage/triage.js';
import type { Gap, SliceReport, TriageOptions } from '../triage/types.js';
import { columnSets, headroomBound, outsideCells, overlapShare, parentKeys } from './lattice.js';
import { liftOf, type Decomposed, type LiftEstimate } from './lift.js';
import { restOf } from './rest.js';
import { PARTS, type DiscoveredSlice, type Discovery, type DiscoverOptions, type Lift, type Part } from './types.js';

/** What the search reports while it runs: groupings rolled up of all. */
export type DiscoverProgress = (done: number, total: number) => void;

/** The largest depth grouping-sets cells allow (they hold every column and every pair). */
const SETS_DEPTH = 2;

/** The report's thin rule on sums: fewer than min-rows train or dev rows, or no weight there. */
function isThin(s: SliceStats, minRows: number): boolean {
  const t = s.splits.train;
  const d = s.splits.dev;
  return !t || !d || t.rows < minRows || d.rows < minRows || !(t.weight > 0) || !(d.weight > 0);
}

/** One-sided p-value for "the value is above 0" from a two-sided one. */
function oneSided(value: number, p: number): number {
  return value > 0 ? p / 2 : 1 - p / 2;
}

function partGap(r: Pick<SliceReport, 'gaps'>, part: Part): Gap | null {
  return part === 'bias' ? r.gaps.avoidable_bias : part === 'variance' ? r.gaps.variance : r.gaps.mismatch;
}

interface Candidate {
  readonly stats: SliceStats;
  readonly id: string;
  readonly depth: number;
  status: 'thin' | 'skipped' | 'examined' | 'nested';
  report: SliceReport | null;
  /** per part: index in the family, and the lifts over each parent (computed only while they can matter) */
  tests: { part: Part; index: number; gap: Gap; lifts: (LiftEstimate & { over: Record<string, string> })[]; complete: boolean }[];
}

/**
 * Checks the search options against the cells: depth 1 to 3, and at most 2 on grouping sets.
 * @throws FloorgapError naming the option and what to do
 */
function checkDiscoverOptions(cells: CellTable, columns: readonly string[], d: DiscoverOptions): void {
  if (!Number.isInteger(d.depth) || d.depth < 1 || d.depth > 3) throw error(`--depth ${d.depth}: expected 1, 2 or 3 conditions per slice`);
  if (!cells.cross && d.depth > SETS_DEPTH) {
    throw error(
      `--depth ${d.depth}: the cells are grouping sets (the full cross of the ${columns.length} slice columns is larger than --max-cells), which hold every column and every pair but no triple; use --depth 2, or name fewer columns with --slice-cols (or raise --max-cells) so the full cross fits`,
    );
  }
  if (!(d.minLift >= 0)) throw error(`--min-lift ${d.minLift}: expected a lift of 0 points or more`);
  if (!Number.isInteger(d.top) || d.top < 1) throw error(`--top ${d.top}: expected a whole number of slices, at least 1`);
}

/**
 * Searches the lattice of conjunctions of the candidate `columns` for discovered slices.
 * @example
 * discover(cells, ['station', 'lighting'], ctx, DEFAULT_TRIAGE_OPTIONS, DISCOVER_DEFAULTS).slices[0].label; // => 'station=S2 · lighting=dome'
 */
export function discover(
  cells: CellTable,
  columns: readonly string[],
  context: ReportContext,
  o: TriageOptions,
  d: DiscoverOptions,
  onProgress?: DiscoverProgress,
): Discovery {
  const steps = searchSteps(cells, columns, context, o, d);
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
    if (step.value) onProgress?.(step.value.done, step.value.total);
  }
}

/** How {@link discoverAsync} reports and can be stopped. */
export interface DiscoverAsyncOptions {
  readonly onProgress?: DiscoverProgress;
  /** stops the search at its next step; the promise then rejects with the signal's reason */
  readonly signal?: AbortSignal;
  /** how the search yields between steps; the default gives the event loop a turn (setImmediate) */
  readonly pause?: () => Promise<void>;
}

const nextTurn = () => new Promise<void>((r) => setImmediate(r));

/**
 * The same search as {@link discover}, giving the event loop a turn after each column set's roll-up
 * (and after the tests), so a screen stays responsive while it runs; stopped early by `signal`.
 * @example
 * await discoverAsync(cells, ['station', 'lighting'], ctx, DEFAULT_TRIAGE_OPTIONS, DISCOVER_DEFAULTS, { signal }); // => the Discovery discover() returns
 */
export async function discoverAsync(
  cells: CellTable,
  columns: readonly string[],
  context: ReportContext,
  o: TriageOptions,
  d: DiscoverOptions,
  options: DiscoverAsyncOptions = {},
): Promise<Discovery> {
  const { onProgress, signal, pause = nextTurn } = options;
  signal?.throwIfAborted();
  const steps = searchSteps(cells, columns, context, o, d);
  // a stopped search's generator holds nothing but memory: it is left to the garbage collector
  for (;;) {
    const step = steps.next();
    if (step.done) return step.value;
    if (step.value) onProgress?.(step.value.done, step.value.total);
    await pause();
    signal?.throwIfAborted();
  }
}

/**
 * The search itself, one step at a time: it yields after each column set's roll-up (with how many of
 * them are done) and after the heavier later phases (null), and returns the discovery. `discover`
 * runs it straight through, `discoverAsync` with a turn of the event loop between steps.
 */
function* searchSteps(
  cells: CellTable,
  columns: readonly string[],
  context: ReportContext,
  o: TriageOptions,
  d: DiscoverOptions,
): Generator<{ done: number; total: number } | null, Discovery, void> {
  checkDiscoverOptions(cells, columns, d);
  const run = chooseRun(cells, o.run);
  const overall = rollupSlices(cells, [], run)[0] ?? EMPTY;
  const present = new Set(SPLITS.filter((s) => (overall.splits[s]?.rows ?? 0) > 0)) as Set<Split>;
  const trainDev = present.has('train_dev');
  const devTotal = overall.splits.dev?.weight ?? 0;
  const parts = PARTS.filter((p) => p !== 'mismatch' || trainDev);

  // every slice of every column set, one arquero roll-up per set
  const sets = columnSets(columns, d.depth);
  const groups: { by: string[]; slices: SliceStats[] }[] = [];
  for (const [i, by] of sets.entries()) {
    groups.push({ by, slices: rollupSlices(cells, by, run) });
    yield { done: i + 1, total: sets.length };
  }
  const extras = sliceExtras(groups, overall, o, null);

  // thin, skipped by the bound, or examined; a slice under a skipped one is skipped too (its bound is no larger)
  const all = new Map<string, Candidate>();
  for (const g of groups) {
    for (const stats of g.slices) {
      const id = sliceId(stats.key);
      const status = isThin(stats, o.minRows) ? 'thin' : d.prune !== false && headroomBound(stats, devTotal, trainDev) < o.minHeadroom ? 'skipped' : 'examined';
      all.set(id, { stats, id, depth: g.by.length, status, report: null, tests: [] });
    }
  }
  const examined = [...all.values()].filter((c) => c.status === 'examined');
  // each examined slice decomposed exactly as the report decomposes a slice
  const tri = triage(
    examined.map((c) => c.stats),
    overall,
    { ...o, run },
    extras,
  );
  const byId = new Map(tri.slices.map((r) => [sliceId(r.key), r]));
  yield null;

  // the family: one-sided intersection–union p-values, max(p_gap, p_lift over every parent)
  const family: number[] = [];
  for (const c of examined) {
    c.report = byId.get(c.id)!;
    const me: Decomposed = { stats: c.stats, error: c.report.error, floor: c.report.floor };
    const parentStats = parentKeys(c.stats.key).map((k) => (Object.keys(k).length === 0 ? overall : all.get(sliceId(k))?.stats ?? null));
    const rests: ({ key: Record<string, string>; rest: Decomposed } | null)[] = [];
    for (const p of parentStats) {
      if (!p) {
        rests.push(null);
        continue;
      }
      const rest = restOf(p, c.stats);
      if (isThin(rest, o.minRows)) {
        c.status = 'nested';
        break;
      }
      // the rest takes the prior of the child's grouping (its key stands in for the lookup)
      const dr = draft({ ...rest, key: c.stats.key }, devTotal, present, { ...o, run }, extras({ ...rest, key: c.stats.key }));
      rests.push({ key: { ...p.key }, rest: { stats: rest, error: dr.error, floor: dr.floor } });
    }
    for (const part of parts) {
      const gap = partGap(c.report, part);
      if (!gap || gap.p === null) continue;
      const index = family.length;
      if (c.status === 'nested') {
        family.push(1);
        continue;
      }
      let p = oneSided(gap.value, gap.p);
      const lifts: (LiftEstimate & { over: Record<string, string> })[] = [];
      // a test above the FDR level cannot be significant, and its exact value changes no q at or
      // below that level (docs/method.md): its lifts are not computed
      let complete = true;
      for (const r of rests) {
        if (p > o.fdr) {
          complete = false;
          break;
        }
        const lift = r ? liftOf(part, me, r.rest, trainDev, o.confidence) : null;
        if (!lift || !r) {
          p = 1;
          complete = false;
          break;
        }
        p = Math.max(p, oneSided(lift.value, lift.p));
        lifts.push({ ...lift, over: r.key });
      }
      family.push(p);
      c.tests.push({ part, index, gap, lifts, complete });
    }
  }
  const skipped = [...all.values()].filter((c) => c.status === 'skipped').length;
  for (let i = 0; i < skipped * parts.length; i++) family.push(1);
  const q = (o.fdrMethod === 'by' ? benjaminiYekutieli : benjaminiHochberg)(family);
  yield null;

  // found: significant, the gap's interval above 0, lift over every parent's rest ≥ min-lift, headroom ≥ min-headroom
  interface Found {
    c: Candidate;
    part: Part;
    q: number;
    lift: Lift;
    lifts: (LiftEstimate & { over: Record<string, string> })[];
    headroom: { value: number; lo: number };
  }
  const found: Found[] = [];
  for (const c of examined) {
    if (c.status !== 'examined') continue;
    let best: Found | null = null;
    for (const t of c.tests) {
      const qt = q[t.index]!;
      if (!t.complete || qt > o.fdr || t.gap.lo === null || !(t.gap.lo > 0)) continue;
      const weakest = t.lifts.reduce((a, b) => (b.value < a.value ? b : a));
      if (weakest.value < d.minLift || !(weakest.lo > 0)) continue;
      const share = c.report!.share;
      const headroom = { value: share * t.gap.value, lo: share * t.gap.lo };
      if (headroom.value < o.minHeadroom) continue;
      if (!best || headroom.value > best.headroom.value) {
        best = { c, part: t.part, q: qt, lifts: t.lifts, lift: { part: t.part, value: weakest.value, lo: weakest.lo, hi: weakest.hi, p: oneSided(weakest.value, weakest.p), over: weakest.over }, headroom };
      }
    }
    if (best) found.push(best);
  }

  // folding, deepest first: a found slice whose rows outside its listed found descendants show no gap
  // of its part (interval above 0) is explained by them
  const warnings = [...context.warnings];
  const explained = new Map<Found, string[]>();
  const listed: Found[] = [];
  let unfoldable = 0;
  const within = (inner: Readonly<Record<string, string>>, outer: Readonly<Record<string, string>>) =>
    Object.keys(inner).length > Object.keys(outer).length && Object.entries(outer).every(([k, v]) => inner[k] === v);
  for (const f of [...found].sort((a, b) => b.c.depth - a.c.depth)) {
    const desc = listed.filter((l) => within(l.c.stats.key, f.c.stats.key));
    if (desc.length === 0) {
      listed.push(f);
      continue;
    }
    const outside = outsideCells(cells, f.c.stats.key, desc.map((l) => l.c.stats.key), run);
    if (!outside) {
      unfoldable++;
      listed.push(f);
      continue;
    }
    const stats = rollupSlices(outside, [])[0];
    let folds = true;
    if (stats && !isThin(stats, o.minRows)) {
      const od = draft({ ...stats, key: f.c.stats.key }, devTotal, present, { ...o, run }, extras({ ...stats, key: f.c.stats.key }));
      const g = partGap(od, f.part);
      folds = !(g && g.lo !== null && g.lo > 0);
    }
    // by label: the order of the cells (a multi-threaded scan) must not change the output
    if (folds) explained.set(f, desc.map((l) => l.c.report!.label).sort());
    else listed.push(f);
  }
  if (unfoldable > 0) {
    warnings.push(
      `${unfoldable} found slice${unfoldable === 1 ? ' has' : 's have'} found slices beneath it on different column pairs; grouping-sets cells hold no set with all their columns, so ${unfoldable === 1 ? 'it is' : 'they are'} listed without testing whether those explain ${unfoldable === 1 ? 'it' : 'them'}`,
    );
  }
  if (!cells.cross) warnings.push('the cells are grouping sets: the search goes to depth 2 at most, and overlaps of slices on more than two columns are not known');

  // ranking by the lower end of the part headroom's interval (the point value beside it)
  const order = (a: Found, b: Found) => b.headroom.lo - a.headroom.lo || b.headroom.value - a.headroom.value || (a.c.report!.label < b.c.report!.label ? -1 : 1);
  listed.sort(order);
  const shown = listed.slice(0, d.top);
  const out: DiscoveredSlice[] = [];
  const asSlice = (f: Found, rank: number, explainedBy: string[]): DiscoveredSlice => {
    const overlap: { label: string; share: number | null }[] = [];
    for (const h of out) {
      const share = overlapShare(cells, f.c.stats.key, h.key, run);
      if (share === null || share > 0) overlap.push({ label: h.label, share });
    }
    return {
      ...f.c.report!,
      rank,
      conditions: f.c.stats.key,
      part: f.part,
      lift: f.lift,
      q: f.q,
      part_headroom: f.headroom,
      overlap,
      explained_by: explainedBy,
      parents: f.lifts.map((l) => {
        const pr = Object.keys(l.over).length === 0 ? tri.overall : byId.get(sliceId(l.over)) ?? null;
        return {
          conditions: l.over,
          label: pr?.label ?? 'overall',
          gap: pr ? partGap(pr, f.part) : null,
          dev_error: pr?.error.dev ?? null,
          floor: pr?.floor.value ?? 0,
          share: pr?.share ?? 0,
          lift: { value: l.value, lo: l.lo, hi: l.hi, p: oneSided(l.value, l.p) },
        };
      }),
    };
  };
  shown.forEach((f, i) => out.push(asSlice(f, i + 1, [])));
  if (d.all) {
    const folded = [...explained.keys()].sort(order);
    for (const f of folded) out.push(asSlice(f, 0, explained.get(f)!));
  }
  const count = (s: Candidate['status']) => [...all.values()].filter((c) => c.status === s).length;
  return {
    schema: 'floorgap.discover/1',
    settings: {
      depth: d.depth,
      min_rows: o.minRows,
      min_lift: d.minLift,
      min_headroom: o.minHeadroom,
      fdr: o.fdr,
      fdr_method: o.fdrMethod,
      confidence: o.confidence,
      top: d.top,
      all: d.all,
      columns: [...columns],
      cells: cells.cross ? 'cross' : 'sets',
    },
    source: { inputs: context.inputs, roles: context.roles, annotators: context.annotators ?? [], where: context.where, version: context.version },
    run,
    runs: runsOf(cells),
    counts: {
      candidates: all.size,
      examined: examined.length,
      thin: count('thin'),
      skipped,
      nested: count('nested'),
      hypotheses: family.length,
      found: found.length,
      folded: explained.size,
    },
    overall: tri.overall,
    slices: out,
    warnings,
  };
}
