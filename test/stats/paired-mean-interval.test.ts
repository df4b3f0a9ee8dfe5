import { describe, it, expect } from 'vitest';
import { pairedMeanInterval, type PairedWeightSums } from '../../src/stats/paired-mean-interval.js';
import { tangoInterval } from '../../src/stats/tango-interval.js';
import { kishEffectiveN } from '../../src/stats/kish-effective-n.js';
import { expectClose, expectRelClose } from './expect-close.js';

const REFERENCE = 1e-12; // the same interval inverted independently, so agreement is to rounding

/** The weight sums of pairs given as [weight, D] (D = e_after − e_before), summed in order. */
function sumsOf(pairs: readonly (readonly [number, -1 | 0 | 1])[]): PairedWeightSums {
  const s = { sumW: 0, sumW2: 0, bSumW: 0, bSumW2: 0, cSumW: 0, cSumW2: 0 };
  for (const [w, d] of pairs) {
    s.sumW += w;
    s.sumW2 += w * w;
    if (d === -1) {
      s.bSumW += w;
      s.bSumW2 += w * w;
    } else if (d === 1) {
      s.cSumW += w;
      s.cSumW2 += w * w;
    }
  }
  return s;
}

/** Unit weights: b pairs with D = −1, c with D = 1, the rest 0. */
const unweighted = (b: number, c: number, n: number): PairedWeightSums => ({ sumW: n, sumW2: n, bSumW: b, bSumW2: b, cSumW: c, cSumW2: c });

// The invented weighted split: b pairs of weight 2, 0.5, 1.5; c pairs of 1, 3, 2.5, 0.5, 1; concordant
// pairs: 20 of weight 1, 10 of 2, 4 of 0.25. Reference: weighted.py, run with Debian's python3-numpy
// and python3-scipy 1.10.1 (/usr/bin/python3) beside ref.py (the script in test/stats/tango-interval.test.ts):
//
//   import numpy as np
//   from ref import interval
//   b_w = [2, 0.5, 1.5]
//   c_w = [1, 3, 2.5, 0.5, 1]
//   o_w = [1] * 20 + [2] * 10 + [0.25] * 4
//   w = np.array(b_w + c_w + o_w, dtype=float)
//   D = np.array([-1] * len(b_w) + [1] * len(c_w) + [0] * len(o_w), dtype=float)
//   W, W2 = w.sum(), (w * w).sum()
//   dhat = (w * D).sum() / W
//   var = (w * w * (D - dhat) ** 2).sum() / W ** 2
//   neff = W ** 2 / W2
//   beff, ceff = neff * sum(b_w) / W, neff * sum(c_w) / W
//   print('dhat', repr(dhat), 'var', repr(var), 'neff', repr(neff), 'beff', repr(beff), 'ceff', repr(ceff))
//   print('interval', interval(beff, ceff, neff))
//
// prints: dhat 0.07547169811320754 var 0.00812371261016914 neff 33.34124629080119
//   beff 2.516320474777448 ceff 5.032640949554896; interval (-0.0989615634491754, 0.2524578188694154)
const WEIGHTED: (readonly [number, -1 | 0 | 1])[] = [
  ...[2, 0.5, 1.5].map((w) => [w, -1] as const),
  ...[1, 3, 2.5, 0.5, 1].map((w) => [w, 1] as const),
  ...[...Array<number>(20).fill(1), ...Array<number>(10).fill(2), ...Array<number>(4).fill(0.25)].map((w) => [w, 0] as const),
];

describe('pairedMeanInterval: unweighted pairs', () => {
  it('gives exactly tangoInterval(b, c, n) for every table up to n = 15', () => {
    // contract (this module): equal weights give n_eff = n, b_eff = b, c_eff = c exactly
    for (let n = 1; n <= 15; n++) {
      for (let b = 0; b <= n; b++) {
        for (let c = 0; b + c <= n; c++) {
          const result = pairedMeanInterval(unweighted(b, c, n))!;
          expect(result.interval).toEqual(tangoInterval(b, c, n));
          expect(result.nEff).toBe(n);
          expect(result.estimate).toBe((c - b) / n);
        }
      }
    }
  });

  it('stays exact for trillions of pairs and at other levels', () => {
    // contract (this module): Σw·(Σw/Σw²) is n exactly, where (Σw)²/Σw² is not once n² passes 2^53
    const n = 7_247_778_105_100; // (n·n)/n !== n in doubles (found by a search over random n)
    expect((n * n) / n).not.toBe(n);
    const result = pairedMeanInterval(unweighted(1_000_000, 1_300_000, n), 0.99)!;
    expect(result.nEff).toBe(n);
    expect(result.interval).toEqual(tangoInterval(1_000_000, 1_300_000, n, 0.99));
  });

  it('its variance is (p̂_b + p̂_c − d̂²)/n', () => {
    // hand arithmetic on invented numbers: b = 3, c = 9, n = 32: d̂ = 6/32 = 0.1875,
    // Σ(D − d̂)² = 20·0.1875² + 9·0.8125² + 3·1.1875² = 10.875, /32² = 0.0106201171875 = (12/32 − 0.1875²)/32
    const result = pairedMeanInterval(unweighted(3, 9, 32))!;
    expect(result.estimate).toBe(0.1875);
    expectClose(result.variance, 0.0106201171875, 1e-17);
  });
});

describe('pairedMeanInterval: weighted pairs (numpy and scipy 1.10.1, weighted.py above)', () => {
  it('is Tango at Kish effective counts', () => {
    const result = pairedMeanInterval(sumsOf(WEIGHTED))!;
    // weighted.py -> dhat 0.07547169811320754 (hand arithmetic: (8 − 4)/53)
    expectClose(result.estimate, 0.07547169811320754, 1e-16);
    // weighted.py -> var 0.00812371261016914
    expectClose(result.variance, 0.00812371261016914, 1e-16);
    // weighted.py -> neff 33.34124629080119 (53²/84.25)
    expectClose(result.nEff, 33.34124629080119, 1e-12);
    expectRelClose(result.nEff, kishEffectiveN(53, 84.25), 1e-15);
    // weighted.py -> interval (-0.0989615634491754, 0.2524578188694154)
    expectClose(result.interval.lo, -0.0989615634491754, REFERENCE);
    expectClose(result.interval.hi, 0.2524578188694154, REFERENCE);
    // weighted.py -> beff 2.516320474777448 ceff 5.032640949554896: the same interval from tangoInterval
    const direct = tangoInterval(2.516320474777448, 5.032640949554896, 33.34124629080119)!;
    expectClose(result.interval.lo, direct.lo, 1e-14);
    expectClose(result.interval.hi, direct.hi, 1e-14);
  });

  it('does not change when every weight is multiplied by the same factor', () => {
    // property of d̂, Kish's n (Kish 1965) and Σw²(D − d̂)²/(Σw)²: all are invariant to a common scale
    const base = pairedMeanInterval(sumsOf(WEIGHTED))!;
    for (const k of [1e-6, 3, 1e9]) {
      const scaled = pairedMeanInterval(sumsOf(WEIGHTED.map(([w, d]) => [w * k, d] as const)))!;
      expectClose(scaled.estimate, base.estimate, 1e-14);
      expectRelClose(scaled.variance, base.variance, 1e-12);
      expectRelClose(scaled.nEff, base.nEff, 1e-12);
      expectClose(scaled.interval.lo, base.interval.lo, 1e-12);
      expectClose(scaled.interval.hi, base.interval.hi, 1e-12);
    }
  });

  it('is wider than the unweighted interval of the same pairs', () => {
    // Kish 1965: unequal weights give n_eff < n (here 33.3 of 42 pairs), and the same discordant
    // shares (4/53 and 8/53 of the weight) at fewer pairs widen the score interval
    const weighted = pairedMeanInterval(sumsOf(WEIGHTED))!;
    const sameShares = tangoInterval((4 / 53) * 42, (8 / 53) * 42, 42)!;
    expect(weighted.interval.hi - weighted.interval.lo).toBeGreaterThan(sameShares.hi - sameShares.lo);
  });

  it('with no discordant pairs: d̂ = 0, variance 0, the interval ±z²/(n_eff + z²)', () => {
    // hand arithmetic (tangoInterval's b = c = 0 edge): weights 1, 1, 2: n_eff = 16/6 = 2.6667,
    // z² = 3.841458820694124 -> 3.841458820694124/6.508125487360791 = 0.5902
    const result = pairedMeanInterval(sumsOf([[1, 0], [1, 0], [2, 0]]))!;
    expect(result.estimate).toBe(0);
    expect(result.variance).toBe(0);
    expectClose(result.interval.hi, 3.841458820694124 / (16 / 6 + 3.841458820694124), 1e-15);
    expectClose(result.interval.lo, -result.interval.hi, 0);
  });
});

describe('pairedMeanInterval: degenerate and bad input', () => {
  it('returns null without weighted pairs', () => {
    // contract (this module): null when Σw <= 0 or Σw² <= 0
    expect(pairedMeanInterval(unweighted(0, 0, 0))).toBeNull();
    expect(pairedMeanInterval({ ...unweighted(0, 0, 0), sumW: 1 })).toBeNull();
    expect(() => pairedMeanInterval(unweighted(0, 0, 0), 2)).toThrow(/confidence must be strictly between 0 and 1/);
  });

  it('accepts a rounding excess of the parts over the whole', () => {
    // contract (this module): 1e-9 relative slack, c gives way; hand arithmetic: (6 − 4)/10 = 0.2
    const result = pairedMeanInterval({ sumW: 10, sumW2: 10, bSumW: 4, bSumW2: 4, cSumW: 6 + 1e-12, cSumW2: 6 })!;
    expect(result.estimate).toBe(0.2);
    expect(result.interval).toEqual(tangoInterval(4, 6, 10));
  });

  it('rejects NaN, negative and inconsistent sums', () => {
    // contract (this module): RangeError with the function and argument named
    expect(() => pairedMeanInterval({ ...unweighted(1, 1, 10), cSumW2: Number.NaN })).toThrow(/pairedMeanInterval: cSumW2 must be a finite number, got NaN/);
    expect(() => pairedMeanInterval({ ...unweighted(1, 1, 10), bSumW: -1 })).toThrow(/pairedMeanInterval: bSumW must be >= 0, got -1/);
    expect(() => pairedMeanInterval({ ...unweighted(1, 1, 10), cSumW: 11 })).toThrow(/pairedMeanInterval: cSumW must be at most sumW = 10, got 11/);
    expect(() => pairedMeanInterval({ ...unweighted(6, 5, 10), sumW2: 20 })).toThrow(/pairedMeanInterval: bSumW \+ cSumW must be at most sumW = 10, got 11/);
    expect(() => pairedMeanInterval({ ...unweighted(3, 3, 10), bSumW2: 6, cSumW2: 5 })).toThrow(/pairedMeanInterval: bSumW2 \+ cSumW2 must be at most sumW2 = 10, got 11/);
  });
});
