import { describe, it, expect } from 'vitest';
import { cohensKappa } from '../../src/stats/cohens-kappa.js';
import { expectClose } from './expect-close.js';

const LIBRARY = 1e-12; // same formula as statsmodels, so agreement is to rounding

/** Sufficient statistics of a square contingency table (rows: rater A, columns: rater B). */
function fromTable(table: number[][]): [number, number, number[], number[]] {
  const agree = table.reduce((sum, row, i) => sum + row[i], 0);
  const rows = table.map((row) => row.reduce((a, b) => a + b, 0));
  const cols = table[0].map((_, j) => table.reduce((sum, row) => sum + row[j], 0));
  return [agree, rows.reduce((a, b) => a + b, 0), rows, cols];
}

describe('cohensKappa: statsmodels 0.13.5 cohens_kappa(table).kappa', () => {
  it('2 × 2 table [[20, 5], [10, 15]] -> 0.4', () => {
    // statsmodels 0.13.5: cohens_kappa(np.array([[20, 5], [10, 15]])).kappa -> 0.3999999999999999
    // by hand: p_o = 35/50 = 0.7, p_e = (25·30 + 25·20)/50² = 0.5, κ = 0.2/0.5 = 0.4
    expectClose(cohensKappa(35, 50, [25, 25], [30, 20]), 0.4, LIBRARY);
    expect(fromTable([[20, 5], [10, 15]])).toEqual([35, 50, [25, 25], [30, 20]]);
  });

  it.each([
    // statsmodels 0.13.5: cohens_kappa(np.array([[0, 4, 1], [0, 8, 0], [0, 1, 5]])).kappa -> 0.48416289592760187
    //   (the SAS example in statsmodels' test_inter_rater.py, SAS printout: Kappa 0.4842)
    [[[0, 4, 1], [0, 8, 0], [0, 1, 5]], 0.48416289592760187],
    // statsmodels 0.13.5: cohens_kappa(np.array([[25, 3, 2], [4, 30, 6], [1, 5, 24]])).kappa -> 0.6827794561933536
    [[[25, 3, 2], [4, 30, 6], [1, 5, 24]], 0.6827794561933536],
    // statsmodels 0.13.5: cohens_kappa(np.array([[10, 0], [0, 10]])).kappa -> 1.0
    [[[10, 0], [0, 10]], 1],
    // statsmodels 0.13.5: cohens_kappa(np.array([[5, 5], [5, 5]])).kappa -> 0.0
    [[[5, 5], [5, 5]], 0],
    // statsmodels 0.13.5: cohens_kappa(np.array([[0, 10], [10, 0]])).kappa -> -1.0
    [[[0, 10], [10, 0]], -1],
  ])('table %j -> %f', (table, expected) => {
    const [agree, items, a, b] = fromTable(table);
    expectClose(cohensKappa(agree, items, a, b), expected, LIBRARY);
  });
});

describe('cohensKappa: contract', () => {
  it('is symmetric in the two raters', () => {
    // Cohen 1960 (Educ. Psychol. Meas. 20:37): κ depends on the marginals only through Σ a_c·b_c
    expect(cohensKappa(13, 19, [5, 8, 6], [0, 13, 6])).toBe(cohensKappa(13, 19, [0, 13, 6], [5, 8, 6]));
  });

  it('accepts non-integer (weighted) counts', () => {
    // statsmodels 0.13.5: cohens_kappa(np.array([[10.5, 2.5], [1.25, 6.75]])).kappa -> 0.6324387397899649
    // by hand: p_o = 17.25/21, p_e = (13·11.75 + 8·9.25)/21², κ = (21·17.25 − 226.75)/(441 − 226.75) = 135.5/214.25
    expectClose(cohensKappa(17.25, 21, [13, 8], [11.75, 9.25]), 0.6324387397899649, LIBRARY);
  });

  it('returns null with no items or when chance agreement is 1', () => {
    // contract (this module): κ = 0/0 is reported as null
    expect(cohensKappa(0, 0, [0, 0], [0, 0])).toBeNull();
    expect(cohensKappa(0, 0, [], [])).toBeNull();
    // statsmodels 0.13.5: cohens_kappa(np.array([[10, 0], [0, 0]])).kappa -> nan (RuntimeWarning: invalid value encountered in scalar divide)
    expect(cohensKappa(10, 10, [10, 0], [10, 0])).toBeNull();
  });

  it('rejects NaN, negative counts and inconsistent marginals', () => {
    // contract (this module): RangeError naming the function and the argument
    expect(() => cohensKappa(Number.NaN, 50, [25, 25], [30, 20])).toThrow(/cohensKappa: agree must be a finite number, got NaN/);
    expect(() => cohensKappa(35, 50, [25, Number.NaN], [30, 20])).toThrow(/marginalsA\[1\] must be a finite number/);
    expect(() => cohensKappa(35, 50, [25, 25], [30, -20])).toThrow(/marginalsB\[1\] must be >= 0/);
    expect(() => cohensKappa(35, -1, [25, 25], [30, 20])).toThrow(/items must be >= 0/);
    expect(() => cohensKappa(35, 50, [25, 25], [30, 20, 0])).toThrow(/same categories/);
    expect(() => cohensKappa(35, 50, [25, 20], [30, 20])).toThrow(/marginalsA must sum to items = 50, got 45/);
    expect(() => cohensKappa(35, 50, [25, 25], [30, 30])).toThrow(/marginalsB must sum to items = 50, got 60/);
    // agree ≤ Σ min(a_c, b_c) = 25 + 20 = 45
    expect(() => cohensKappa(46, 50, [25, 25], [30, 20])).toThrow(/agree must be in \[0, Σ min/);
    expect(() => cohensKappa(-1, 50, [25, 25], [30, 20])).toThrow(RangeError);
  });
});
