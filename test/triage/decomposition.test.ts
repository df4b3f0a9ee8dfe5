/**
 * The gap decomposition on two hand-built slices with the same errors and different floors:
 * 5,000 rows in each of train, dev and test, 450 train errors (9 %), 550 dev errors (11 %), no
 * train_dev split. `line=A` has floor 2 %, `line=B` floor 8.5 % (both from floor-table lines, taken
 * as exact). Reference values come from statsmodels 0.13.5 (Debian 0.13.5+dfsg) run with
 * /usr/bin/python3; the call and its printed output are beside the value they check.
 */
import { describe, expect, it } from 'vitest';
import { buildReport } from '../../src/triage/report.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { CONTEXT, options, sliceCells } from '../helpers/cells.js';
import { expectClose, expectRelClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const LIBRARY = 1e-12; // same formulas as statsmodels: agreement to rounding
const EXACT = 1e-15; // hand arithmetic on invented numbers, exact up to floating point

// fixture (hand-built): invented numbers
const cells = [
  ...sliceCells({ line: 'A' }, {
    train: { rows: 5000, errors: 450, floor: 0.02, entry: 0 },
    dev: { rows: 5000, errors: 550, floor: 0.02, entry: 0 },
    test: { rows: 5000, errors: 560, floor: 0.02, entry: 0 },
  }),
  ...sliceCells({ line: 'B' }, {
    train: { rows: 5000, errors: 450, floor: 0.085, entry: 1 },
    dev: { rows: 5000, errors: 550, floor: 0.085, entry: 1 },
    test: { rows: 5000, errors: 520, floor: 0.085, entry: 1 },
  }),
];

function slice(report: Report, label: string): SliceReport {
  const s = report.slices.find((r) => r.label === label);
  if (!s) throw new Error(`no slice ${label}; have ${report.slices.map((r) => r.label).join(', ')}`);
  return s;
}

describe('decomposition: floor 2 % vs 8.5 %, train 9 %, dev 11 %, 5,000 rows per split', () => {
  const report = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options());
  const a = slice(report, 'line=A');
  const b = slice(report, 'line=B');

  it('rows are unweighted counts per split; train_dev is null when the data has no such split', () => {
    // invented numbers: 5,000 rows per split, no train_dev rows anywhere
    expect(a.rows).toEqual({ train: 5000, train_dev: null, dev: 5000, test: 5000 });
    expect(b.rows).toEqual({ train: 5000, train_dev: null, dev: 5000, test: 5000 });
  });

  it('share is the slice’s part of the weighted dev rows', () => {
    // invented numbers, hand arithmetic: 5000 / (5000 + 5000) = 0.5
    expect(a.share).toBe(0.5);
    expect(b.share).toBe(0.5);
    expect(report.overall.share).toBe(1);
  });

  it('error rates carry the Wilson interval and Kish n', () => {
    // invented numbers, hand arithmetic: 450 / 5000 = 0.09, 550 / 5000 = 0.11; unit weights: Kish n = 5000
    expectClose(a.error.train?.value, 0.09, EXACT);
    expectClose(a.error.dev?.value, 0.11, EXACT);
    expect(a.error.train?.n).toBe(5000);
    expect(a.error.train_dev).toBeNull();
    // statsmodels 0.13.5: proportion_confint(450, 5000, method='wilson') -> (0.08237915058874333, 0.0982503650062035)
    expectClose(a.error.train?.lo, 0.08237915058874333, LIBRARY);
    expectClose(a.error.train?.hi, 0.0982503650062035, LIBRARY);
  });

  it('avoidable bias = train − floor: 7 points for A, 0.5 points for B', () => {
    // invented numbers, hand arithmetic: 0.09 − 0.02 = 0.07; 0.09 − 0.085 = 0.005
    expectClose(a.gaps.avoidable_bias?.value, 0.07, EXACT);
    expectClose(b.gaps.avoidable_bias?.value, 0.005, EXACT);
  });

  it('with a fixed floor the bias interval is the train Wilson interval minus the floor', () => {
    // statsmodels 0.13.5: proportion_confint(450, 5000, method='wilson') -> (0.08237915058874333, 0.0982503650062035)
    // A: minus 0.02; B: minus 0.085 (hand arithmetic)
    expectClose(a.gaps.avoidable_bias?.lo, 0.08237915058874333 - 0.02, LIBRARY);
    expectClose(a.gaps.avoidable_bias?.hi, 0.0982503650062035 - 0.02, LIBRARY);
    expectClose(b.gaps.avoidable_bias?.lo, 0.08237915058874333 - 0.085, LIBRARY);
    expectClose(b.gaps.avoidable_bias?.hi, 0.0982503650062035 - 0.085, LIBRARY);
  });

  it('with a fixed floor the bias p is the one-proportion score test against the floor', () => {
    // statsmodels 0.13.5: proportions_ztest(450, 5000, value=0.02, prop_var=0.02) -> (35.35533905932737, 8.300172571198413e-274)
    expectRelClose(a.gaps.avoidable_bias?.p, 8.300172571198413e-274, 1e-9);
    // statsmodels 0.13.5: proportions_ztest(450, 5000, value=0.085, prop_var=0.085) -> (1.2677540207595615, 0.20488580661906297)
    expectClose(b.gaps.avoidable_bias?.p, 0.20488580661906297, LIBRARY);
  });

  it('without train_dev, variance = dev − train with Newcombe’s interval and the pooled z test; mismatch is null', () => {
    for (const s of [a, b]) {
      // invented numbers, hand arithmetic: 0.11 − 0.09 = 0.02
      expectClose(s.gaps.variance?.value, 0.02, EXACT);
      // statsmodels 0.13.5: confint_proportions_2indep(550, 5000, 450, 5000, method='newcomb', compare='diff') -> (0.00824366349713391, 0.03177323370195252)
      expectClose(s.gaps.variance?.lo, 0.00824366349713391, LIBRARY);
      expectClose(s.gaps.variance?.hi, 0.03177323370195252, LIBRARY);
      // statsmodels 0.13.5: proportions_ztest([550, 450], [5000, 5000]) -> (3.3333333333333335, 0.0008581206663936744)
      expectClose(s.gaps.variance?.p, 0.0008581206663936744, LIBRARY);
      expect(s.gaps.mismatch).toBeNull();
      expect(s.headroom?.mismatch).toBeNull();
    }
  });

  it('q-values: BH over the bias and variance tests of both slices', () => {
    // statsmodels 0.13.5: multipletests([8.300172571198413e-274, 0.0008581206663936744, 0.20488580661906297, 0.0008581206663936744], method='fdr_bh')[1]
    //   -> [3.320069028479365e-273, 0.0011441608885248992, 0.20488580661906297, 0.0011441608885248992]
    expectRelClose(a.gaps.avoidable_bias?.q, 3.320069028479365e-273, 1e-9);
    expectClose(a.gaps.variance?.q, 0.0011441608885248992, LIBRARY);
    expectClose(b.gaps.avoidable_bias?.q, 0.20488580661906297, LIBRARY);
    expectClose(b.gaps.variance?.q, 0.0011441608885248992, LIBRARY);
  });

  it('dev overfit = test − dev, tested in a family of its own', () => {
    // invented numbers, hand arithmetic: A 560/5000 − 550/5000 = 0.002; B 520/5000 − 550/5000 = −0.006
    expectClose(a.gaps.dev_overfit?.value, 0.002, EXACT);
    expectClose(b.gaps.dev_overfit?.value, -0.006, EXACT);
    // statsmodels 0.13.5: confint_proportions_2indep(560, 5000, 550, 5000, method='newcomb', compare='diff') -> (-0.010322870342414305, 0.014324021637878893)
    expectClose(a.gaps.dev_overfit?.lo, -0.010322870342414305, LIBRARY);
    expectClose(a.gaps.dev_overfit?.hi, 0.014324021637878893, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([560, 550], [5000, 5000]) -> (0.31833737451931327, 0.7502290369375536)
    expectClose(a.gaps.dev_overfit?.p, 0.7502290369375536, LIBRARY);
    // statsmodels 0.13.5: confint_proportions_2indep(520, 5000, 550, 5000, method='newcomb', compare='diff') -> (-0.01812881374187618, 0.006124819703570169)
    expectClose(b.gaps.dev_overfit?.lo, -0.01812881374187618, LIBRARY);
    expectClose(b.gaps.dev_overfit?.hi, 0.006124819703570169, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([520, 550], [5000, 5000]) -> (-0.9705180935496112, 0.33178831054044644)
    expectClose(b.gaps.dev_overfit?.p, 0.33178831054044644, LIBRARY);
    // statsmodels 0.13.5: multipletests([0.7502290369375536, 0.33178831054044644], method='fdr_bh')[1] -> [0.7502290369375536, 0.6635766210808929]
    expectClose(a.gaps.dev_overfit?.q, 0.7502290369375536, LIBRARY);
    expectClose(b.gaps.dev_overfit?.q, 0.6635766210808929, LIBRARY);
  });

  it('headroom = share × (dev − floor), split into bias and variance parts that add up to it', () => {
    // invented numbers, hand arithmetic:
    //   A: 0.5 × (0.11 − 0.02) = 0.045 = 0.5 × 0.07 (bias 0.035) + 0.5 × 0.02 (variance 0.01)
    //   B: 0.5 × (0.11 − 0.085) = 0.0125 = 0.5 × 0.005 (bias 0.0025) + 0.5 × 0.02 (variance 0.01)
    expectClose(a.headroom?.total, 0.045, EXACT);
    expectClose(a.headroom?.bias, 0.035, EXACT);
    expectClose(a.headroom?.variance, 0.01, EXACT);
    expectClose(b.headroom?.total, 0.0125, EXACT);
    expectClose(b.headroom?.bias, 0.0025, EXACT);
    expectClose(b.headroom?.variance, 0.01, EXACT);
    for (const s of [a, b, report.overall]) {
      const h = s.headroom!;
      // the parts add up exactly (no rounding slack) to the total
      expect(h.bias + h.variance + (h.mismatch ?? 0)).toBe(h.total);
      // and the total is share × (dev − floor.value) up to floating point
      expectClose(h.total, s.share * (s.error.dev!.value - s.floor.value), EXACT);
    }
  });

  it('focus: A bias (bias part 0.035 > variance part 0.01); B variance (its bias gap is not significant)', () => {
    expect(a.focus).toBe('bias');
    expect(b.focus).toBe('variance');
  });

  it('yield only for variance / mismatch foci: B gets share × variance × (1 − (n/(n+1000))^β) / cost', () => {
    expect(a.yield).toBeNull();
    // invented numbers, hand arithmetic: 0.5 × 0.02 × (1 − (5000/6000)^0.5) / 1 = 0.000871290708247231
    // (python3: 0.5*0.02*(1-math.sqrt(5000/6000)) -> 0.000871290708247231)
    expectClose(b.yield, 0.000871290708247231, 1e-15);
  });

  it('both are flagged; B ranks first because flagged slices sort by yield and A has none', () => {
    expect(a.flagged).toBe(true);
    expect(b.flagged).toBe(true);
    expect(report.slices.map((s) => [s.label, s.rank])).toEqual([
      ['line=B', 1],
      ['line=A', 2],
    ]);
  });

  it('the overall slice: floor is the weighted mean over train rows, rank 0', () => {
    // invented numbers, hand arithmetic: (5000 × 0.02 + 5000 × 0.085) / 10000 = 0.0525
    expectClose(report.overall.floor.value, 0.0525, EXACT);
    expect(report.overall.rank).toBe(0);
    expect(report.overall.label).toBe('overall');
    expect(report.overall.rows).toEqual({ train: 10000, train_dev: null, dev: 10000, test: 10000 });
  });
});

describe('decomposition with a train_dev split and without test', () => {
  // fixture (hand-built): invented numbers; floor 5 % default
  const report = buildReport(
    cellsOf(sliceCells({ line: 'A' }, {
      train: { rows: 5000, errors: 250, floor: 0.05 },
      train_dev: { rows: 5000, errors: 260, floor: 0.05 },
      dev: { rows: 5000, errors: 450, floor: 0.05 },
    })),
    ['line'],
    [],
    CONTEXT,
    options(),
  );
  const s = report.slices[0];

  it('variance = train_dev − train, mismatch = dev − train_dev', () => {
    // invented numbers, hand arithmetic: 260/5000 − 250/5000 = 0.002; 450/5000 − 260/5000 = 0.038
    expectClose(s.gaps.variance?.value, 0.002, EXACT);
    expectClose(s.gaps.mismatch?.value, 0.038, EXACT);
    expectClose(s.gaps.avoidable_bias?.value, 0, EXACT);
  });

  it('headroom has three parts adding up to share × (dev − floor)', () => {
    // invented numbers, hand arithmetic: 1 × (0.09 − 0.05) = 0.04 = 0 + 0.002 + 0.038
    const h = s.headroom!;
    expectClose(h.total, 0.04, EXACT);
    expectClose(h.bias, 0, EXACT);
    expectClose(h.variance, 0.002, EXACT);
    expectClose(h.mismatch, 0.038, EXACT);
    expect(h.bias + h.variance + (h.mismatch as number)).toBe(h.total);
  });

  it('no test split: dev_overfit is null and rows.test is null', () => {
    expect(s.gaps.dev_overfit).toBeNull();
    expect(s.error.test).toBeNull();
    expect(s.rows.test).toBeNull();
    expect(s.rows.train_dev).toBe(5000);
  });
});

describe('a slice without train_dev rows in data that has a train_dev split', () => {
  // fixture (hand-built): invented numbers. P has train_dev (floor 5 %: 250 / 260 / 450 errors of 5,000);
  // Q has none (floor 2 %: train 450, dev 550 errors of 5,000).
  const report = buildReport(
    cellsOf([
      ...sliceCells({ line: 'P' }, {
        train: { rows: 5000, errors: 250, floor: 0.05 },
        train_dev: { rows: 5000, errors: 260, floor: 0.05 },
        dev: { rows: 5000, errors: 450, floor: 0.05 },
      }),
      ...sliceCells({ line: 'Q' }, { train: { rows: 5000, errors: 450, floor: 0.02 }, dev: { rows: 5000, errors: 550, floor: 0.02 } }),
    ]),
    ['line'],
    [],
    CONTEXT,
    options(),
  );
  const q = slice(report, 'line=Q');
  const p = slice(report, 'line=P');

  it('falls back to variance = dev − train and mismatch null, like data without train_dev', () => {
    expect(q.rows.train_dev).toBe(0);
    expect(q.error.train_dev).toBeNull();
    // invented numbers, hand arithmetic: 0.11 − 0.09 = 0.02
    expectClose(q.gaps.variance?.value, 0.02, EXACT);
    // statsmodels 0.13.5: confint_proportions_2indep(550, 5000, 450, 5000, method='newcomb', compare='diff') -> (0.00824366349713391, 0.03177323370195252)
    expectClose(q.gaps.variance?.lo, 0.00824366349713391, LIBRARY);
    expectClose(q.gaps.variance?.hi, 0.03177323370195252, LIBRARY);
    expect(q.gaps.mismatch).toBeNull();
  });

  it('keeps its headroom and its bias focus', () => {
    // invented numbers, hand arithmetic: share 0.5; 0.5 × (0.11 − 0.02) = 0.045 = 0.035 + 0.01
    expectClose(q.headroom?.total, 0.045, EXACT);
    expectClose(q.headroom?.bias, 0.035, EXACT);
    expectClose(q.headroom?.variance, 0.01, EXACT);
    expect(q.headroom?.mismatch).toBeNull();
    expect(q.focus).toBe('bias');
    expect(q.flagged).toBe(true);
    expect(p.focus).toBe('mismatch');
  });

  it('its two tests join the family with the other slice’s three (m = 5)', () => {
    // p-values: P bias 1.0, P variance 0.649432904765926, P mismatch 1.3821109463798374e-13 (statsmodels 0.13.5,
    //   printed outputs in focus.test.ts 'focus mismatch'), Q bias 8.300172571198413e-274, Q variance 0.0008581206663936744 (above)
    // statsmodels 0.13.5: multipletests([1.0, 0.649432904765926, 1.3821109463798374e-13, 8.300172571198413e-274, 0.0008581206663936744], method='fdr_bh')[1]
    //   -> [1.0, 0.8117911309574074, 3.4552773659495935e-13, 4.150086285599206e-273, 0.001430201110656124]
    expectClose(p.gaps.avoidable_bias?.q, 1, LIBRARY);
    expectClose(p.gaps.variance?.q, 0.8117911309574074, LIBRARY);
    expectClose(p.gaps.mismatch?.q, 3.4552773659495935e-13, 1e-20);
    expectRelClose(q.gaps.avoidable_bias?.q, 4.150086285599206e-273, 1e-9);
    expectClose(q.gaps.variance?.q, 0.001430201110656124, LIBRARY);
  });
});
