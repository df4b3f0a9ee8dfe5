/**
 * The rules of the search on hand-built cells: a one-column effect, a pure two-column interaction,
 * an effect split over two children (folding), a child explained by one parent but not the other,
 * nested columns, a depth-3 chain and a negative lift. Every cell holds 4,000 train and 4,000 dev rows,
 * unweighted, at an exact floor of 5 %, so each gap is plain arithmetic on the error rates stated in
 * the test (hand-computed values, stated beside each assertion). The rows are large enough that every
 * planted gap of 5 points or more is significant and every zero gap is exactly zero.
 */
import { describe, expect, it } from 'vitest';
import { discover } from '../../src/discover/search.js';
import { liftOf, type Decomposed } from '../../src/discover/lift.js';
import { restOf } from '../../src/discover/rest.js';
import { DISCOVER_DEFAULTS, type DiscoverOptions, type Discovery } from '../../src/discover/types.js';
import { rollupSlices, type SliceStats } from '../../src/slices/rollup.js';
import { draft, triage } from '../../src/triage/triage.js';
import { DEFAULT_TRIAGE_OPTIONS } from '../../src/triage/types.js';
import type { ReportContext } from '../../src/triage/report.js';
import { cellsOf, type CellRecord } from '../helpers/cell-records.js';

const N = 4000;
const FLOOR = 0.05;
const CONTEXT: ReportContext = { inputs: [], roles: {}, where: null, version: 'test', warnings: [] };

/** Train and dev cells of one key: train error `train`, dev error `dev` (default: the same). */
function cell(key: Record<string, string>, train: number, dev = train): CellRecord[] {
  return (['train', 'dev'] as const).map((split) => {
    const p = split === 'train' ? train : dev;
    return { key, split, run: null, rows: N, weight: N, weightSq: N, errors: Math.round(p * N), floorSum: FLOOR * N, floorEntry: -1, floorN: null, costSum: 0, costWeight: 0, audit: null };
  });
}

/** Every key of the cross of `values` (column → its values), with the train error `errorOf` gives it. */
function cross(values: Record<string, string[]>, errorOf: (key: Record<string, string>) => number): CellRecord[] {
  let keys: Record<string, string>[] = [{}];
  for (const [col, vals] of Object.entries(values)) keys = keys.flatMap((k) => vals.map((v) => ({ ...k, [col]: v })));
  return keys.flatMap((k) => cell(k, errorOf(k)));
}

function run(records: CellRecord[], options: Partial<DiscoverOptions> = {}): Discovery {
  const cells = cellsOf(records);
  return discover(cells, cells.columns, CONTEXT, DEFAULT_TRIAGE_OPTIONS, { ...DISCOVER_DEFAULTS, depth: 3, all: true, top: 100, ...options });
}

/** A slice decomposed as triage does (6 cells' dev rows in all), for a lift. */
function dec(s: SliceStats): Decomposed {
  const r = draft(s, 6 * N, new Set(['train', 'dev'] as const), DEFAULT_TRIAGE_OPTIONS, null);
  return { stats: s, error: r.error, floor: r.floor };
}

const listed = (d: Discovery) => d.slices.filter((s) => s.explained_by.length === 0).map((s) => s.label);
const folded = (d: Discovery) => Object.fromEntries(d.slices.filter((s) => s.explained_by.length > 0).map((s) => [s.label, s.explained_by]));

describe('discover on hand-built cells', () => {
  it('a one-column effect is listed as one condition, and none of its children or the slices it dilutes into', () => {
    // A=a1 at train error 15 %, everything else 5 %; dev = train (no variance); floor 5 %
    const d = run(cross({ A: ['a0', 'a1'], B: ['b0', 'b1', 'b2'] }, (k) => (k.A === 'a1' ? 0.15 : 0.05)), { depth: 2 });
    expect(listed(d)).toEqual(['A=a1']);
    expect(folded(d)).toEqual({});
    const s = d.slices[0];
    expect(s.part).toBe('bias');
    // bias 15 − 5 = 10 points; the rest of all rows (A=a0) has bias 0: lift 10 points (hand arithmetic)
    expect(s.gaps.avoidable_bias!.value).toBeCloseTo(0.1, 12);
    expect(s.lift.value).toBeCloseTo(0.1, 12);
    expect(s.lift.over).toEqual({});
    // share 1/2 of the dev rows: part headroom 5 points (hand arithmetic)
    expect(s.part_headroom.value).toBeCloseTo(0.05, 12);
    expect(s.parents).toHaveLength(1);
    // 5 one-column slices (2 + 3) and 6 two-column ones (2 × 3), all examined
    expect(d.counts).toMatchObject({ candidates: 11, examined: 11, thin: 0, skipped: 0, nested: 0, found: 1 });
  });

  it('a pure interaction is listed with both conditions, and its single columns are not', () => {
    // train error 15 % on a1·b1 and a0·b0, 5 % on a1·b0 and a0·b1: every single column averages 10 %,
    // as do all rows, so no single slice adds to the rest (hand arithmetic)
    const d = run(cross({ A: ['a0', 'a1'], B: ['b0', 'b1'] }, (k) => ((k.A === 'a1') === (k.B === 'b1') ? 0.15 : 0.05)), { depth: 2 });
    expect(listed(d).sort()).toEqual(['A=a0 · B=b0', 'A=a1 · B=b1']);
    const s = d.slices.find((x) => x.label === 'A=a1 · B=b1')!;
    expect(s.conditions).toEqual({ A: 'a1', B: 'b1' });
    // bias 10 points; the rest of A=a1 (a1·b0) and of B=b1 (a0·b1) both have bias 0: lift 10 points
    expect(s.lift.value).toBeCloseTo(0.1, 12);
    expect(s.parents.map((p) => p.lift.value)).toEqual([expect.closeTo(0.1, 12), expect.closeTo(0.1, 12)]);
  });

  it('an effect split over two children: the parent is folded into them', () => {
    // train error 20 % on a1·b1 and a1·b2, 5 % elsewhere (3 values of B)
    const d = run(cross({ A: ['a0', 'a1'], B: ['b0', 'b1', 'b2'] }, (k) => (k.A === 'a1' && k.B !== 'b0' ? 0.2 : 0.05)), { depth: 2 });
    expect(listed(d).sort()).toEqual(['A=a1 · B=b1', 'A=a1 · B=b2']);
    // A=a1 is found (bias (20 + 20 + 5)/3 − 5 = 10 points, lift 10 over A=a0) and folded: its rows outside
    // the two children (a1·b0) have bias 0; B=b1 (bias 7.5, lift 3.75 over B≠b1) folds into a1·b1
    expect(folded(d)).toEqual({ 'A=a1': ['A=a1 · B=b1', 'A=a1 · B=b2'], 'B=b1': ['A=a1 · B=b1'], 'B=b2': ['A=a1 · B=b2'] });
    const s = d.slices.find((x) => x.label === 'A=a1 · B=b1')!;
    // over the rest of A=a1 (a1·b0 at 5 %, a1·b2 at 20 %: bias 7.5) the lift is 15 − 7.5 = 7.5 points,
    // over the rest of B=b1 (a0·b1, bias 0) 15 points: the weakest parent is A=a1 (hand arithmetic)
    expect(s.lift.value).toBeCloseTo(0.075, 12);
    expect(s.lift.over).toEqual({ A: 'a1' });
    expect(d.counts.folded).toBe(3);
    // the same cells in another order (a multi-threaded scan returns them in any order): the same output
    const reversed = run(cross({ A: ['a0', 'a1'], B: ['b0', 'b1', 'b2'] }, (k) => (k.A === 'a1' && k.B !== 'b0' ? 0.2 : 0.05)).reverse(), { depth: 2 });
    expect(reversed.slices.map((x) => [x.label, x.rank, x.explained_by])).toEqual(d.slices.map((x) => [x.label, x.rank, x.explained_by]));
  });

  it('a child explained by one parent but not the other is not listed', () => {
    // as the first test: the whole of A=a1 at 15 %; the child a1·b1 has a large lift over the rest of
    // B=b1 (a0·b1) but none over the rest of A=a1
    const records = cross({ A: ['a0', 'a1'], B: ['b0', 'b1', 'b2'] }, (k) => (k.A === 'a1' ? 0.15 : 0.05));
    const cells = cellsOf(records);
    const [a1] = rollupSlices(cells, ['A']).filter((s) => s.key.A === 'a1');
    const [b1] = rollupSlices(cells, ['B']).filter((s) => s.key.B === 'b1');
    const [c] = rollupSlices(cells, ['A', 'B']).filter((s) => s.key.A === 'a1' && s.key.B === 'b1');
    // lift over the rest of A=a1: bias 10 − 10 = 0; over the rest of B=b1: 10 − 0 = 10 points (hand arithmetic)
    expect(liftOf('bias', dec(c), dec(restOf(a1, c)), false, 0.95)!.value).toBeCloseTo(0, 12);
    expect(liftOf('bias', dec(c), dec(restOf(b1, c)), false, 0.95)!.value).toBeCloseTo(0.1, 12);
    expect(listed(run(records, { depth: 2 }))).toEqual(['A=a1']);
  });

  it('nested columns: a pair that is the same rows as its parent is dropped, the two names of the rows overlap fully', () => {
    // board Q1 lies in package P1 and P1 holds only Q1; train error 15 % on Q1, 5 % elsewhere
    const records = [
      ...cell({ P: 'p1', Q: 'q1' }, 0.15),
      ...cell({ P: 'p0', Q: 'q2' }, 0.05),
      ...cell({ P: 'p0', Q: 'q3' }, 0.05),
    ];
    const d = run(records, { depth: 2 });
    expect(listed(d)).toEqual(['P=p1', 'Q=q1']);
    // the pair P=p1 · Q=q1 leaves nothing of either parent: nested (and so are p0·q2 and p0·q3 under Q)
    expect(d.counts.nested).toBe(3);
    const second = d.slices[1];
    expect(second.overlap).toEqual([{ label: 'P=p1', share: 1 }]);
  });

  it('a depth-3 chain lists only the slice of all three conditions', () => {
    // train error 25 % on a1·b1·c1, 5 % elsewhere: every parent and grandparent is found and folded
    const d = run(cross({ A: ['a0', 'a1'], B: ['b0', 'b1'], C: ['c0', 'c1'] }, (k) => (k.A === 'a1' && k.B === 'b1' && k.C === 'c1' ? 0.25 : 0.05)));
    expect(listed(d)).toEqual(['A=a1 · B=b1 · C=c1']);
    const s = d.slices[0];
    // bias 20 points; each parent's rest (e.g. a1·b1·c0) has bias 0: lift 20 points (hand arithmetic)
    expect(s.lift.value).toBeCloseTo(0.2, 12);
    const triple = ['A=a1 · B=b1 · C=c1'];
    expect(folded(d)).toEqual({ 'A=a1': triple, 'B=b1': triple, 'C=c1': triple, 'A=a1 · B=b1': triple, 'A=a1 · C=c1': triple, 'B=b1 · C=c1': triple });
  });

  it('a negative lift: a slice with a real gap below its parent\'s rest is not listed', () => {
    // A=a1 at 15 % under b1 and b2 but 10 % under b0; A=a0 at 5 %
    const records = cross({ A: ['a0', 'a1'], B: ['b0', 'b1', 'b2'] }, (k) => (k.A === 'a0' ? 0.05 : k.B === 'b0' ? 0.1 : 0.15));
    const cells = cellsOf(records);
    const [a1] = rollupSlices(cells, ['A']).filter((s) => s.key.A === 'a1');
    const [c] = rollupSlices(cells, ['A', 'B']).filter((s) => s.key.A === 'a1' && s.key.B === 'b0');
    // a1·b0: bias 5 points (significant); the rest of A=a1 has bias 10: lift −5 points (hand arithmetic)
    const lift = liftOf('bias', dec(c), dec(restOf(a1, c)), false, 0.95)!;
    expect(lift.value).toBeCloseTo(-0.05, 12);
    expect(lift.hi).toBeLessThan(0);
    const d = run(records, { depth: 2 });
    expect(listed(d)).not.toContain('A=a1 · B=b0');
    expect(listed(d)).toContain('A=a1');
  });

  it('the found slice carries the report\'s decomposition of the same slice', () => {
    const records = cross({ A: ['a0', 'a1'], B: ['b0', 'b1', 'b2'] }, (k) => (k.A === 'a1' ? 0.15 : 0.05));
    const cells = cellsOf(records);
    const d = run(records, { depth: 1 });
    const overall = rollupSlices(cells, [])[0];
    const report = triage(rollupSlices(cells, ['A']), overall, DEFAULT_TRIAGE_OPTIONS).slices.find((s) => s.label === 'A=a1')!;
    expect(d.slices[0].error).toEqual(report.error);
    expect(d.slices[0].floor).toEqual(report.floor);
    expect(d.slices[0].gaps.avoidable_bias!.value).toBe(report.gaps.avoidable_bias!.value);
  });
});
