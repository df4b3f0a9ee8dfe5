/**
 * Yield, flags and ranking. The yield formula is checked on invented numbers (hand arithmetic, the
 * python3 one-liner that printed each value beside it); the ranking on a hand-built report of eight
 * slices with a train_dev split and no test split.
 */
import { describe, expect, it } from 'vitest';
import { buildReport } from '../../src/triage/report.js';
import { labelsToHalve, sliceYield } from '../../src/triage/triage.js';
import type { Report, SliceReport, TriageOptions } from '../../src/triage/types.js';
import { CONTEXT, options, sliceCells } from '../helpers/cells.js';
import { expectClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const EXACT = 1e-15; // hand arithmetic on invented numbers

describe('sliceYield = share × (variance + mismatch)₊ × (1 − (n/(n+1000))^β) / cost', () => {
  it('worked example: share 0.2, variance 0.01, mismatch 0.03, n 3000, β 0.5, cost 2', () => {
    // invented numbers, hand arithmetic: 0.2 × 0.04 × (1 − √(3000/4000)) / 2 = 0.2 × 0.04 × 0.1339746 / 2
    // (python3: 0.2*(0.01+0.03)*(1-math.sqrt(3000/4000))/2 -> 0.0005358983848622456)
    expectClose(sliceYield(0.2, 0.01, 0.03, 3000, 0.5, 2), 0.0005358983848622456, EXACT);
  });

  it('β = 1, n = 1000: the gap halves per 1,000 rows', () => {
    // invented numbers, hand arithmetic: 0.1 × 0.02 × (1 − 1000/2000) / 1 = 0.001
    expectClose(sliceYield(0.1, 0.02, null, 1000, 1, 1), 0.001, EXACT);
  });

  it('a negative generalisation gap yields 0', () => {
    // invented numbers, hand arithmetic: (−0.01 + 0.005)₊ = 0
    expect(sliceYield(0.5, -0.01, 0.005, 1000, 0.5, 1)).toBe(0);
  });

  it('more rows already in the slice → smaller yield', () => {
    // invented numbers: same gap, n = 1,000 vs n = 100,000
    expect(sliceYield(0.1, 0.02, null, 100_000, 0.5, 1)).toBeLessThan(sliceYield(0.1, 0.02, null, 1000, 0.5, 1));
  });
});

// fixture (hand-built): invented numbers. Every slice has train, train_dev and dev rows, no test rows.
// rows (train, train_dev, dev) and errors (train, train_dev, dev):
//   V1 variance:        5000/5000/5000, 100/200/210, floor 2 %
//   M1 mismatch:        5000/5000/5000, 100/105/300, floor 2 %
//   B1 bias:            5000/5000/5000, 400/410/420, floor 2 %
//   B2 bias, small:     2000/2000/1000,  80/82/42,   floor 2 %
//   AF at-floor:        5000/5000/5000, 250/252/255, floor 5 %
//   UC unclear:          100/100/100,     4/5/6,     floor 2 %
//   V2 variance, small: 5000/5000/200,  100/200/8,   floor 2 %
//   TH thin:              20/20/20,       1/2/3,     floor 2 %
// all weighted dev rows: 4 × 5000 + 1000 + 100 + 200 + 20 = 21320
const DEV_TOTAL = 21320;
function three(name: string, rows: [number, number, number], errors: [number, number, number], floor: number) {
  return sliceCells({ s: name }, {
    train: { rows: rows[0], errors: errors[0], floor },
    train_dev: { rows: rows[1], errors: errors[1], floor },
    dev: { rows: rows[2], errors: errors[2], floor },
  });
}
const cells = [
  ...three('V1', [5000, 5000, 5000], [100, 200, 210], 0.02),
  ...three('M1', [5000, 5000, 5000], [100, 105, 300], 0.02),
  ...three('B1', [5000, 5000, 5000], [400, 410, 420], 0.02),
  ...three('B2', [2000, 2000, 1000], [80, 82, 42], 0.02),
  ...three('AF', [5000, 5000, 5000], [250, 252, 255], 0.05),
  ...three('UC', [100, 100, 100], [4, 5, 6], 0.02),
  ...three('V2', [5000, 5000, 200], [100, 200, 8], 0.02),
  ...three('TH', [20, 20, 20], [1, 2, 3], 0.02),
];
const build = (over: Partial<TriageOptions> = {}): Report => buildReport(cellsOf(cells), ['s'], [], CONTEXT, options(over));
const get = (r: Report, name: string): SliceReport => r.slices.find((s) => s.label === `s=${name}`)!;

describe('labelsToHalve = n·(2^(1/β) − 1)', () => {
  it('worked example and a curve too flat for any number of rows a double holds', () => {
    // hand arithmetic: 4000 × (2² − 1) = 12000 for β = 0.5
    expect(labelsToHalve(4000, 0.5)).toBe(12000);
    // hand arithmetic: 2^(1/0.0009) = 2^1111 is above the largest double (2^1024): null by contract (README,
    // "labels_to_halve"), never an Infinity that the JSON would turn into null unannounced
    expect(labelsToHalve(4000, 0.0009)).toBeNull();
    expect(labelsToHalve(4000, 0)).toBeNull();
  });
});

describe('foci, yield and flags on the eight-slice report', () => {
  const r = build();

  it('foci', () => {
    expect(Object.fromEntries(r.slices.map((s) => [s.key.s, s.focus]))).toEqual({
      V1: 'variance',
      M1: 'mismatch',
      B1: 'bias',
      B2: 'bias',
      AF: 'at-floor',
      UC: 'unclear',
      V2: 'variance',
      TH: 'thin',
    });
  });

  it('yield for variance and mismatch foci only, with n the effective train rows', () => {
    // invented numbers, hand arithmetic (python3, sh = 1 − √(5000/6000)):
    //   M1: 5000/21320 × (0.001 + 0.039) × sh -> 0.000817345880156877
    //   V1: 5000/21320 × (0.02 + 0.002) × sh -> 0.0004495402340862824
    //   V2: 200/21320 × (0.02 + 0) × sh -> 1.6346917603137543e-05
    expectClose(get(r, 'M1').yield, 0.000817345880156877, EXACT);
    expectClose(get(r, 'V1').yield, 0.0004495402340862824, EXACT);
    expectClose(get(r, 'V2').yield, 1.6346917603137543e-5, EXACT);
    for (const name of ['B1', 'B2', 'AF', 'UC', 'TH']) expect(get(r, name).yield, name).toBeNull();
  });

  it('labelCost divides the yield', () => {
    // invented numbers, hand arithmetic: 0.000817345880156877 / 4
    expectClose(get(build({ labelCost: 4 }), 'M1').yield, 0.000817345880156877 / 4, EXACT);
  });

  it('shares and headroom of the small slices', () => {
    // invented numbers, hand arithmetic: B2 1000 / 21320; bias part 1000/21320 × (0.04 − 0.02) = 0.000938 < 0.001
    expectClose(get(r, 'B2').share, 1000 / DEV_TOTAL, EXACT);
    expectClose(get(r, 'B2').headroom?.bias, (1000 / DEV_TOTAL) * 0.02, EXACT);
    // invented numbers, hand arithmetic: V2 variance part 200/21320 × (0.04 − 0.02) = 0.000188 < 0.001
    expectClose(get(r, 'V2').headroom?.variance, (200 / DEV_TOTAL) * 0.02, EXACT);
    const shares = r.slices.reduce((a, s) => a + s.share, 0);
    expectClose(shares, 1, 1e-12);
  });

  it('flagged: focus bias / variance / mismatch and that part’s headroom ≥ minHeadroom (0.001)', () => {
    expect(r.slices.filter((s) => s.flagged).map((s) => s.key.s).sort()).toEqual(['B1', 'M1', 'V1']);
    expect(get(r, 'B2').flagged).toBe(false); // focus bias, part 0.000938 < 0.001
    expect(get(r, 'V2').flagged).toBe(false); // focus variance, part 0.000188 < 0.001
  });

  it('order: flagged first, by yield desc (null last), then headroom desc; ranks 1..N', () => {
    // flagged: M1 (yield 8.2e-4), V1 (4.5e-4), B1 (null yield);
    // unflagged: V2 (yield 1.6e-5), then null yields by headroom: B2 1.03e-3, AF 2.35e-4, UC 1.88e-4, TH 1.22e-4
    expect(r.slices.map((s) => s.key.s)).toEqual(['M1', 'V1', 'B1', 'V2', 'B2', 'AF', 'UC', 'TH']);
    expect(r.slices.map((s) => s.rank)).toEqual([1, 2, 3, 4, 5, 6, 7, 8]);
  });

  it('no test split: every dev_overfit is null', () => {
    for (const s of r.slices) {
      expect(s.gaps.dev_overfit).toBeNull();
      expect(s.rows.test).toBeNull();
    }
  });
});

describe('the min-headroom threshold', () => {
  it('lowering it to 0.0005 flags B2, which moves ahead of the unflagged V2', () => {
    const r = build({ minHeadroom: 0.0005 });
    expect(get(r, 'B2').flagged).toBe(true);
    expect(get(r, 'V2').flagged).toBe(false); // part 0.000188 < 0.0005
    expect(r.slices.map((s) => s.key.s)).toEqual(['M1', 'V1', 'B1', 'B2', 'V2', 'AF', 'UC', 'TH']);
  });

  it('a part equal to the threshold is flagged; just above it is not', () => {
    const part = get(build(), 'B1').headroom!.bias;
    expect(get(build({ minHeadroom: part }), 'B1').flagged).toBe(true);
    expect(get(build({ minHeadroom: part * (1 + 1e-12) }), 'B1').flagged).toBe(false);
    // the focus does not depend on the threshold
    expect(get(build({ minHeadroom: part * (1 + 1e-12) }), 'B1').focus).toBe('bias');
  });

  it('raising it above every part leaves nothing flagged; the order falls back to yield, then headroom', () => {
    const r = build({ minHeadroom: 1 });
    expect(r.slices.some((s) => s.flagged)).toBe(false);
    // yields: M1 > V1 > V2; then null yields by headroom: B1 0.0150, B2 0.00103, AF, UC, TH
    expect(r.slices.map((s) => s.key.s)).toEqual(['M1', 'V1', 'V2', 'B1', 'B2', 'AF', 'UC', 'TH']);
  });
});
