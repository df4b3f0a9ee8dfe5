/**
 * Natural breaks (optimal 1-D k-means, through simple-statistics' ckmeans). The main check is an
 * exhaustive search written here: every way to cut the sorted values into k runs, the one with the
 * least within-group sum of squares. Other values: the Ckmeans.1d.dp package's own test suite, and
 * hand arithmetic on invented numbers.
 */
import { describe, expect, it } from 'vitest';
import { naturalBreaks } from '../../src/stats/natural-breaks.js';
import { Random } from '../../src/demo/random.js';

/** Within-group sum of squared deviations of a run of values (two passes: mean, then squares). */
function withinSs(run: readonly number[]): number {
  const m = run.reduce((a, b) => a + b, 0) / run.length;
  return run.reduce((a, b) => a + (b - m) * (b - m), 0);
}

/** Sum of withinSs over the runs `sorted` falls into when cut before each index of `cuts`. */
function cost(sorted: readonly number[], cuts: readonly number[]): number {
  const bounds = [0, ...cuts, sorted.length];
  let total = 0;
  for (let j = 0; j + 1 < bounds.length; j++) total += withinSs(sorted.slice(bounds[j], bounds[j + 1]));
  return total;
}

/** The exhaustive search: every choice of k − 1 cut positions among the n − 1 gaps, the cheapest. */
function bruteForce(sorted: readonly number[], k: number): { cost: number; cuts: number[] } {
  let best = { cost: Infinity, cuts: [] as number[] };
  const choose = (from: number, left: number, cuts: number[]) => {
    if (left === 0) {
      const c = cost(sorted, cuts);
      if (c < best.cost) best = { cost: c, cuts: [...cuts] };
      return;
    }
    for (let i = from; i <= sorted.length - left; i++) choose(i + 1, left - 1, [...cuts, i]);
  };
  choose(1, k - 1, []);
  return best;
}

/** The cut positions the edges give: the number of sorted values below each edge. */
function cutsOf(sorted: readonly number[], edges: readonly number[]): number[] {
  return edges.map((e) => sorted.filter((v) => v < e).length);
}

const ascending = (xs: readonly number[]) => [...xs].sort((a, b) => a - b);

describe('naturalBreaks against an exhaustive search over all split points', () => {
  // invented inputs: 6 to 12 values from a seeded generator (src/demo/random.ts, mulberry32, seed 20110)
  const rng = new Random(20110);
  const inputs: number[][] = [];
  for (let t = 0; t < 8; t++) {
    const n = 6 + (t % 7);
    inputs.push(Array.from({ length: n }, () => rng.normal(t % 2 ? 50 : 0, t % 3 ? 1 : 20)));
  }

  for (const [t, values] of inputs.entries()) {
    for (const k of [2, 3, 4]) {
      it(`input ${t + 1} (${values.length} values), k = ${k}: the cheapest cut, and its edges halfway between the runs`, () => {
        const sorted = ascending(values);
        const best = bruteForce(sorted, k);
        const edges = naturalBreaks(values, k);
        expect(edges).toHaveLength(k - 1);
        const cuts = cutsOf(sorted, edges);
        // exhaustive search in this file: the same runs, so the same within-group sum of squares
        expect(cuts).toEqual(best.cuts);
        expect(cost(sorted, cuts)).toBeCloseTo(best.cost, 12);
        // each edge is the midpoint of the last value of one run and the first of the next (our rule)
        for (const [j, c] of cuts.entries()) expect(edges[j]).toBe(sorted[c - 1] / 2 + sorted[c] / 2);
      });
    }
  }

  it('with repeated values (one decimal), the cheapest cut too: repeats are counted', () => {
    // invented inputs: seeded as above (seed 2), rounded to one decimal so that values repeat
    const r = new Random(2);
    for (let t = 0; t < 6; t++) {
      const values = Array.from({ length: 11 }, () => Math.round(r.between(0, 2) * 10) / 10);
      const sorted = ascending(values);
      for (const k of [2, 3, 4]) {
        if (new Set(values).size < k) continue;
        const best = bruteForce(sorted, k);
        const edges = naturalBreaks(values, k);
        // exhaustive search in this file: no cheaper cut exists (ties may pick another cut of equal cost)
        expect(cost(sorted, cutsOf(sorted, edges))).toBeCloseTo(best.cost, 12);
      }
    }
  });
});

describe('naturalBreaks on published and hand-worked examples', () => {
  it('the Ckmeans.1d.dp example: three groups -1, 2 and 4–6', () => {
    // Ckmeans.1d.dp (R package, Wang & Song), tests/testthat/test_Ckmeans.1d.dp.R, "Given the number
    // of clusters": x = (-1, 2, -1, 2, 4, 5, 6, -1, 2, -1), k = 3 gives sizes 4, 3, 3, centers -1, 2, 5
    // and tot.withinss 2; the edges halfway between the groups: (-1 + 2)/2 = 0.5, (2 + 4)/2 = 3
    const x = [-1, 2, -1, 2, 4, 5, 6, -1, 2, -1];
    expect(naturalBreaks(x, 3)).toEqual([0.5, 3]);
    // the same package's weighted example, x = (-1, 2, 4, 5, 6) with weights (4, 3, 1, 1, 1), is this
    // input with the weights as repeats: the same groups
    expect(cost(ascending(x), cutsOf(ascending(x), [0.5, 3]))).toBe(2);
  });

  it('repeats pull the break: five values near 1 and one 9', () => {
    // hand arithmetic on invented numbers: {1,1,1} | {2,2,9} costs 0 + 32.67, {1,1,1,2,2} | {9} costs
    // 1.2 + 0, so the edge is (2 + 9)/2 = 5.5
    expect(naturalBreaks([9, 1, 2, 1, 2, 1], 2)).toEqual([5.5]);
  });

  it('Wang & Song (2011) print no table of values to check against', () => {
    // The R Journal 3(2):29–33 shows its examples as figures only; the exhaustive search above is the check.
    // hand arithmetic on invented numbers: two well-separated pairs, one edge between them
    expect(naturalBreaks([1, 2, 10, 11], 2)).toEqual([6]);
  });
});

describe('naturalBreaks on degenerate inputs', () => {
  it('fewer distinct values than bins: each value its own group', () => {
    // hand arithmetic: 1, 2, 3 in five bins are three groups, edges 1.5 and 2.5
    expect(naturalBreaks([3, 1, 2], 5)).toEqual([1.5, 2.5]);
    expect(naturalBreaks([3, 1, 2, 3, 1], 5)).toEqual([1.5, 2.5]);
  });

  it('one value, no value, one bin: no edge', () => {
    expect(naturalBreaks([7, 7, 7], 3)).toEqual([]);
    expect(naturalBreaks([7], 2)).toEqual([]);
    expect(naturalBreaks([], 4)).toEqual([]);
    expect(naturalBreaks([1, 2, 3], 1)).toEqual([]);
  });

  it('values whose squares overflow or underflow a double are cut as their scaled copies are', () => {
    // hand arithmetic: as [1, 2, 10, 11] (edge 6), times 1e200 and 1e-200 (to 1e-15 relative: the
    // decimal values are not exact doubles)
    const [big] = naturalBreaks([1e200, 2e200, 10e200, 11e200], 2);
    expect(big / 6e200).toBeCloseTo(1, 15);
    const [tiny] = naturalBreaks([1e-200, 2e-200, 10e-200, 11e-200], 2);
    expect(tiny / 6e-200).toBeCloseTo(1, 15);
    // hand arithmetic: two pairs near ±1.65e308, the edge halfway between -1.6e308 and 1.6e308
    expect(naturalBreaks([-1.7e308, -1.6e308, 1.6e308, 1.7e308], 2)).toEqual([0]);
  });

  it('rejects values that are not finite, and a number of bins that is not a whole number ≥ 1', () => {
    expect(() => naturalBreaks([1, Number.NaN], 2)).toThrow(/naturalBreaks: values\[1\] must be a finite number, got NaN/);
    expect(() => naturalBreaks([1, Infinity], 2)).toThrow(RangeError);
    expect(() => naturalBreaks([1, 2], 0)).toThrow(/naturalBreaks: bins must be a whole number >= 1, got 0/);
    expect(() => naturalBreaks([1, 2], 2.5)).toThrow(RangeError);
  });
});
