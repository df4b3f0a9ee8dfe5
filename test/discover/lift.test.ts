/**
 * The lift's terms: a slice's gap minus the gap of its parent's rest as a combination of independent
 * proportions, floors by entry. Expected values: hand arithmetic on the invented counts below, and the
 * interval of the same terms built by hand through moverInterval (itself checked against Newcombe
 * 1998 Table II, statsmodels and scipy in test/stats/mover-interval.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { liftOf, type Decomposed } from '../../src/discover/lift.js';
import { restOf } from '../../src/discover/rest.js';
import type { SliceStats } from '../../src/slices/rollup.js';
import { moverInterval, moverPValue } from '../../src/stats/index.js';
import type { Rate } from '../../src/triage/types.js';

const rate = (x: number, n: number): Rate => ({ value: x / n, lo: 0, hi: 1, n });
const stats = (parts: { entry: number; weight: number; floorSum: number; n: number | null }[]): SliceStats => ({ key: {}, splits: {}, floorParts: parts, devFloorParts: [], audit: null });
const floor = { value: 0, dev: null, lo: null, hi: null, n: null, source: 'table' as const };

describe('liftOf', () => {
  // C: 200 train errors in 1,000 rows; 600 rows on floor entry 0 (5 %, from 400 audited rows), 400 on
  // entry 1 (10 %, exact). R: 100 in 1,000; 200 rows on entry 0, 800 on entry 1.
  const c: Decomposed = {
    stats: stats([{ entry: 0, weight: 600, floorSum: 30, n: 400 }, { entry: 1, weight: 400, floorSum: 40, n: null }]),
    error: { train: rate(200, 1000), train_dev: null, dev: rate(150, 1000), test: null },
    floor,
  };
  const r: Decomposed = {
    stats: stats([{ entry: 0, weight: 200, floorSum: 10, n: 400 }, { entry: 1, weight: 800, floorSum: 80, n: null }]),
    error: { train: rate(100, 1000), train_dev: null, dev: rate(120, 1000), test: null },
    floor,
  };

  it('bias: the floors enter by entry, in the difference of their shares', () => {
    const lift = liftOf('bias', c, r, false, 0.95)!;
    // (0.20 − (0.6·0.05 + 0.4·0.10)) − (0.10 − (0.2·0.05 + 0.8·0.10)) = 0.13 − 0.01 = 0.12 (hand arithmetic)
    expect(lift.value).toBeCloseTo(0.12, 12);
    // terms: +C train, −R train, entry 0 with coefficient −(0.6 − 0.2) = −0.4 (20 of 400), entry 1 exact:
    // offset −(0.4 − 0.8) · 0.10 = +0.04
    const terms = [{ coef: 1, x: 200, n: 1000 }, { coef: -1, x: 100, n: 1000 }, { coef: -0.4, x: 20, n: 400 }];
    const want = moverInterval(terms, 0.95, 0.04)!;
    expect(lift.lo).toBeCloseTo(want.lo, 12);
    expect(lift.hi).toBeCloseTo(want.hi, 12);
    expect(lift.p).toBeCloseTo(moverPValue(terms, 0.04)!, 12);
  });

  it('an entry both take in the same share cancels', () => {
    const same: Decomposed = { ...r, stats: stats([{ entry: 0, weight: 600, floorSum: 30, n: 400 }, { entry: 1, weight: 400, floorSum: 40, n: null }]) };
    const lift = liftOf('bias', c, same, false, 0.95)!;
    // the floors are equal: the lift is 0.20 − 0.10, with the interval of two rates alone (hand arithmetic)
    expect(lift.value).toBeCloseTo(0.1, 12);
    const want = moverInterval([{ coef: 1, x: 200, n: 1000 }, { coef: -1, x: 100, n: 1000 }], 0.95, 0)!;
    expect(lift.lo).toBeCloseTo(want.lo, 12);
  });

  it('variance without train_dev: (dev − train) of C minus that of R', () => {
    const lift = liftOf('variance', c, r, false, 0.95)!;
    // (0.15 − 0.20) − (0.12 − 0.10) = −0.07 (hand arithmetic): a negative lift
    expect(lift.value).toBeCloseTo(-0.07, 12);
    expect(lift.hi).toBeLessThan(0);
  });

  it('a missing rate gives no lift', () => {
    expect(liftOf('mismatch', c, r, true, 0.95)).toBeNull();
  });
});

describe('restOf', () => {
  it('the parent minus the child, split by split and entry by entry', () => {
    const split = (rows: number, errors: number) => ({ rows, weight: rows, weightSq: rows, errors, floorSum: rows * 0.05, costSum: 0, costWeight: 0 });
    const parent: SliceStats = { key: { a: 'x' }, splits: { train: split(100, 10), dev: split(50, 5) }, floorParts: [{ entry: 0, weight: 100, floorSum: 5, n: 30 }], devFloorParts: [], audit: null };
    const child: SliceStats = { key: { a: 'x', b: 'y' }, splits: { train: split(40, 6), dev: split(50, 5) }, floorParts: [{ entry: 0, weight: 40, floorSum: 2, n: 30 }], devFloorParts: [], audit: null };
    const rest = restOf(parent, child);
    // 100 − 40 train rows with 10 − 6 errors; no dev row left (hand arithmetic)
    expect(rest.splits.train).toMatchObject({ rows: 60, errors: 4, weight: 60 });
    expect(rest.splits.dev).toBeUndefined();
    expect(rest.floorParts).toEqual([{ entry: 0, weight: 60, floorSum: 3, n: 30 }]);
    expect(rest.key).toEqual({ a: 'x' });
  });
});
