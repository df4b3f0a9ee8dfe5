import { describe, it, expect } from 'vitest';
import { benjaminiHochberg } from '../../src/stats/benjamini-hochberg.js';
import { benjaminiYekutieli } from '../../src/stats/benjamini-yekutieli.js';
import { expectClose } from './expect-close.js';

const LIBRARY = 1e-9; // same adjustment as statsmodels, so agreement is to rounding

// Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57:289, §4.2 worked example: 15 p-values.
const PAPER_P = [
  0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0,
];

describe('benjaminiYekutieli', () => {
  it('matches statsmodels multipletests(method="fdr_by") on the 1995 worked example', () => {
    // statsmodels 0.13.5: multipletests(PAPER_P, alpha=0.05, method='fdr_by')[1] ->
    // [0.004977343489843491, 0.009954686979686982, 0.03152317543567544, 0.11821190788378289,
    //  0.20008920829170831, 0.21189262285333715, 0.21189262285333715, 0.2140257700632701,
    //  0.253844517982018, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0]
    const expected = [
      0.004977343489843491, 0.009954686979686982, 0.03152317543567544, 0.11821190788378289, 0.20008920829170831,
      0.21189262285333715, 0.21189262285333715, 0.2140257700632701, 0.253844517982018, 1, 1, 1, 1, 1, 1,
    ];
    const q = benjaminiYekutieli(PAPER_P);
    expected.forEach((value, i) => expectClose(q[i], value, LIBRARY));
  });

  it('is more conservative than BH: rejects three, not four, at 0.05', () => {
    // statsmodels 0.13.5: multipletests(PAPER_P, alpha=0.05, method='fdr_by')[0]
    //   -> [True, True, True, False, ..., False]   (fdr_bh rejects four, see benjamini-hochberg.test.ts)
    const rejected = benjaminiYekutieli(PAPER_P).map((q) => q !== null && q <= 0.05);
    expect(rejected).toEqual([true, true, true, ...Array<boolean>(12).fill(false)]);
    // Benjamini & Yekutieli 2001, Ann. Stat. 29:1165, Thm 1.3: BY = BH with m·c(m), c(m) ≥ 1, so q_BY ≥ q_BH
    const bh = benjaminiHochberg(PAPER_P) as number[];
    (benjaminiYekutieli(PAPER_P) as number[]).forEach((q, i) => expect(q).toBeGreaterThanOrEqual(bh[i]));
  });

  it('passes nulls through and does not count them in m', () => {
    // statsmodels 0.13.5 on the non-null entries only (m = 5, c(5) = 137/60):
    // multipletests([0.04, 0.01, 0.2, 0.03, 0.9], method='fdr_by')[1]
    //   -> [0.15222222222222223, 0.11416666666666667, 0.5708333333333333, 0.15222222222222223, 1.0]
    const q = benjaminiYekutieli([0.04, null, 0.01, 0.2, null, 0.03, 0.9]);
    expect(q[1]).toBeNull();
    expect(q[4]).toBeNull();
    expectClose(q[0], 0.15222222222222223, LIBRARY);
    expectClose(q[2], 0.11416666666666667, LIBRARY);
    expectClose(q[3], 0.5708333333333333, LIBRARY);
    expectClose(q[5], 0.15222222222222223, LIBRARY);
    expect(q[6]).toBe(1); // capped at 1 (statsmodels value above: 1.0)
  });

  it('handles small and empty input', () => {
    // statsmodels 0.13.5: multipletests([0.01, 0.04], method='fdr_by')[1] -> [0.03, 0.06]
    const q = benjaminiYekutieli([0.01, null, 0.04]);
    expectClose(q[0], 0.03, LIBRARY);
    expect(q[1]).toBeNull();
    expectClose(q[2], 0.06, LIBRARY);
    // statsmodels 0.13.5: multipletests([0.03], method='fdr_by')[1] -> [0.03] (c(1) = 1)
    expect(benjaminiYekutieli([0.03])).toEqual([0.03]);
    // contract (this module): nothing tested -> nothing adjusted
    expect(benjaminiYekutieli([])).toEqual([]);
    expect(benjaminiYekutieli([null])).toEqual([null]);
  });

  it('rejects NaN and values outside [0, 1]', () => {
    // contract (this module): RangeError naming the offending entry
    expect(() => benjaminiYekutieli([Number.NaN])).toThrow(/p\[0\] must be a number in \[0, 1\], got NaN/);
    expect(() => benjaminiYekutieli([2])).toThrow(RangeError);
  });
});
