/**
 * Weighted rows: unweighted row counts, Kish's effective n behind every rate and test, and the dev
 * share from weighted dev rows. Reference values: statsmodels 0.13.5 (Debian 0.13.5+dfsg) with
 * /usr/bin/python3.
 */
import { describe, expect, it } from 'vitest';
import { buildReport } from '../../src/triage/report.js';
import { cell, CONTEXT, options, sliceCells } from '../helpers/cells.js';
import { expectClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const LIBRARY = 1e-12; // same formulas as statsmodels: agreement to rounding
const EXACT = 1e-12; // hand arithmetic on invented numbers

// fixture (hand-built): invented numbers; default floor 2 %.
// slice W — train: 3,000 rows of weight 1 (150 errors) + 1,000 rows of weight 3 (80 errors);
//           dev: 2,000 rows of weight 1 (100 errors) + 500 rows of weight 2 (40 errors).
// slice U — unit weights: train 2,000 rows (100 errors), dev 1,000 rows (50 errors).
const cells = [
  ...sliceCells({ line: 'W' }, {
    train: [
      { rows: 3000, errors: 150, floor: 0.02 },
      { rows: 1000, errors: 80, weight: 3, floor: 0.02 },
    ],
    dev: [
      { rows: 2000, errors: 100, floor: 0.02 },
      { rows: 500, errors: 40, weight: 2, floor: 0.02 },
    ],
  }),
  ...sliceCells({ line: 'U' }, { train: { rows: 2000, errors: 100, floor: 0.02 }, dev: { rows: 1000, errors: 50, floor: 0.02 } }),
];
const report = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options());
const w = report.slices.find((s) => s.label === 'line=W')!;
const u = report.slices.find((s) => s.label === 'line=U')!;

describe('weighted rows', () => {
  it('rows are unweighted counts', () => {
    // invented numbers, hand arithmetic: 3000 + 1000 = 4000 train rows; 2000 + 500 = 2500 dev rows
    expect(w.rows).toEqual({ train: 4000, train_dev: null, dev: 2500, test: null });
    expect(u.rows).toEqual({ train: 2000, train_dev: null, dev: 1000, test: null });
  });

  it('error rates are weighted; n is Kish’s (Σw)² / Σw²', () => {
    // invented numbers, hand arithmetic: train Σw = 3000 + 3000 = 6000, Σw² = 3000 + 9000 = 12000 → n = 3000;
    //   weighted errors 150 + 240 = 390 → 0.065
    expectClose(w.error.train?.value, 0.065, EXACT);
    expectClose(w.error.train?.n, 3000, EXACT);
    // invented numbers, hand arithmetic: dev Σw = 2000 + 1000 = 3000, Σw² = 2000 + 2000 = 4000 → n = 2250;
    //   weighted errors 100 + 80 = 180 → 0.06
    expectClose(w.error.dev?.value, 0.06, EXACT);
    expectClose(w.error.dev?.n, 2250, EXACT);
    // unit weights: Kish n = rows
    expect(u.error.train?.n).toBe(2000);
  });

  it('intervals use x = p · n_eff of n_eff rows', () => {
    // statsmodels 0.13.5: proportion_confint(195, 3000, method='wilson') -> (0.056722755168535435, 0.07438984322249816)
    expectClose(w.error.train?.lo, 0.056722755168535435, LIBRARY);
    expectClose(w.error.train?.hi, 0.07438984322249816, LIBRARY);
    // statsmodels 0.13.5: proportion_confint(135, 2250, method='wilson') -> (0.050916787487483024, 0.07058308897853055)
    expectClose(w.error.dev?.lo, 0.050916787487483024, LIBRARY);
    expectClose(w.error.dev?.hi, 0.07058308897853055, LIBRARY);
  });

  it('gap tests use the effective n too', () => {
    // statsmodels 0.13.5: confint_proportions_2indep(135, 2250, 195, 3000, method='newcomb', compare='diff') -> (-0.01806422233776812, 0.008435570487608691)
    expectClose(w.gaps.variance?.lo, -0.01806422233776812, LIBRARY);
    expectClose(w.gaps.variance?.hi, 0.008435570487608691, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([135, 195], [2250, 3000]) -> (-0.7386896620715916, 0.4600954646747686)
    expectClose(w.gaps.variance?.p, 0.4600954646747686, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest(195, 3000, value=0.02, prop_var=0.02) -> (17.605367919808913, 2.2404700728724699e-69)
    expectClose(w.gaps.avoidable_bias?.p, 2.2404700728724699e-69, 1e-78);
  });

  it('share = weighted dev rows / all weighted dev rows', () => {
    // invented numbers, hand arithmetic: W 3000 / (3000 + 1000) = 0.75, U 1000 / 4000 = 0.25
    expectClose(w.share, 0.75, EXACT);
    expectClose(u.share, 0.25, EXACT);
    // headroom uses that share: W 0.75 × (0.06 − 0.02) = 0.03
    expectClose(w.headroom?.total, 0.03, EXACT);
  });

  it('the overall slice sums the weights of both slices', () => {
    // invented numbers, hand arithmetic: train Σw = 6000 + 2000 = 8000, Σw² = 12000 + 2000 = 14000 → n = 64e6 / 14000 = 4571.43;
    //   errors 390 + 100 = 490 → 0.06125
    expect(report.overall.rows.train).toBe(6000);
    expectClose(report.overall.error.train?.value, 0.06125, EXACT);
    expectClose(report.overall.error.train?.n, 64e6 / 14000, 1e-9);
    // statsmodels 0.13.5: proportion_confint(280.0, 4571.428571428572, method='wilson') -> (0.0546604948031246, 0.06857626610778834)
    expectClose(report.overall.error.train?.lo, 0.0546604948031246, LIBRARY);
    expectClose(report.overall.error.train?.hi, 0.06857626610778834, LIBRARY);
  });
});

describe('sums that no valid weights give', () => {
  it('a split whose Σw² is not finite, or whose Kish n is not positive, has no rate instead of crashing triage', () => {
    // fixture (hand-built): cells such a --cells file or a future bug could carry; valid weights
    // (docs/method.md, "Weights") never give them
    const ok = sliceCells({ line: 'OK' }, { train: { rows: 100, errors: 10 }, dev: { rows: 100, errors: 12 } });
    const inf = [{ ...cell({ line: 'INF' }, 'train', { rows: 2, errors: 1 }), weight: 2e154, weightSq: Infinity, errors: 1e154 }, cell({ line: 'INF' }, 'dev', { rows: 50, errors: 5 })];
    // Σw = 1e-200 whose Σw² underflowed to 0: Kish n = 0
    const zero = [cell({ line: 'ZERO' }, 'train', { rows: 50, errors: 5 }), { ...cell({ line: 'ZERO' }, 'dev', { rows: 1, errors: 0 }), weight: 1e-200, weightSq: 0 }];
    const r = buildReport(cellsOf([...ok, ...inf, ...zero]), ['line'], [], CONTEXT, options());
    const by = (label: string) => r.slices.find((s) => s.label === label)!;
    expect(by('line=INF').error.train).toBeNull();
    expect(by('line=INF').error.dev?.value).toBe(0.1); // hand arithmetic: 5 / 50
    expect(by('line=ZERO').error.dev).toBeNull();
    expect(by('line=ZERO').error.train?.value).toBe(0.1); // hand arithmetic: 5 / 50
    expect(by('line=OK').error.dev?.value).toBe(0.12); // hand arithmetic: 12 / 100
  });
});

describe('a slice whose rows all weigh 0', () => {
  it('is thin: no rate, no test, no focus beyond "collect more rows"', () => {
    // fixture (hand-built): slice Z has 100 train and 100 dev rows, every one of weight 0
    const ok = sliceCells({ line: 'OK' }, { train: { rows: 100, errors: 10 }, dev: { rows: 100, errors: 12 } });
    const z = sliceCells({ line: 'Z' }, { train: { rows: 100, errors: 10, weight: 0 }, dev: { rows: 100, errors: 20, weight: 0 } });
    const r = buildReport(cellsOf([...ok, ...z]), ['line'], [], CONTEXT, options());
    const slice = r.slices.find((s) => s.label === 'line=Z')!;
    expect(slice.rows).toEqual({ train: 100, train_dev: null, dev: 100, test: null }); // unweighted counts
    expect(slice.error.dev).toBeNull();
    expect(slice.share).toBe(0); // hand arithmetic: 0 / 100
    expect(slice.focus).toBe('thin');
    expect(slice.flagged).toBe(false);
  });
});

describe('extreme but valid weights', () => {
  it('a floor entry with n holding a share whose square underflows leaves the floor exact, not of infinite n', () => {
    // fixture (hand-built): train rows of weight 1e100 at floor entry 0 (no n) and 4 rows of weight 1e-62
    // at entry 1 (n = 5): π₁ = 4e-62 / 1e100 = 4e-162, π₁² / 5 ≈ 3e-324, whose reciprocal is not a double
    const cells = [
      ...sliceCells({ line: 'A' }, { train: { rows: 1, errors: 0, weight: 1e100, entry: 0 }, dev: { rows: 50, errors: 5 } }),
      ...sliceCells({ line: 'B' }, { train: { rows: 4, errors: 0, weight: 1e-62, entry: 1, floorN: 5, floor: 0.1 } }),
    ];
    const r = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options());
    expect(r.overall.floor.n).toBeNull();
    // hand arithmetic: the 1e100 rows dominate; floor sum 4e-62 × 0.1 over 1e100 is 4e-163
    expect(r.overall.floor.value).toBeCloseTo(0, 12);
    // slice B alone: one entry, n = 5 (docs/method.md, "The floor")
    expect(r.slices.find((s) => s.label === 'line=B')!.floor.n).toBe(5);
  });
});
