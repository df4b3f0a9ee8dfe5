/**
 * The focus rules, one hand-built single-slice report per rule (so each slice is its own FDR family).
 * Reference values: statsmodels 0.13.5 (Debian 0.13.5+dfsg) and scipy 1.10.1 run with /usr/bin/python3,
 * each call and its printed result beside the value it checks.
 */
import { describe, expect, it } from 'vitest';
import { buildReport } from '../../src/triage/report.js';
import { significant } from '../../src/triage/triage.js';
import type { Gap, SliceReport, TriageOptions } from '../../src/triage/types.js';
import { CONTEXT, options, sliceCells, type SliceSpec } from '../helpers/cells.js';
import { expectClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const LIBRARY = 1e-12; // same formulas as statsmodels / scipy: agreement to rounding
const EXACT = 1e-15; // hand arithmetic on invented numbers

function one(spec: SliceSpec, over: Partial<TriageOptions> = {}): SliceReport {
  return buildReport(cellsOf(sliceCells({ line: 'x' }, spec)), ['line'], [], CONTEXT, options(over)).slices[0];
}

describe('focus thin: fewer than minRows train or dev rows', () => {
  // fixture (hand-built): invented numbers; floor 2 %, 20 train rows, 25 dev rows (minRows 30)
  const s = one({ train: { rows: 20, errors: 2, floor: 0.02 }, dev: { rows: 25, errors: 3, floor: 0.02 } });

  it('is thin, not flagged, no yield', () => {
    expect(s.focus).toBe('thin');
    expect(s.flagged).toBe(false);
    expect(s.yield).toBeNull();
  });

  it('its gaps keep value, interval and p but have q null (outside the FDR family)', () => {
    // invented numbers, hand arithmetic: 2/20 − 0.02 = 0.08
    expectClose(s.gaps.avoidable_bias?.value, 0.08, EXACT);
    // scipy 1.10.1: binomtest(2, 20, 0.02).pvalue -> 0.05989897854894854 (exact branch: 20 × 0.02 = 0.4 < 5)
    expectClose(s.gaps.avoidable_bias?.p, 0.05989897854894854, LIBRARY);
    // statsmodels 0.13.5: proportion_confint(2, 20, method='wilson') -> (0.027866481213768196, 0.3010336452284873); minus 0.02
    expectClose(s.gaps.avoidable_bias?.lo, 0.027866481213768196 - 0.02, LIBRARY);
    expectClose(s.gaps.avoidable_bias?.hi, 0.3010336452284873 - 0.02, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([3, 2], [25, 20]) -> (0.21213203435596414, 0.8320040285726366)
    expectClose(s.gaps.variance?.p, 0.8320040285726366, LIBRARY);
    expect(s.gaps.avoidable_bias?.q).toBeNull();
    expect(s.gaps.variance?.q).toBeNull();
  });

  it('is thin on dev rows alone, even with a large, significant bias on train', () => {
    // invented numbers: 5,000 train rows at 9 % vs floor 2 %, but only 29 dev rows
    const t = one({ train: { rows: 5000, errors: 450, floor: 0.02 }, dev: { rows: 29, errors: 3, floor: 0.02 } });
    expect(t.focus).toBe('thin');
    expect(t.gaps.avoidable_bias?.q).toBeNull();
  });

  it('exactly minRows rows is not thin', () => {
    // invented numbers: 30 train and 30 dev rows, half of them errors, floor 2 %
    const t = one({ train: { rows: 30, errors: 15, floor: 0.02 }, dev: { rows: 30, errors: 15, floor: 0.02 } });
    expect(t.focus).toBe('bias');
    expect(one({ train: { rows: 30, errors: 15, floor: 0.02 }, dev: { rows: 30, errors: 15, floor: 0.02 } }, { minRows: 31 }).focus).toBe('thin');
  });

  it('counts unweighted rows: 20 rows of weight 10 are still thin', () => {
    // invented numbers: 20 rows × weight 10 = 200 weighted rows, 20 unweighted
    const t = one({ train: { rows: 20, errors: 2, weight: 10, floor: 0.02 }, dev: { rows: 20, errors: 2, weight: 10, floor: 0.02 } });
    expect(t.rows.train).toBe(20);
    expect(t.focus).toBe('thin');
  });
});

describe('focus below-floor: bias interval entirely below 0', () => {
  // fixture (hand-built): invented numbers; floor 10 %, train 5 %, dev 7 %, 5,000 rows each
  const s = one({ train: { rows: 5000, errors: 250, floor: 0.1 }, dev: { rows: 5000, errors: 350, floor: 0.1 } });

  it('bias −5 points with an interval below 0', () => {
    // invented numbers, hand arithmetic: 0.05 − 0.1 = −0.05
    expectClose(s.gaps.avoidable_bias?.value, -0.05, EXACT);
    // statsmodels 0.13.5: proportion_confint(250, 5000, method='wilson') -> (0.044296896700570555, 0.05639403504998087); minus 0.1
    expectClose(s.gaps.avoidable_bias?.hi, 0.05639403504998087 - 0.1, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest(250, 5000, value=0.1, prop_var=0.1) -> (-11.78511301977579, 4.657949227734084e-32)
    expectClose(s.gaps.avoidable_bias?.p, 4.657949227734084e-32, 1e-40);
  });

  it('wins over a significant positive variance gap (rule order)', () => {
    // statsmodels 0.13.5: confint_proportions_2indep(350, 5000, 250, 5000, method='newcomb', compare='diff') -> (0.010704489703149132, 0.029348435608698514)
    expectClose(s.gaps.variance?.lo, 0.010704489703149132, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([350, 250], [5000, 5000]) -> (4.210759605332596, 2.5451346417356773e-05)
    expectClose(s.gaps.variance?.p, 2.5451346417356773e-5, LIBRARY);
    expect(significant(s.gaps.variance, 0.05)).toBe(true);
    expect(s.focus).toBe('below-floor');
    expect(s.flagged).toBe(false);
    expect(s.yield).toBeNull();
  });
});

describe('focus bias / variance: the significant positive part with the largest headroom', () => {
  it('bias and variance both significant, variance part larger → variance', () => {
    // fixture (hand-built): invented numbers; floor 2 %, train 4 %, dev 9 %, no train_dev, 5,000 rows each
    const s = one({ train: { rows: 5000, errors: 200, floor: 0.02 }, dev: { rows: 5000, errors: 450, floor: 0.02 } });
    // statsmodels 0.13.5: proportions_ztest(200, 5000, value=0.02, prop_var=0.02) -> (10.101525445522107, 5.438947178088848e-24)
    expectClose(s.gaps.avoidable_bias?.p, 5.438947178088848e-24, 1e-30);
    // statsmodels 0.13.5: proportions_ztest([450, 200], [5000, 5000]) -> (10.140923928935457, 3.6364374398732034e-24)
    expectClose(s.gaps.variance?.p, 3.6364374398732034e-24, 1e-30);
    expect(significant(s.gaps.avoidable_bias, 0.05)).toBe(true);
    expect(significant(s.gaps.variance, 0.05)).toBe(true);
    // invented numbers, hand arithmetic: share 1; bias part 0.04 − 0.02 = 0.02 < variance part 0.09 − 0.04 = 0.05
    expectClose(s.headroom?.bias, 0.02, EXACT);
    expectClose(s.headroom?.variance, 0.05, EXACT);
    expect(s.focus).toBe('variance');
  });

  it('the same errors with the floor at 0: bias part 0.04 < variance part 0.05 → still variance; floor 0 uses the exact test', () => {
    // invented numbers: floor 0 (default), train 4 %, dev 9 %
    const s = one({ train: { rows: 5000, errors: 200 }, dev: { rows: 5000, errors: 450 } });
    // scipy 1.10.1: binomtest(200, 5000, 0).pvalue -> 0.0 (an error is impossible under a floor of 0)
    expect(s.gaps.avoidable_bias?.p).toBe(0);
    expect(s.focus).toBe('variance');
  });

  it('bias part larger → bias', () => {
    // invented numbers: floor 2 %, train 8 %, dev 9 % (bias part 0.06 > variance part 0.01)
    const s = one({ train: { rows: 5000, errors: 400, floor: 0.02 }, dev: { rows: 5000, errors: 450, floor: 0.02 } });
    expect(s.focus).toBe('bias');
  });
});

describe('focus mismatch', () => {
  // fixture (hand-built): invented numbers; floor 5 %, train 5 %, train_dev 5.2 %, dev 9 %, 5,000 rows each
  const s = one({
    train: { rows: 5000, errors: 250, floor: 0.05 },
    train_dev: { rows: 5000, errors: 260, floor: 0.05 },
    dev: { rows: 5000, errors: 450, floor: 0.05 },
  });

  it('mismatch = dev − train_dev with Newcombe’s interval and the pooled z test', () => {
    // invented numbers, hand arithmetic: 0.09 − 0.052 = 0.038
    expectClose(s.gaps.mismatch?.value, 0.038, EXACT);
    // statsmodels 0.13.5: confint_proportions_2indep(450, 5000, 260, 5000, method='newcomb', compare='diff') -> (0.027980182253409917, 0.04809512474679828)
    expectClose(s.gaps.mismatch?.lo, 0.027980182253409917, LIBRARY);
    expectClose(s.gaps.mismatch?.hi, 0.04809512474679828, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([450, 260], [5000, 5000]) -> (7.398038202014525, 1.3821109463798374e-13)
    expectClose(s.gaps.mismatch?.p, 1.3821109463798374e-13, 1e-20);
  });

  it('variance = train_dev − train, not significant', () => {
    // statsmodels 0.13.5: confint_proportions_2indep(260, 5000, 250, 5000, method='newcomb', compare='diff') -> (-0.006644460951280627, 0.010651288295380834)
    expectClose(s.gaps.variance?.lo, -0.006644460951280627, LIBRARY);
    expectClose(s.gaps.variance?.hi, 0.010651288295380834, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([260, 250], [5000, 5000]) -> (0.45455015033572443, 0.649432904765926)
    expectClose(s.gaps.variance?.p, 0.649432904765926, LIBRARY);
  });

  it('q-values: BH over this slice’s three tests (bias p = 1: train error equals the floor)', () => {
    // statsmodels 0.13.5: multipletests([1.0, 0.649432904765926, 1.3821109463798364e-13], method='fdr_bh')[1] -> [1.0, 0.974149357148889, 4.146332839139509e-13]
    expectClose(s.gaps.avoidable_bias?.q, 1, LIBRARY);
    expectClose(s.gaps.variance?.q, 0.974149357148889, LIBRARY);
    expectClose(s.gaps.mismatch?.q, 4.146332839139509e-13, 1e-20);
  });

  it('focus mismatch, flagged, yield share × (variance + mismatch) × (1 − (n/(n+1000))^β) / cost', () => {
    expect(s.focus).toBe('mismatch');
    expect(s.flagged).toBe(true);
    // invented numbers, hand arithmetic: 1 × (0.002 + 0.038) × (1 − (5000/6000)^0.5) / 1
    // (python3: 1*(0.002+0.038)*(1-math.sqrt(5000/6000)) -> 0.003485162832988924)
    expectClose(s.yield, 0.003485162832988924, 1e-15);
  });
});

describe('focus at-floor and unclear', () => {
  it('nothing significant and dev − floor ≤ floorMargin → at-floor', () => {
    // fixture (hand-built): invented numbers; floor 5 %, train 5.1 %, dev 5.4 %, 5,000 rows each
    const s = one({ train: { rows: 5000, errors: 255, floor: 0.05 }, dev: { rows: 5000, errors: 270, floor: 0.05 } });
    // statsmodels 0.13.5: proportions_ztest(255, 5000, value=0.05, prop_var=0.05) -> (0.3244428422615231, 0.745602788927463)
    expectClose(s.gaps.avoidable_bias?.p, 0.745602788927463, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([270, 255], [5000, 5000]) -> (0.6725460061723622, 0.501236161998944)
    expectClose(s.gaps.variance?.p, 0.501236161998944, LIBRARY);
    // invented numbers, hand arithmetic: dev − floor = 0.054 − 0.05 = 0.004 ≤ 0.01
    expect(s.focus).toBe('at-floor');
    expect(s.flagged).toBe(false);
  });

  // fixture (hand-built): invented numbers; floor 2 %, train 4/100, dev 6/100
  const small: SliceSpec = { train: { rows: 100, errors: 4, floor: 0.02 }, dev: { rows: 100, errors: 6, floor: 0.02 } };

  it('nothing significant but dev − floor > floorMargin → unclear', () => {
    const s = one(small);
    // scipy 1.10.1: binomtest(4, 100, 0.02).pvalue -> 0.1410384366017048 (exact branch: 100 × 0.02 = 2 < 5)
    expectClose(s.gaps.avoidable_bias?.p, 0.1410384366017048, LIBRARY);
    // statsmodels 0.13.5: proportion_confint(4, 100, method='wilson') -> (0.015663303991547604, 0.09837071435887923); minus 0.02
    expectClose(s.gaps.avoidable_bias?.lo, 0.015663303991547604 - 0.02, LIBRARY);
    expectClose(s.gaps.avoidable_bias?.hi, 0.09837071435887923 - 0.02, LIBRARY);
    // statsmodels 0.13.5: confint_proportions_2indep(6, 100, 4, 100, method='newcomb', compare='diff') -> (-0.04666988903606297, 0.08918951224446825)
    expectClose(s.gaps.variance?.lo, -0.04666988903606297, LIBRARY);
    expectClose(s.gaps.variance?.hi, 0.08918951224446825, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([6, 4], [100, 100]) -> (0.6488856845230501, 0.5164122683960384)
    expectClose(s.gaps.variance?.p, 0.5164122683960384, LIBRARY);
    // invented numbers, hand arithmetic: dev − floor = 0.06 − 0.02 = 0.04 > 0.01
    expect(s.focus).toBe('unclear');
    expect(s.flagged).toBe(false);
    expect(s.yield).toBeNull();
  });

  it('the same slice with floorMargin 0.05 is at-floor', () => {
    // invented numbers, hand arithmetic: 0.04 ≤ 0.05
    expect(one(small, { floorMargin: 0.05 }).focus).toBe('at-floor');
  });
});

describe('dev overfit is tested but never a focus', () => {
  // fixture (hand-built): invented numbers; floor = train = dev = 5 %, test 10 %, 5,000 rows each
  const s = one({
    train: { rows: 5000, errors: 250, floor: 0.05 },
    dev: { rows: 5000, errors: 250, floor: 0.05 },
    test: { rows: 5000, errors: 500, floor: 0.05 },
  });

  it('a large, significant dev overfit leaves the slice at-floor', () => {
    // statsmodels 0.13.5: confint_proportions_2indep(500, 5000, 250, 5000, method='newcomb', compare='diff') -> (0.03975027212127983, 0.06034000456497677)
    expectClose(s.gaps.dev_overfit?.lo, 0.03975027212127983, LIBRARY);
    expectClose(s.gaps.dev_overfit?.hi, 0.06034000456497677, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([500, 250], [5000, 5000]) -> (9.49157995752499, 2.2755865528577857e-21)
    expectClose(s.gaps.dev_overfit?.p, 2.2755865528577857e-21, 1e-28);
    expect(significant(s.gaps.dev_overfit, 0.05)).toBe(true);
    expect(s.focus).toBe('at-floor');
    expect(s.flagged).toBe(false);
  });
});

describe('significant: q ≤ fdr and the interval excludes 0 on the side of the value', () => {
  // fixture (hand-built): invented gaps
  const g = (value: number, lo: number | null, hi: number | null, q: number | null): Gap => ({ value, lo, hi, p: q, q });

  it.each([
    ['q equal to fdr, interval above 0', g(0.02, 0.001, 0.04, 0.05), true],
    ['q above fdr', g(0.02, 0.001, 0.04, 0.0500001), false],
    ['q small but the interval reaches 0', g(0.02, 0, 0.04, 0.001), false],
    ['negative value, interval below 0', g(-0.02, -0.04, -0.001, 0.001), true],
    ['negative value, interval above 0 (wrong side)', g(-0.02, 0.001, 0.04, 0.001), false],
    ['q null (thin slice)', g(0.02, 0.001, 0.04, null), false],
    ['interval null', g(0.02, null, null, 0.001), false],
  ])('%s', (_name, gap, expected) => {
    expect(significant(gap, 0.05)).toBe(expected);
  });

  it('a null gap is not significant', () => {
    expect(significant(null, 0.05)).toBe(false);
  });
});
