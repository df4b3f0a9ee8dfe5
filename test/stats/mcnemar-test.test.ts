import { describe, it, expect } from 'vitest';
import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import { mcnemarTest } from '../../src/stats/mcnemar-test.js';
import { expectClose, expectRelClose } from './expect-close.js';

const LIBRARY = 1e-9; // same statistic and p-value definition as the reference library, so agreement is to rounding

// statsmodels 0.13.5 reads b and c off the table as table[0, 1] and table[1, 0]:
// mcnemar([[_, b], [c, _]], ...). The diagonal (concordant pairs) does not enter the test.

describe('mcnemarTest: chi-square branch (b + c ≥ 25)', () => {
  it('matches the prime-minister approval table [[794, 150], [86, 570]]', () => {
    // data: Agresti 2002, Categorical Data Analysis 2nd ed., Table 10.1 (1600 people rated twice); the
    // text reports z² = 17.36 (quoted from memory of the book). Exact values:
    // statsmodels 0.13.5: mcnemar([[794, 150], [86, 570]], exact=False, correction=False)
    //   -> statistic 17.35593220338983, pvalue 3.099293441045215e-05
    const result = mcnemarTest(150, 86);
    expect(result.method).toBe('chi-square');
    expectClose(result.statistic, 17.35593220338983, 1e-12);
    expectRelClose(result.p, 3.099293441045215e-5, 1e-9);
    // scipy 1.10.1: chi2.sf(17.35593220338983, 1) -> 3.099293441045215e-05 (same value)
  });

  it('is symmetric in b and c', () => {
    // statsmodels 0.13.5: mcnemar([[0, 86], [150, 0]], exact=False, correction=False)
    //   -> statistic 17.35593220338983, pvalue 3.099293441045215e-05
    const result = mcnemarTest(86, 150);
    expectClose(result.statistic, 17.35593220338983, 1e-12);
    expectRelClose(result.p, 3.099293441045215e-5, 1e-9);
  });

  it.each([
    // statsmodels 0.13.5: mcnemar([[0, 13], [12, 0]], exact=False, correction=False) -> statistic 0.04, pvalue 0.841480581121794
    [13, 12, 0.04, 0.841480581121794], // p > ½: 1 − chi-square CDF
    // statsmodels 0.13.5: mcnemar([[0, 20], [16, 0]], exact=False, correction=False) -> statistic 0.4444444444444444, pvalue 0.5049850750938457
    [20, 16, 0.4444444444444444, 0.5049850750938457], // just below the switch at χ² = 0.454936… (chi2.ppf(0.5, 1))
    // statsmodels 0.13.5: mcnemar([[0, 19], [15, 0]], exact=False, correction=False) -> statistic 0.47058823529411764, pvalue 0.4927166772270877
    [19, 15, 0.47058823529411764, 0.4927166772270877], // just above the switch: 2·Φ(−√χ²)
    // statsmodels 0.13.5: mcnemar([[0, 7], [18, 0]], exact=False, correction=False) -> statistic 4.84, pvalue 0.027806895026997264
    [7, 18, 4.84, 0.027806895026997264],
  ])('b=%i c=%i -> statistic %f, p %f', (b, c, statistic, p) => {
    const result = mcnemarTest(b, c);
    expect(result.method).toBe('chi-square');
    expectClose(result.statistic, statistic, 1e-12);
    expectClose(result.p, p, LIBRARY);
  });

  it('keeps relative accuracy for tiny p-values', () => {
    // scipy 1.10.1: chi2.sf(132.8048780487805, 1) -> 9.9749198126549e-31
    // statsmodels 0.13.5: mcnemar([[0, 185], [20, 0]], exact=False, correction=False)
    //   -> statistic 132.8048780487805, pvalue 9.9749198126549e-31
    // (1 − chi-square CDF rounds to 0 here)
    const near30 = mcnemarTest(185, 20);
    expectClose(near30.statistic, 132.8048780487805, 1e-10);
    expectRelClose(near30.p, 9.9749198126549e-31, 1e-12);
    // statsmodels 0.13.5: mcnemar([[0, 300], [20, 0]], exact=False, correction=False) -> statistic 245.0, pvalue 3.195421034621222e-55
    const near55 = mcnemarTest(300, 20);
    expect(near55.statistic).toBe(245);
    expectRelClose(near55.p, 3.195421034621222e-55, 1e-12);
  });

  it('b = c gives statistic 0 and p = 1', () => {
    // statsmodels 0.13.5: mcnemar([[0, 13], [13, 0]], exact=False, correction=False) -> statistic 0.0, pvalue 1.0
    expect(mcnemarTest(13, 13)).toEqual({ statistic: 0, p: 1, method: 'chi-square' });
  });
});

describe('mcnemarTest: exact branch (b + c < 25)', () => {
  it('matches the table [[0, 10], [3, 0]]', () => {
    // statsmodels 0.13.5: mcnemar([[0, 10], [3, 0]], exact=True) -> statistic 3.0, pvalue 0.09228515625
    // scipy 1.10.1: binomtest(3, 13).pvalue -> 0.09228515625; R binom.test(3, 13)$p.value = 0.09229 (quoted from memory)
    expect(mcnemarTest(10, 3)).toEqual({ statistic: null, p: 0.09228515625, method: 'exact' });
    // scipy 1.10.1: binomtest(10, 13).pvalue -> 0.09228515625
    expect(mcnemarTest(3, 10)).toEqual({ statistic: null, p: 0.09228515625, method: 'exact' });
  });

  it.each([
    // statsmodels 0.13.5: mcnemar([[0, 5], [19, 0]], exact=True) -> statistic 5.0, pvalue 0.006610751152038574
    [5, 19, 0.006610751152038574],
    // statsmodels 0.13.5: mcnemar([[0, 18], [6, 0]], exact=True) -> statistic 6.0, pvalue 0.022655844688415527
    [18, 6, 0.022655844688415527],
    // statsmodels 0.13.5: mcnemar([[0, 0], [24, 0]], exact=True) -> statistic 0.0, pvalue 1.1920928955078125e-07
    [0, 24, 1.1920928955078125e-7],
    // statsmodels 0.13.5: mcnemar([[0, 1], [0, 0]], exact=True) -> statistic 0.0, pvalue 1.0
    [1, 0, 1],
    // statsmodels 0.13.5: mcnemar([[0, 11], [12, 0]], exact=True) -> statistic 11.0, pvalue 1.0 (odd n, min = (n − 1)/2)
    [11, 12, 1],
  ])('b=%i c=%i -> p %f', (b, c, p) => {
    const result = mcnemarTest(b, c);
    expect(result.method).toBe('exact');
    expect(result.statistic).toBeNull();
    expectRelClose(result.p, p, 1e-12);
  });

  it('equals 2·P(X ≤ min(b, c)) capped at 1 for every b + c < 25', () => {
    // statsmodels 0.13.5, statsmodels/stats/contingency_tables.py, mcnemar(exact=True):
    //   pvalue = stats.binom.cdf(statistic, int_sum, 0.5) * 2; pvalue = np.minimum(pvalue, 1)
    // with statistic = min(n1, n2); reproduced here with @stdlib binomial-cdf
    for (let n = 0; n < 25; n++) {
      for (let b = 0; b <= n; b++) {
        const expected = Math.min(1, 2 * binomialCdf(Math.min(b, n - b), n, 0.5));
        expectRelClose(mcnemarTest(b, n - b).p, expected, 1e-12);
      }
    }
  });

  it('b = c gives p = 1', () => {
    // statsmodels 0.13.5: mcnemar([[0, 12], [12, 0]], exact=True) -> statistic 12.0, pvalue 1.0
    expect(mcnemarTest(12, 12)).toEqual({ statistic: null, p: 1, method: 'exact' });
  });
});

describe('mcnemarTest: the b + c = 24 / 25 boundary', () => {
  it('b + c = 24 uses the exact test', () => {
    // statsmodels 0.13.5: mcnemar([[0, 5], [19, 0]], exact=True) -> statistic 5.0, pvalue 0.006610751152038574
    const result = mcnemarTest(5, 19);
    expect(result.method).toBe('exact');
    expect(result.statistic).toBeNull();
    expectRelClose(result.p, 0.006610751152038574, 1e-12);
  });

  it('b + c = 25 uses the chi-square statistic', () => {
    // statsmodels 0.13.5: mcnemar([[0, 6], [19, 0]], exact=False, correction=False) -> statistic 6.76, pvalue 0.009322376047437499
    const result = mcnemarTest(6, 19);
    expect(result.method).toBe('chi-square');
    expectClose(result.statistic, 6.76, 1e-12);
    expectClose(result.p, 0.009322376047437499, LIBRARY);
  });
});

describe('mcnemarTest: options.exactBelow', () => {
  it('exactBelow = Infinity always uses the exact test', () => {
    // statsmodels 0.13.5: mcnemar([[0, 150], [86, 0]], exact=True) -> statistic 86.0, pvalue 3.715936139571387e-05
    const result = mcnemarTest(150, 86, { exactBelow: Infinity });
    expect(result.method).toBe('exact');
    expect(result.statistic).toBeNull();
    expectRelClose(result.p, 3.715936139571387e-5, 1e-9);
  });

  it('exactBelow = 0 always uses the chi-square statistic', () => {
    // statsmodels 0.13.5: mcnemar([[0, 10], [3, 0]], exact=False, correction=False) -> statistic 3.769230769230769, pvalue 0.0522036353413146
    const result = mcnemarTest(10, 3, { exactBelow: 0 });
    expect(result.method).toBe('chi-square');
    expectClose(result.statistic, 3.769230769230769, 1e-12);
    expectClose(result.p, 0.0522036353413146, LIBRARY);
    // statsmodels 0.13.5: mcnemar([[0, 12], [12, 0]], exact=False, correction=False) -> statistic 0.0, pvalue 1.0
    expect(mcnemarTest(12, 12, { exactBelow: 0 })).toEqual({ statistic: 0, p: 1, method: 'chi-square' });
  });

  it('moves the boundary', () => {
    // contract (this module): exact while b + c < exactBelow
    expect(mcnemarTest(5, 5, { exactBelow: 10 }).method).toBe('chi-square');
    expect(mcnemarTest(5, 4, { exactBelow: 10 }).method).toBe('exact');
  });
});

describe('mcnemarTest: degenerate input', () => {
  it('b + c = 0 gives p = 1', () => {
    // statsmodels 0.13.5: mcnemar([[0, 0], [0, 0]], exact=True) -> statistic 0.0, pvalue 1.0
    expect(mcnemarTest(0, 0)).toEqual({ statistic: null, p: 1, method: 'exact' });
    // contract (this module): no discordant pairs, no evidence; statsmodels 0.13.5
    // mcnemar([[0, 0], [0, 0]], exact=False, correction=False) -> statistic nan, pvalue nan
    expect(mcnemarTest(0, 0, { exactBelow: 0 })).toEqual({ statistic: 0, p: 1, method: 'chi-square' });
  });

  it('rejects negative, non-integer, NaN and infinite counts and a bad exactBelow', () => {
    // contract (this module): RangeError with the function and argument named
    expect(() => mcnemarTest(-1, 3)).toThrow(/mcnemarTest: b must be a non-negative integer \(a count of pairs\), got -1/);
    expect(() => mcnemarTest(3, -2)).toThrow(/mcnemarTest: c must be a non-negative integer/);
    expect(() => mcnemarTest(2.5, 3)).toThrow(/b must be a non-negative integer .*got 2\.5/);
    expect(() => mcnemarTest(3, 0.1)).toThrow(/c must be a non-negative integer/);
    expect(() => mcnemarTest(Number.NaN, 3)).toThrow(/mcnemarTest: b must be a finite number, got NaN/);
    expect(() => mcnemarTest(3, Number.NaN)).toThrow(/mcnemarTest: c must be a finite number, got NaN/);
    expect(() => mcnemarTest(Infinity, 3)).toThrow(RangeError);
    expect(() => mcnemarTest(3, 4, { exactBelow: Number.NaN })).toThrow(/mcnemarTest: exactBelow must be a number, got NaN/);
    expect(() => mcnemarTest(3, 4, { exactBelow: -1 })).toThrow(/mcnemarTest: exactBelow must be >= 0, got -1/);
  });
});
