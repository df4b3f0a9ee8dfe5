import { describe, it, expect } from 'vitest';
import { benjaminiHochberg } from '../../src/stats/benjamini-hochberg.js';
import { expectClose } from './expect-close.js';

const LIBRARY = 1e-9; // same adjustment as statsmodels, so agreement is to rounding

// Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57:289, §4.2 worked example: 15 p-values.
const PAPER_P = [
  0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0,
];

describe('benjaminiHochberg', () => {
  it('rejects exactly the four smallest of the 1995 worked example at q = 0.05', () => {
    // Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57:289, worked example: BH at q* = 0.05
    // rejects the four hypotheses with the smallest p-values (p ≤ 0.0095)
    // also statsmodels 0.13.5: multipletests(p, alpha=0.05, method='fdr_bh')[0]
    //   -> [True, True, True, True, False, False, ..., False]
    const rejected = benjaminiHochberg(PAPER_P).map((q) => q !== null && q <= 0.05);
    expect(rejected).toEqual([true, true, true, true, ...Array<boolean>(11).fill(false)]);
  });

  it('matches statsmodels multipletests(method="fdr_bh") on the worked example', () => {
    // statsmodels 0.13.5: multipletests(PAPER_P, alpha=0.05, method='fdr_bh')[1] ->
    // [0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.06385714285714286, 0.06385714285714286, 0.0645,
    //  0.07650000000000001, 0.48600000000000004, 0.5811818181818182, 0.7148749999999999,
    //  0.7532307692307693, 0.8132142857142857, 1.0]
    const expected = [
      0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.06385714285714286, 0.06385714285714286, 0.0645, 0.07650000000000001,
      0.48600000000000004, 0.5811818181818182, 0.7148749999999999, 0.7532307692307693, 0.8132142857142857, 1.0,
    ];
    const q = benjaminiHochberg(PAPER_P);
    expected.forEach((value, i) => expectClose(q[i], value, LIBRARY));
  });

  it('keeps input order, passes nulls through and does not count them in m', () => {
    // statsmodels 0.13.5 on the non-null entries only (m = 5):
    // multipletests([0.04, 0.01, 0.2, 0.03, 0.9], method='fdr_bh')[1]
    //   -> [0.06666666666666667, 0.049999999999999996, 0.25, 0.06666666666666667, 0.9]
    const q = benjaminiHochberg([0.04, null, 0.01, 0.2, null, 0.03, 0.9]);
    expect(q[1]).toBeNull();
    expect(q[4]).toBeNull();
    expectClose(q[0], 0.06666666666666667, LIBRARY);
    expectClose(q[2], 0.049999999999999996, LIBRARY);
    expectClose(q[3], 0.25, LIBRARY);
    expectClose(q[5], 0.06666666666666667, LIBRARY);
    expectClose(q[6], 0.9, LIBRARY);
  });

  it('is monotone in p, never below p, and capped at 1', () => {
    // properties of BH adjusted p-values (Benjamini & Hochberg 1995; R p.adjust "BH")
    const p = [0.9, 0.5, 0.02, 0.8, 0.01, 0.6, 0.95];
    const q = benjaminiHochberg(p) as number[];
    const order = p.map((_, i) => i).sort((a, b) => p[a] - p[b]);
    for (let k = 1; k < order.length; k++) expect(q[order[k]]).toBeGreaterThanOrEqual(q[order[k - 1]]);
    q.forEach((value, i) => {
      expect(value).toBeGreaterThanOrEqual(p[i]);
      expect(value).toBeLessThanOrEqual(1);
    });
    // statsmodels 0.13.5: multipletests([1.0, 1.0], method='fdr_bh')[1] -> [1.0, 1.0]
    expect(benjaminiHochberg([1, 1])).toEqual([1, 1]);
  });

  it('handles empty, all-null, single and tied input', () => {
    // contract (this module): nothing tested -> nothing adjusted
    expect(benjaminiHochberg([])).toEqual([]);
    expect(benjaminiHochberg([null, null])).toEqual([null, null]);
    // statsmodels 0.13.5: multipletests([0.03], method='fdr_bh')[1] -> [0.03] (m = 1 leaves p unchanged)
    expect(benjaminiHochberg([0.03])).toEqual([0.03]);
    // statsmodels 0.13.5: multipletests([0.02, 0.02], method='fdr_bh')[1] -> [0.02, 0.02] (ties share one q-value)
    expect(benjaminiHochberg([0.02, 0.02])).toEqual([0.02, 0.02]);
  });

  it('rejects NaN and values outside [0, 1]', () => {
    // contract (this module): RangeError naming the offending entry
    expect(() => benjaminiHochberg([0.1, Number.NaN])).toThrow(/benjaminiHochberg: p\[1\] must be a number in \[0, 1\], got NaN/);
    expect(() => benjaminiHochberg([1.5])).toThrow(RangeError);
    expect(() => benjaminiHochberg([-0.01])).toThrow(RangeError);
  });
});
