/**
 * The false-discovery step: one family of the bias, variance and mismatch tests of every non-thin
 * slice; dev-overfit tests in a family of their own; the overall slice on its own; BH by default,
 * BY with fdrMethod 'by'. Reference values: statsmodels 0.13.5 (Debian 0.13.5+dfsg) and scipy 1.10.1
 * with /usr/bin/python3.
 */
import { describe, expect, it } from 'vitest';
import { buildReport } from '../../src/triage/report.js';
import { significant } from '../../src/triage/triage.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { CONTEXT, options, sliceCells } from '../helpers/cells.js';
import { expectClose, expectRelClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const LIBRARY = 1e-12; // same formulas as statsmodels: agreement to rounding

function slice(report: Report, label: string): SliceReport {
  const s = report.slices.find((r) => r.label === label);
  if (!s) throw new Error(`no slice ${label}`);
  return s;
}

describe('thin slices stay out of the family', () => {
  // fixture (hand-built): invented numbers; floor 2 %.
  // N: 5,000 rows per split, train 450, dev 550, test 560 errors. T: 20 rows per split, train 5, dev 6, test 4 errors.
  const cells = [
    ...sliceCells({ line: 'N' }, {
      train: { rows: 5000, errors: 450, floor: 0.02 },
      dev: { rows: 5000, errors: 550, floor: 0.02 },
      test: { rows: 5000, errors: 560, floor: 0.02 },
    }),
    ...sliceCells({ line: 'T' }, {
      train: { rows: 20, errors: 5, floor: 0.02 },
      dev: { rows: 20, errors: 6, floor: 0.02 },
      test: { rows: 20, errors: 4, floor: 0.02 },
    }),
  ];
  const report = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options());
  const n = slice(report, 'line=N');
  const t = slice(report, 'line=T');

  it('the thin slice keeps its p-values but every q is null', () => {
    expect(t.focus).toBe('thin');
    // scipy 1.10.1: binomtest(5, 20, 0.02).pvalue -> 3.859090324326966e-05 (exact branch: 20 × 0.02 < 5)
    expectRelClose(t.gaps.avoidable_bias?.p, 3.859090324326966e-5, 1e-9);
    // statsmodels 0.13.5: proportions_ztest([6, 5], [20, 20]) -> (0.35410711589825544, 0.7232586094515036)
    expectClose(t.gaps.variance?.p, 0.7232586094515036, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([4, 6], [20, 20]) -> (-0.7302967433402212, 0.4652088184521418)
    expectClose(t.gaps.dev_overfit?.p, 0.4652088184521418, LIBRARY);
    expect(t.gaps.avoidable_bias?.q).toBeNull();
    expect(t.gaps.variance?.q).toBeNull();
    expect(t.gaps.dev_overfit?.q).toBeNull();
    expect(t.gaps.mismatch).toBeNull();
  });

  it('the other slice’s q-values are adjusted over its own two tests only (m = 2, not 4)', () => {
    // statsmodels 0.13.5: multipletests([8.300172571198413e-274, 0.0008581206663936744], method='fdr_bh')[1] -> [1.6600345142396826e-273, 0.0008581206663936744]
    expectRelClose(n.gaps.avoidable_bias?.q, 1.6600345142396826e-273, 1e-9);
    expectClose(n.gaps.variance?.q, 0.0008581206663936744, LIBRARY);
  });

  it('dev overfit of the only non-thin slice: a family of one, q = p', () => {
    // statsmodels 0.13.5: proportions_ztest([560, 550], [5000, 5000]) -> (0.31833737451931327, 0.7502290369375536)
    expectClose(n.gaps.dev_overfit?.p, 0.7502290369375536, LIBRARY);
    expectClose(n.gaps.dev_overfit?.q, 0.7502290369375536, LIBRARY);
  });
});

describe('BH vs BY on a borderline slice', () => {
  // fixture (hand-built): invented numbers.
  // X: floor 2 %, 5,000 rows per split, train 450 (9 %), dev 450, test 470 errors.
  // Y: floor 5 %, 2,000 rows per split, train 100 (5 % = floor), dev 135 (6.75 %), test 150 errors.
  const cells = [
    ...sliceCells({ line: 'X' }, {
      train: { rows: 5000, errors: 450, floor: 0.02 },
      dev: { rows: 5000, errors: 450, floor: 0.02 },
      test: { rows: 5000, errors: 470, floor: 0.02 },
    }),
    ...sliceCells({ line: 'Y' }, {
      train: { rows: 2000, errors: 100, floor: 0.05 },
      dev: { rows: 2000, errors: 135, floor: 0.05 },
      test: { rows: 2000, errors: 150, floor: 0.05 },
    }),
  ];
  const bh = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options());
  const by = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options({ fdrMethod: 'by' }));

  it('raw p-values (the same under both methods)', () => {
    for (const r of [bh, by]) {
      // statsmodels 0.13.5: proportions_ztest(450, 5000, value=0.02, prop_var=0.02) -> (35.35533905932737, 8.300172571198413e-274)
      expectRelClose(slice(r, 'line=X').gaps.avoidable_bias?.p, 8.300172571198413e-274, 1e-9);
      // statsmodels 0.13.5: proportions_ztest([450, 450], [5000, 5000]) -> (0.0, 1.0)
      expectClose(slice(r, 'line=X').gaps.variance?.p, 1, LIBRARY);
      // statsmodels 0.13.5: proportions_ztest(100, 2000, value=0.05, prop_var=0.05) -> (0.0, 1.0)
      expectClose(slice(r, 'line=Y').gaps.avoidable_bias?.p, 1, LIBRARY);
      // statsmodels 0.13.5: proportions_ztest([135, 100], [2000, 2000]) -> (2.353323429384517, 0.0186064422981592)
      expectClose(slice(r, 'line=Y').gaps.variance?.p, 0.0186064422981592, LIBRARY);
      // statsmodels 0.13.5: confint_proportions_2indep(135, 2000, 100, 2000, method='newcomb', compare='diff') -> (0.0029105137589486366, 0.03220799982814585)
      expectClose(slice(r, 'line=Y').gaps.variance?.lo, 0.0029105137589486366, LIBRARY);
      expectClose(slice(r, 'line=Y').gaps.variance?.hi, 0.03220799982814585, LIBRARY);
    }
  });

  it('BH: Y’s variance q 0.037 ≤ 0.05 → significant, focus variance, flagged', () => {
    // statsmodels 0.13.5: multipletests([8.300172571198413e-274, 1.0, 1.0, 0.0186064422981592], method='fdr_bh')[1]
    //   -> [3.320069028479365e-273, 1.0, 1.0, 0.0372128845963184]
    const x = slice(bh, 'line=X');
    const y = slice(bh, 'line=Y');
    expectRelClose(x.gaps.avoidable_bias?.q, 3.320069028479365e-273, 1e-9);
    expectClose(x.gaps.variance?.q, 1, LIBRARY);
    expectClose(y.gaps.avoidable_bias?.q, 1, LIBRARY);
    expectClose(y.gaps.variance?.q, 0.0372128845963184, LIBRARY);
    expect(significant(y.gaps.variance, 0.05)).toBe(true);
    expect(y.focus).toBe('variance');
    expect(y.flagged).toBe(true);
    expect(bh.fdr_method).toBe('bh');
  });

  it('BY: Y’s variance q 0.078 > 0.05 → not significant; dev − floor 1.75 points > margin → unclear', () => {
    // statsmodels 0.13.5: multipletests([8.300172571198413e-274, 1.0, 1.0, 0.0186064422981592], method='fdr_by')[1]
    //   -> [6.916810475998676e-273, 1.0, 1.0, 0.07752684290899665]
    const x = slice(by, 'line=X');
    const y = slice(by, 'line=Y');
    expectRelClose(x.gaps.avoidable_bias?.q, 6.916810475998676e-273, 1e-9);
    expectClose(x.gaps.variance?.q, 1, LIBRARY);
    expectClose(y.gaps.avoidable_bias?.q, 1, LIBRARY);
    expectClose(y.gaps.variance?.q, 0.07752684290899665, LIBRARY);
    expect(significant(y.gaps.variance, 0.05)).toBe(false);
    // invented numbers, hand arithmetic: 135/2000 − 0.05 = 0.0175 > 0.01
    expect(y.focus).toBe('unclear');
    expect(y.flagged).toBe(false);
    expect(y.yield).toBeNull();
    expect(by.fdr_method).toBe('by');
    // X is unaffected: its bias stays significant
    expect(x.focus).toBe('bias');
  });

  it('dev-overfit tests form their own family (m = 2)', () => {
    // statsmodels 0.13.5: confint_proportions_2indep(470, 5000, 450, 5000, method='newcomb', compare='diff') -> (-0.007340156626050542, 0.015344445698100308)
    expectClose(slice(bh, 'line=X').gaps.dev_overfit?.lo, -0.007340156626050542, LIBRARY);
    expectClose(slice(bh, 'line=X').gaps.dev_overfit?.hi, 0.015344445698100308, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([470, 450], [5000, 5000]) -> (0.6919793870714477, 0.48895027389522006)
    expectClose(slice(bh, 'line=X').gaps.dev_overfit?.p, 0.48895027389522006, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([150, 135], [2000, 2000]) -> (0.9219755745783095, 0.3565413163735559)
    expectClose(slice(bh, 'line=Y').gaps.dev_overfit?.p, 0.3565413163735559, LIBRARY);
    // statsmodels 0.13.5: multipletests([0.48895027389522006, 0.3565413163735559], method='fdr_bh')[1] -> [0.48895027389522006, 0.48895027389522006]
    expectClose(slice(bh, 'line=X').gaps.dev_overfit?.q, 0.48895027389522006, LIBRARY);
    expectClose(slice(bh, 'line=Y').gaps.dev_overfit?.q, 0.48895027389522006, LIBRARY);
    // statsmodels 0.13.5: multipletests([0.48895027389522006, 0.3565413163735559], method='fdr_by')[1] -> [0.7334254108428301, 0.7334254108428301]
    expectClose(slice(by, 'line=X').gaps.dev_overfit?.q, 0.7334254108428301, LIBRARY);
    expectClose(slice(by, 'line=Y').gaps.dev_overfit?.q, 0.7334254108428301, LIBRARY);
  });

  it('the overall slice is a family of its own', () => {
    // invented numbers, hand arithmetic: overall floor (5000 × 0.02 + 2000 × 0.05) / 7000 = 200/7000; train 550/7000, dev 585/7000
    // statsmodels 0.13.5: proportions_ztest(550, 7000, value=0.02857142857142857, prop_var=0.02857142857142857) -> (25.110051889280378, 3.862581053610556e-139)
    expectRelClose(bh.overall.gaps.avoidable_bias?.p, 3.862581053610556e-139, 1e-9);
    // statsmodels 0.13.5: proportions_ztest([585, 550], [7000, 7000]) -> (1.0837503135937545, 0.2784755207483207)
    expectClose(bh.overall.gaps.variance?.p, 0.2784755207483207, LIBRARY);
    // statsmodels 0.13.5: multipletests([3.862581053610556e-139, 0.2784755207483207], method='fdr_bh')[1] -> [7.725162107221111e-139, 0.2784755207483207]
    expectRelClose(bh.overall.gaps.avoidable_bias?.q, 7.725162107221111e-139, 1e-9);
    expectClose(bh.overall.gaps.variance?.q, 0.2784755207483207, LIBRARY);
  });
});
