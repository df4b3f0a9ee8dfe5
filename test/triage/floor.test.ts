/**
 * The slice floor: value over train rows, dev over dev rows, source, effective n of floor-table
 * entries that carry one, and how the avoidable-bias gap is tested with a fixed or an estimated floor.
 * Reference values: statsmodels 0.13.5 (Debian 0.13.5+dfsg) and scipy 1.10.1 with /usr/bin/python3.
 */
import { describe, expect, it } from 'vitest';
import { buildReport } from '../../src/triage/report.js';
import type { SliceReport } from '../../src/triage/types.js';
import { CONTEXT, options, sliceCells, type SliceSpec } from '../helpers/cells.js';
import { expectClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const LIBRARY = 1e-12; // same formulas as statsmodels / scipy: agreement to rounding
const EXACT = 1e-15; // hand arithmetic on invented numbers

function one(spec: SliceSpec): SliceReport {
  return buildReport(cellsOf(sliceCells({ line: 'x' }, spec)), ['line'], [], CONTEXT, options()).slices[0];
}

describe('floor source', () => {
  it('default: every row took the default floor (entry −1); n, lo, hi null', () => {
    // fixture (hand-built): invented numbers
    const s = one({ train: { rows: 1000, errors: 50, floor: 0.03 }, dev: { rows: 1000, errors: 60, floor: 0.03 } });
    expect(s.floor).toEqual({ value: 0.03, dev: 0.03, lo: null, hi: null, n: null, source: 'default', rule: null, raw: null, audited: null });
  });

  it('table: every row took a floor-table entry (no n → exact)', () => {
    // fixture (hand-built): invented numbers; two table entries, 0.02 and 0.04, 500 train rows each
    const s = one({
      train: [
        { rows: 500, errors: 20, floor: 0.02, entry: 0 },
        { rows: 500, errors: 30, floor: 0.04, entry: 1 },
      ],
      dev: { rows: 1000, errors: 60, floor: 0.04, entry: 1 },
    });
    expect(s.floor.source).toBe('table');
    // invented numbers, hand arithmetic: (500 × 0.02 + 500 × 0.04) / 1000 = 0.03; dev rows all at 0.04
    expectClose(s.floor.value, 0.03, EXACT);
    expectClose(s.floor.dev, 0.04, EXACT);
    expect(s.floor.n).toBeNull();
  });

  it('mixed: some rows took the default, some a table entry; the overall slice of mixed slices is mixed', () => {
    // fixture (hand-built): invented numbers
    const cells = [
      ...sliceCells({ line: 'a' }, { train: { rows: 100, errors: 5, floor: 0.03, entry: 0 }, dev: { rows: 100, errors: 5, floor: 0.03, entry: 0 } }),
      ...sliceCells({ line: 'b' }, { train: { rows: 100, errors: 5, floor: 0.05 }, dev: { rows: 100, errors: 5, floor: 0.05 } }),
    ];
    const report = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options());
    expect(report.overall.floor.source).toBe('mixed');
    expect(report.slices.find((s) => s.label === 'line=a')?.floor.source).toBe('table');
    expect(report.slices.find((s) => s.label === 'line=b')?.floor.source).toBe('default');
  });
});

describe('floor with n: mixed entries, effective n = 1 / Σ π_k² / n_k', () => {
  // fixture (hand-built): invented numbers. Train: 3,000 rows took table entry 0 (floor 3 %, n 400),
  // 1,000 rows took the default floor 5 % (no n: exact). Dev: 1,000 rows each.
  const s = one({
    train: [
      { rows: 3000, errors: 120, floor: 0.03, entry: 0, floorN: 400 },
      { rows: 1000, errors: 60, floor: 0.05 },
    ],
    dev: [
      { rows: 1000, errors: 40, floor: 0.03, entry: 0, floorN: 400 },
      { rows: 1000, errors: 50, floor: 0.05 },
    ],
  });
  // invented numbers, hand arithmetic: π = 0.75 (entry 0), 0.25 (default, exact: no term);
  // n = 1 / (0.75² / 400) = 6400 / 9 = 711.111…
  const n = 6400 / 9;

  it('value over train rows, dev over dev rows, source mixed', () => {
    // invented numbers, hand arithmetic: (3000 × 0.03 + 1000 × 0.05) / 4000 = 0.035; dev (1000 × 0.03 + 1000 × 0.05) / 2000 = 0.04
    expectClose(s.floor.value, 0.035, EXACT);
    expectClose(s.floor.dev, 0.04, EXACT);
    expect(s.floor.source).toBe('mixed');
  });

  it('effective n and the floor’s Wilson interval', () => {
    expectClose(s.floor.n, n, 1e-9);
    // statsmodels 0.13.5: proportion_confint(24.88888888888889, 711.1111111111111, method='wilson') -> (0.023797499335604388, 0.05119941494024233)
    expectClose(s.floor.lo, 0.023797499335604388, LIBRARY);
    expectClose(s.floor.hi, 0.05119941494024233, LIBRARY);
  });

  it('bias: Newcombe’s interval of the two proportions and the pooled two-proportion z test', () => {
    // invented numbers, hand arithmetic: 180 / 4000 − 0.035 = 0.01
    expectClose(s.gaps.avoidable_bias?.value, 0.01, EXACT);
    // statsmodels 0.13.5: confint_proportions_2indep(180, 4000, 24.88888888888889, 711.1111111111111, method='newcomb', compare='diff') -> (-0.007274692450766531, 0.023142621850194146)
    expectClose(s.gaps.avoidable_bias?.lo, -0.007274692450766531, LIBRARY);
    expectClose(s.gaps.avoidable_bias?.hi, 0.023142621850194146, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([180, 24.88888888888889], [4000, 711.1111111111111]) -> (1.204744342162749, 0.22830201228054414)
    expectClose(s.gaps.avoidable_bias?.p, 0.22830201228054414, LIBRARY);
  });
});

describe('floor with n: other entry mixes', () => {
  it('two table entries with n: 1 / (0.5²/400 + 0.5²/200) = 533.33…', () => {
    // fixture (hand-built): invented numbers; entry 0 floor 3 % n 400, entry 1 floor 5 % n 200, 2,000 train rows each
    const s = one({
      train: [
        { rows: 2000, errors: 80, floor: 0.03, entry: 0, floorN: 400 },
        { rows: 2000, errors: 110, floor: 0.05, entry: 1, floorN: 200 },
      ],
      dev: { rows: 1000, errors: 50, floor: 0.03, entry: 0, floorN: 400 },
    });
    expect(s.floor.source).toBe('table');
    // invented numbers, hand arithmetic: 1 / (0.25/400 + 0.25/200) = 1600 / 3; value (2000 × 0.03 + 2000 × 0.05) / 4000 = 0.04
    expectClose(s.floor.n, 1600 / 3, 1e-9);
    expectClose(s.floor.value, 0.04, EXACT);
    // statsmodels 0.13.5: proportion_confint(21.333333333333336, 533.3333333333334, method='wilson') -> (0.026394939590120334, 0.06018418915281075)
    expectClose(s.floor.lo, 0.026394939590120334, LIBRARY);
    expectClose(s.floor.hi, 0.06018418915281075, LIBRARY);
    // statsmodels 0.13.5: confint_proportions_2indep(190, 4000, 21.333333333333336, 533.3333333333334, method='newcomb', compare='diff') -> (-0.013605782752255605, 0.022817201371519425)
    expectClose(s.gaps.avoidable_bias?.lo, -0.013605782752255605, LIBRARY);
    expectClose(s.gaps.avoidable_bias?.hi, 0.022817201371519425, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([190, 21.333333333333336], [4000, 533.3333333333334]) -> (0.7717436540037372, 0.44026626997838025)
    expectClose(s.gaps.avoidable_bias?.p, 0.44026626997838025, LIBRARY);
  });

  it('a single entry with n gives n itself', () => {
    // fixture (hand-built): invented numbers; entry 0 floor 3 % n 400, 4,000 train rows at 4.5 %
    const s = one({
      train: { rows: 4000, errors: 180, floor: 0.03, entry: 0, floorN: 400 },
      dev: { rows: 1000, errors: 50, floor: 0.03, entry: 0, floorN: 400 },
    });
    expectClose(s.floor.n, 400, 1e-12);
    // statsmodels 0.13.5: proportion_confint(12, 400, method='wilson') -> (0.017243020965143047, 0.051698535709095675)
    expectClose(s.floor.lo, 0.017243020965143047, LIBRARY);
    expectClose(s.floor.hi, 0.051698535709095675, LIBRARY);
    // statsmodels 0.13.5: confint_proportions_2indep(180, 4000, 12, 400, method='newcomb', compare='diff') -> (-0.00751267213773887, 0.029490445198723063)
    expectClose(s.gaps.avoidable_bias?.lo, -0.00751267213773887, LIBRARY);
    expectClose(s.gaps.avoidable_bias?.hi, 0.029490445198723063, LIBRARY);
    // statsmodels 0.13.5: proportions_ztest([180, 12], [4000, 400]) -> (1.400196890011715, 0.16145436690825143)
    expectClose(s.gaps.avoidable_bias?.p, 0.16145436690825143, LIBRARY);
  });

  it('π_k are shares of train weight, not of rows', () => {
    // fixture (hand-built): invented numbers; 1,000 rows of weight 3 took entry 0 (n 400), 3,000 rows of weight 1 the default
    const s = one({
      train: [
        { rows: 1000, errors: 40, weight: 3, floor: 0.03, entry: 0, floorN: 400 },
        { rows: 3000, errors: 150, floor: 0.05 },
      ],
      dev: { rows: 1000, errors: 50, floor: 0.05 },
    });
    // invented numbers, hand arithmetic: weights 3000 and 3000 → π = 0.5 each; n = 1 / (0.25 / 400) = 1600;
    // value (3000 × 0.03 + 3000 × 0.05) / 6000 = 0.04
    expectClose(s.floor.n, 1600, 1e-9);
    expectClose(s.floor.value, 0.04, EXACT);
    expect(s.floor.source).toBe('mixed');
  });
});

describe('fixed floor: exact binomial test when n · floor < 5 or floor = 0', () => {
  it('floor 0.2 %, 6 errors in 1,000 train rows (1000 × 0.002 = 2 < 5)', () => {
    // fixture (hand-built): invented numbers
    const s = one({ train: { rows: 1000, errors: 6, floor: 0.002 }, dev: { rows: 1000, errors: 6, floor: 0.002 } });
    // scipy 1.10.1: binomtest(6, 1000, 0.002).pvalue -> 0.016455364615135783
    expectClose(s.gaps.avoidable_bias?.p, 0.016455364615135783, LIBRARY);
    // statsmodels 0.13.5: proportion_confint(6, 1000, method='wilson') -> (0.0027526691418763736, 0.01302816824185209); minus 0.002
    expectClose(s.gaps.avoidable_bias?.lo, 0.0027526691418763736 - 0.002, LIBRARY);
    expectClose(s.gaps.avoidable_bias?.hi, 0.01302816824185209 - 0.002, LIBRARY);
  });

  it('floor 0: any error rejects it (p = 0); no errors gives p = 1', () => {
    // fixture (hand-built): invented numbers
    const s = one({ train: { rows: 1000, errors: 6 }, dev: { rows: 1000, errors: 6 } });
    // scipy 1.10.1: binomtest(6, 1000, 0).pvalue -> 0.0
    expect(s.gaps.avoidable_bias?.p).toBe(0);
    // statsmodels 0.13.5: proportion_confint(6, 1000, method='wilson') -> (0.0027526691418763736, 0.01302816824185209); minus 0
    expectClose(s.gaps.avoidable_bias?.lo, 0.0027526691418763736, LIBRARY);
    const z = one({ train: { rows: 1000, errors: 0 }, dev: { rows: 1000, errors: 0 } });
    // scipy 1.10.1: binomtest(0, 1000, 0).pvalue -> 1.0
    expect(z.gaps.avoidable_bias?.p).toBe(1);
    expect(z.focus).toBe('at-floor');
  });
});
