import { describe, it, expect } from 'vitest';
import { tangoScoreTest, tangoVariance } from '../../src/stats/tango-score-test.js';
import { mcnemarTest } from '../../src/stats/mcnemar-test.js';
import { expectClose, expectRelClose } from './expect-close.js';

const REFERENCE = 1e-12; // the same statistic computed independently, so agreement is to rounding

// b = pairs wrong before and right after, c = right before and wrong after, Δ = after − before.
// Reference values: ref.py, the script in test/stats/tango-interval.test.ts (Debian's python3-scipy
// 1.10.1, the constrained estimate by brentq on the profile log-likelihood's derivative);
// `python3 ref.py b,c,n,delta,-9` prints z, z² and p = 2·norm.sf(|z|).

describe('tangoScoreTest: at Δ = 0 it is McNemar\'s test without continuity correction', () => {
  it('matches the prime-minister approval table [[794, 150], [86, 570]]', () => {
    // statsmodels 0.13.5: mcnemar([[794, 150], [86, 570]], exact=False, correction=False)
    //   -> statistic 17.35593220338983, pvalue 3.099293441045215e-05 (as in mcnemar-test.test.ts)
    // python3 ref.py 86,150,1600,0,-9 -> z=4.166045151386363 z2=17.355932203389827 p=3.0992934410452216e-05
    const result = tangoScoreTest(86, 150, 1600)!;
    expectClose(result.statistic, 17.35593220338983, 1e-12);
    expectRelClose(result.p, 3.099293441045215e-5, 1e-9);
    expectClose(result.z, 4.166045151386363, REFERENCE);
  });

  it('equals mcnemarTest(…, { exactBelow: 0 }) and (c − b)²/(b + c) for every table up to n = 20', () => {
    // McNemar 1947: χ² = (b − c)²/(b + c), whatever the concordant pairs; mcnemarTest names the
    // discordant pairs the other way round, and its statistic is symmetric in them
    for (let n = 1; n <= 20; n++) {
      for (let b = 0; b <= n; b++) {
        for (let c = 0; b + c <= n; c++) {
          const tango = tangoScoreTest(b, c, n)!;
          const mcnemar = mcnemarTest(c, b, { exactBelow: 0 });
          expectClose(tango.statistic, mcnemar.statistic!, 1e-12 * Math.max(1, mcnemar.statistic!));
          expectRelClose(tango.p, mcnemar.p, 1e-9);
          expect(Math.sign(tango.z)).toBe(Math.sign(c - b));
          if (b + c > 0) expectClose(tango.statistic, (c - b) ** 2 / (b + c), 1e-12 * Math.max(1, tango.statistic));
        }
      }
    }
  });

  it('b = c = 0 gives z = 0 and p = 1', () => {
    // contract (this module), as mcnemarTest(0, 0, { exactBelow: 0 }): no discordant pair, no evidence
    expect(tangoScoreTest(0, 0, 25)).toEqual({ z: 0, statistic: 0, p: 1 });
  });
});

describe('tangoScoreTest: Δ ≠ 0 (an independent computation, scipy 1.10.1)', () => {
  it.each([
    // python3 ref.py 3,9,32,0.1,-9 -> z=0.8379494832640958 z2=0.7021593365025651 p=0.4020590757754403
    [3, 9, 32, 0.1, 0.8379494832640958, 0.4020590757754403],
    // python3 ref.py 3,9,32,-0.2,-9 -> z=3.3413662365398844 z2=11.16472832668871 p=0.000833671762180072
    [3, 9, 32, -0.2, 3.3413662365398844, 0.000833671762180072],
    // python3 ref.py 86,150,1600,0.05,-9 -> z=-1.0401974822944877 z2=1.0820108021717911 p=0.29824816099270235
    [86, 150, 1600, 0.05, -1.0401974822944877, 0.29824816099270235],
    // python3 ref.py 1,19,20,-0.9,-9 -> z=18.467610337532776 z2=341.05263157894746 p=3.7638057386236495e-76
    [1, 19, 20, -0.9, 18.467610337532776, 3.7638057386236495e-76],
    // effective counts: python3 ref.py 2.7,8.4,30.5,0.3,-9 -> z=-1.0828864044001796 z2=1.1726429648347492 p=0.2788588472008233
    [2.7, 8.4, 30.5, 0.3, -1.0828864044001796, 0.2788588472008233],
    // python3 ref.py 0,0,20,0.1,-9 -> z=-1.4907119849998598 z2=2.2222222222222223 p=0.13603712811414362
    // (hand arithmetic: with b = c = 0, z² = nΔ/(1 − Δ) = 2/0.9 = 2.2222)
    [0, 0, 20, 0.1, -1.4907119849998598, 0.13603712811414362],
    // python3 ref.py 0,0,20,-0.1,-9 -> z=1.4907119849998598 z2=2.2222222222222223 p=0.13603712811414362
    [0, 0, 20, -0.1, 1.4907119849998598, 0.13603712811414362],
  ])('b=%f c=%f n=%f Δ=%f -> z %f, p %f', (b, c, n, delta, z, p) => {
    const result = tangoScoreTest(b, c, n, delta)!;
    expectClose(result.z, z, REFERENCE * Math.max(1, Math.abs(z)));
    expectClose(result.statistic, z * z, 1e-11 * Math.max(1, z * z));
    expectRelClose(result.p, p, 1e-9);
  });

  it('the variance at Δ = 0 is b + c, at the estimate n(p̂_b + p̂_c − d²)', () => {
    // hand arithmetic on invented numbers: b = 3, c = 9, n = 32: at Δ = 0, 3 + 9 = 12; at Δ = d = 0.1875,
    // the constraint holds at the unconstrained estimate q = b/n, so 32·(12/32 − 0.1875²) = 10.875
    expectClose(tangoVariance(3, 9, 32, 0), 12, 1e-12);
    expectClose(tangoVariance(3, 9, 32, 0.1875), 10.875, 1e-12);
  });
});

describe('tangoScoreTest: edges and bad input', () => {
  it('a Δ of ±1 the data rule out gives an infinite statistic and p = 0; one they allow gives p = 1', () => {
    // contract (this module), from Tango's statistic: the variance is 0 at Δ = ±1
    expect(tangoScoreTest(3, 9, 32, 1)).toEqual({ z: -Infinity, statistic: Infinity, p: 0 });
    expect(tangoScoreTest(3, 9, 32, -1)).toEqual({ z: Infinity, statistic: Infinity, p: 0 });
    expect(tangoScoreTest(32, 0, 32, -1)).toEqual({ z: 0, statistic: 0, p: 1 });
    expect(tangoScoreTest(0, 32, 32, 1)).toEqual({ z: 0, statistic: 0, p: 1 });
  });

  it('returns null without pairs and rejects bad input', () => {
    // contract (this module): null when n <= 0; RangeError with the function and argument named
    expect(tangoScoreTest(0, 0, 0)).toBeNull();
    expect(() => tangoScoreTest(1, 1, 10, 1.5)).toThrow(/tangoScoreTest: delta must be in \[-1, 1\], got 1.5/);
    expect(() => tangoScoreTest(1, 1, 10, Number.NaN)).toThrow(/tangoScoreTest: delta must be a finite number, got NaN/);
    expect(() => tangoScoreTest(Number.NaN, 1, 10)).toThrow(/tangoScoreTest: b must be a finite number, got NaN/);
    expect(() => tangoScoreTest(1, -2, 10)).toThrow(/tangoScoreTest: c must be in \[0, n\] = \[0, 10\], got -2/);
    expect(() => tangoScoreTest(6, 5, 10)).toThrow(/tangoScoreTest: b \+ c must be at most n = 10, got 11/);
  });
});
