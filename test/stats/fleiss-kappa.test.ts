import { describe, it, expect } from 'vitest';
import { fleissItemAgreement, fleissKappa } from '../../src/stats/fleiss-kappa.js';
import { expectClose } from './expect-close.js';

const LIBRARY = 1e-12; // same formula as statsmodels, so agreement is to rounding

/** κ of an items × categories table of rater counts, through the sufficient statistics. */
function kappaOfTable(table: number[][]): number | null {
  const rated = table.filter((row) => row.reduce((a, b) => a + b, 0) >= 2);
  const sum = rated.reduce((acc, row) => acc + fleissItemAgreement(row), 0);
  const totals = rated[0]?.map((_, c) => rated.reduce((acc, row) => acc + row[c], 0)) ?? [];
  return fleissKappa(sum, rated.length, totals);
}

// 10 items × 14 raters × 5 categories: the worked example in statsmodels 0.13.5
// statsmodels/stats/tests/test_inter_rater.py (`table1`, last column of `table0` = P_i to 3 decimals).
const TABLE_14_RATERS = [
  [0, 0, 0, 0, 14],
  [0, 2, 6, 4, 2],
  [0, 0, 3, 5, 6],
  [0, 3, 9, 2, 0],
  [2, 2, 8, 1, 1],
  [7, 7, 0, 0, 0],
  [3, 2, 6, 3, 0],
  [2, 5, 3, 2, 2],
  [6, 5, 2, 1, 0],
  [0, 2, 2, 3, 7],
];

// Fleiss 1971 (Psychol. Bull. 76:378) diagnoses: 30 patients × 6 psychiatrists × 5 diagnoses, as
// counts per category — statsmodels 0.13.5: aggregate_raters(diagnoses)[0] with `diagnoses` from
// statsmodels/stats/tests/test_inter_rater.py (comment there: "Fleiss 1971").
const FLEISS_1971 = [
  [0, 0, 0, 6, 0], [0, 3, 0, 0, 3], [0, 1, 4, 0, 1], [0, 0, 0, 0, 6], [0, 3, 0, 3, 0],
  [2, 0, 4, 0, 0], [0, 0, 4, 0, 2], [2, 0, 3, 1, 0], [2, 0, 0, 4, 0], [0, 0, 0, 0, 6],
  [1, 0, 0, 5, 0], [1, 1, 0, 4, 0], [0, 3, 3, 0, 0], [1, 0, 0, 5, 0], [0, 2, 0, 3, 1],
  [0, 0, 5, 0, 1], [3, 0, 0, 1, 2], [5, 1, 0, 0, 0], [0, 2, 0, 4, 0], [1, 0, 2, 0, 3],
  [0, 0, 0, 0, 6], [0, 1, 0, 5, 0], [0, 2, 0, 1, 3], [2, 0, 0, 4, 0], [1, 0, 0, 4, 1],
  [0, 5, 0, 1, 0], [4, 0, 0, 0, 2], [0, 2, 0, 4, 0], [1, 0, 5, 0, 0], [0, 0, 0, 0, 6],
];

describe('fleissKappa: statsmodels 0.13.5 fleiss_kappa(table) (method="fleiss")', () => {
  it('10 items × 14 raters × 5 categories -> 0.20993070442195522', () => {
    // statsmodels 0.13.5: fleiss_kappa(table1) -> 0.20993070442195522 (its test asserts 0.210 to 3 decimals)
    expectClose(kappaOfTable(TABLE_14_RATERS), 0.20993070442195522, LIBRARY);
  });

  it('Fleiss 1971 diagnoses, 30 items × 6 raters × 5 categories -> 0.43024452006014074', () => {
    // statsmodels 0.13.5: fleiss_kappa(aggregate_raters(diagnoses)[0]) -> 0.43024452006014074
    // (Fleiss 1971 reports κ = .430 for these data — quoted from memory, matches to 3 decimals)
    expectClose(kappaOfTable(FLEISS_1971), 0.43024452006014074, LIBRARY);
  });

  it.each([
    // statsmodels 0.13.5: fleiss_kappa([[3,0,0],[2,1,0],[1,1,1],[0,3,0],[0,2,1],[0,0,3],[1,0,2],[3,0,0]]) -> 0.4285714285714285
    [[[3, 0, 0], [2, 1, 0], [1, 1, 1], [0, 3, 0], [0, 2, 1], [0, 0, 3], [1, 0, 2], [3, 0, 0]], 0.4285714285714285],
    // statsmodels 0.13.5: fleiss_kappa([[7, 1], [3, 5]]) -> 0.16190476190476205 (its test: online calculator 0.161905)
    [[[7, 1], [3, 5]], 0.16190476190476205],
    // statsmodels 0.13.5: fleiss_kappa([[6, 1, 0], [0, 7, 0]]) -> 0.7083333333333335 (its test: online calculator 0.708333)
    [[[6, 1, 0], [0, 7, 0]], 0.7083333333333335],
  ])('table %j -> %f', (table, expected) => {
    expectClose(kappaOfTable(table), expected, LIBRARY);
  });
});

describe('fleissKappa: varying number of raters', () => {
  it('pools category totals over items with 2, 3 and 4 raters (hand arithmetic)', () => {
    // by hand, categories (c0, c1, c2):
    //   [3, 0, 0] n=3: P = 3·2/(3·2) = 1;   [1, 1, 0] n=2: P = 0;   [2, 2, 0] n=4: P = (2 + 2)/12 = 1/3;
    //   [0, 2, 0] n=2: P = 1;   [0, 0, 1] n=1: left out (no rater pair)
    //   Σ P_i = 7/3 over N = 4 items -> P̄ = 7/12; totals (6, 5, 0), T = 11 -> P_e = (36 + 25)/121 = 61/121
    //   κ = (7/12 − 61/121)/(60/121) = (847 − 732)/720 = 115/720 = 23/144
    const items = [
      [3, 0, 0],
      [1, 1, 0],
      [2, 2, 0],
      [0, 2, 0],
      [0, 0, 1],
    ];
    expectClose(kappaOfTable(items), 23 / 144, 1e-15);
    expectClose(fleissKappa(7 / 3, 4, [6, 5, 0]), 23 / 144, 1e-15);
  });

  it('equals the fixed-raters κ when every item has the same number of raters', () => {
    // statsmodels 0.13.5: fleiss_kappa([[7, 1], [3, 5]]) -> 0.16190476190476205, by the sufficient statistics:
    //   P_1 = (7·6 + 0)/(8·7) = 0.75, P_2 = (3·2 + 5·4)/56 = 26/56; totals (10, 6)
    expectClose(fleissKappa(0.75 + 26 / 56, 2, [10, 6]), 0.16190476190476205, LIBRARY);
  });
});

describe('fleissItemAgreement', () => {
  it('matches the P_i column of the 14-rater worked example (3 decimals)', () => {
    // statsmodels 0.13.5 test_inter_rater.py, `table0` last column: P_i printed to 3 decimals
    const printed = [1.0, 0.253, 0.308, 0.44, 0.33, 0.462, 0.242, 0.176, 0.286, 0.286];
    TABLE_14_RATERS.forEach((row, i) => expectClose(fleissItemAgreement(row), printed[i], 5e-4));
    // Fleiss 1971 definition by hand: [0, 2, 6, 4, 2] -> (2 + 30 + 12 + 2)/(14·13) = 46/182
    expect(fleissItemAgreement([0, 2, 6, 4, 2])).toBe(46 / 182);
  });

  it('is 1 for unanimity and 0 when no two raters agree', () => {
    // Fleiss 1971 definition: the share of ordered rater pairs that agree
    expect(fleissItemAgreement([3, 0])).toBe(1);
    expect(fleissItemAgreement([1, 1])).toBe(0);
    expect(fleissItemAgreement([1, 1, 1, 1])).toBe(0);
  });

  it('rejects fewer than two raters, negative or non-integer counts', () => {
    // contract (this module): RangeError naming the function and the entry
    expect(() => fleissItemAgreement([1, 0])).toThrow(/fleissItemAgreement: an item needs at least 2 raters/);
    expect(() => fleissItemAgreement([])).toThrow(RangeError);
    expect(() => fleissItemAgreement([2, -1])).toThrow(/counts\[1\] must be a non-negative integer, got -1/);
    expect(() => fleissItemAgreement([2.5, 1])).toThrow(/counts\[0\] must be a non-negative integer/);
    expect(() => fleissItemAgreement([Number.NaN, 2])).toThrow(/counts\[0\] must be a finite number, got NaN/);
  });
});

describe('fleissKappa: degenerate input', () => {
  it('returns null with no items or a single category in use', () => {
    // contract (this module): κ = 0/0 is reported as null
    expect(fleissKappa(0, 0, [])).toBeNull();
    expect(fleissKappa(0, 0, [0, 0])).toBeNull();
    // statsmodels 0.13.5: fleiss_kappa([[7, 0], [7, 0]]) -> nan (P_e = 1; RuntimeWarning: invalid value encountered in scalar divide)
    expect(fleissKappa(2, 2, [14, 0])).toBeNull();
  });

  it('rejects NaN, negatives, Σ P_i > N and missing totals', () => {
    // contract (this module): RangeError naming the function and the argument
    expect(() => fleissKappa(Number.NaN, 2, [4, 2])).toThrow(/fleissKappa: sumItemAgreement must be a finite number, got NaN/);
    expect(() => fleissKappa(1, Number.NaN, [4, 2])).toThrow(/items must be a finite number/);
    expect(() => fleissKappa(1, -1, [4, 2])).toThrow(/items must be >= 0/);
    expect(() => fleissKappa(3, 2, [4, 2])).toThrow(/sumItemAgreement must be in \[0, items\] = \[0, 2\], got 3/);
    expect(() => fleissKappa(1, 2, [4, -2])).toThrow(/categoryTotals\[1\] must be >= 0/);
    expect(() => fleissKappa(1, 2, [0, 0])).toThrow(/categoryTotals must count the ratings/);
  });
});
