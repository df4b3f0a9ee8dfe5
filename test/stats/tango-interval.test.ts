import { describe, it, expect } from 'vitest';
import { tangoInterval } from '../../src/stats/tango-interval.js';
import { tangoScoreTest } from '../../src/stats/tango-score-test.js';
import { zForConfidence } from '../../src/stats/normal.js';
import { expectClose } from './expect-close.js';

const PUBLISHED = 1e-3; // published values are printed to 3 decimals (5e-4 rounding)
const REFERENCE = 1e-12; // the same interval inverted independently, so agreement is to rounding

// b = pairs wrong before and right after, c = right before and wrong after; the interval is for
// after − before = (c − b)/n. A table c(a, b, c, d) of R ratesci::pairbinci has the difference
// (n12 − n21)/N, so its n12 is our c and its n21 our b.
//
// Published values: as checked by the R package ratesci, petelaud/ratesci tests/testthat/test3.R
// ("legacy & new methods match published examples"), method_RD = "Score", skew = FALSE, bcf = FALSE
// (Tango's interval), rounded as printed there. The papers themselves were not at hand.
//
// Reference values: ref.py below, an independent inversion written for these tests and run with
// Debian's python3-scipy 1.10.1 (/usr/bin/python3): the constrained maximum-likelihood estimate by
// brentq on the derivative of the profile log-likelihood b·log q + c·log(q + Δ) + (n − b − c)·log(1 −
// 2q − Δ) (not the closed-form quadratic), the limits by brentq on z(Δ) ∓ z, z = norm.isf(α/2).
// `python3 ref.py b,c,n[,confidence]` prints an interval, `python3 ref.py b,c,n,delta,-9` the test
// (z, z², p = 2·norm.sf(|z|)); each output is pasted beside its value.
//
//   # Independent check of Tango's score interval: the constrained MLE is found numerically (brentq on the
//   # derivative of the profile log-likelihood), not from the closed-form quadratic; the limits by brentq on
//   # z(delta) -/+ z_crit.  b: wrong before/right after, c: right before/wrong after, delta = (c - b)/n.
//   import sys
//   from scipy.optimize import brentq
//   from scipy.stats import norm
//
//   def qhat(b, c, n, delta):
//       m = n - b - c
//       lo = max(0.0, -delta); hi = (1 - delta) / 2
//       def dl(q):
//           s = 0.0
//           for cnt, den, sign in ((b, q, 1), (c, q + delta, 1), (m, 1 - 2 * q - delta, -2)):
//               if cnt == 0: continue
//               if den <= 0: return float('inf') if sign > 0 else float('-inf')
//               s += sign * cnt / den
//           return s
//       if hi - lo <= 0: return lo
//       flo, fhi = dl(lo), dl(hi)
//       if flo <= 0: return lo
//       if fhi >= 0: return hi
//       return brentq(dl, lo, hi, xtol=1e-300, rtol=8.9e-16, maxiter=500)
//
//   def zstat(b, c, n, delta):
//       q = qhat(b, c, n, delta)
//       v = n * (2 * q + delta * (1 - delta))
//       num = c - b - n * delta
//       if v <= 0: return 0.0 if num == 0 else (float('inf') if num > 0 else float('-inf'))
//       return num / v ** 0.5
//
//   def interval(b, c, n, conf=0.95):
//       z = norm.isf((1 - conf) / 2)
//       d = (c - b) / n
//       eps = 1e-13
//       lo = -1.0 if b == n else brentq(lambda t: zstat(b, c, n, t) - z, -1 + eps, d, xtol=1e-300, rtol=8.9e-16, maxiter=500)
//       hi = 1.0 if c == n else brentq(lambda t: zstat(b, c, n, t) + z, d, 1 - eps, xtol=1e-300, rtol=8.9e-16, maxiter=500)
//       return lo, hi
//
//   if __name__ == '__main__':
//       for arg in sys.argv[1:]:
//           parts = [float(x) for x in arg.split(',')]
//           if len(parts) == 5 and parts[4] == -9:  # test: b,c,n,delta,-9
//               b, c, n, delta = parts[:4]
//               zz = zstat(b, c, n, delta)
//               print(f"b={parts[0]!r} c={parts[1]!r} n={parts[2]!r} delta={delta!r}: z={zz!r} z2={zz*zz!r} p={2*norm.sf(abs(zz))!r}")
//           else:
//               b, c, n = parts[:3]
//               conf = parts[3] if len(parts) > 3 else 0.95
//               print(f"b={parts[0]!r} c={parts[1]!r} n={parts[2]!r} conf={conf!r}: {interval(b, c, n, conf)!r}")

describe('tangoInterval: published values', () => {
  it.each([
    // table (4, 9, 3, 16), listed under "Tango RD" in ratesci test3.R: -0.027, 0.390
    [3, 9, 32, 0.95, -0.027, 0.39],
    // table (43, 0, 1, 0) at 90 %, listed under "Tango RD" in ratesci test3.R: -0.096, 0.037
    [1, 0, 44, 0.9, -0.096, 0.037],
    // Agresti & Min 2005, Stat Med 24:729, table (53, 16, 8, 9): -0.020, 0.207 (via ratesci test3.R)
    [8, 16, 86, 0.95, -0.02, 0.207],
    // Fagerland, Lydersen & Laake 2014, table (1, 1, 7, 12): -0.517, -0.026 (via ratesci test3.R)
    [7, 1, 21, 0.95, -0.517, -0.026],
    // Tang, Ling & Tian 2010, table (8, 3, 1, 2): -0.1670, 0.4327 (via ratesci test3.R, 4 decimals)
    [1, 3, 14, 0.95, -0.167, 0.4327],
    // Chang 2024, table (7, 25, 2, 68): 0.139, 0.321 (via ratesci test3.R)
    [2, 25, 102, 0.95, 0.139, 0.321],
  ])('b=%f c=%f n=%f at confidence %f -> %f to %f', (b, c, n, confidence, lo, hi) => {
    const ci = tangoInterval(b, c, n, confidence);
    expectClose(ci?.lo, lo, PUBLISHED);
    expectClose(ci?.hi, hi, PUBLISHED);
  });
});

describe('tangoInterval: an independent inversion of the score test (scipy 1.10.1 brentq)', () => {
  it.each([
    // python3 ref.py 3,9,32 -> (-0.027090464503980387, 0.3896974871387833)
    [3, 9, 32, 0.95, -0.027090464503980387, 0.3896974871387833],
    // python3 ref.py 3,9,32,0.9 -> (0.010190132457185964, 0.35744514083383144)
    [3, 9, 32, 0.9, 0.010190132457185964, 0.35744514083383144],
    // python3 ref.py 3,9,32,0.99 -> (-0.10306470892675644, 0.4511189860510701)
    [3, 9, 32, 0.99, -0.10306470892675644, 0.4511189860510701],
    // python3 ref.py 1,0,44,0.9 -> (-0.09566242639917168, 0.03651693841806402)
    [1, 0, 44, 0.9, -0.09566242639917168, 0.03651693841806402],
    // python3 ref.py 8,16,86 -> (-0.01965892271905075, 0.20691077062200114)
    [8, 16, 86, 0.95, -0.01965892271905075, 0.20691077062200114],
    // python3 ref.py 7,1,21 -> (-0.5172322764213773, -0.02600303248086859)
    [7, 1, 21, 0.95, -0.5172322764213773, -0.02600303248086859],
    // python3 ref.py 1,3,14 -> (-0.16697451229843116, 0.43266385169803767)
    [1, 3, 14, 0.95, -0.16697451229843116, 0.43266385169803767],
    // python3 ref.py 2,25,102 -> (0.13918254632705235, 0.32132975059187163)
    [2, 25, 102, 0.95, 0.13918254632705235, 0.32132975059187163],
    // python3 ref.py 86,150,1600 -> (0.021361564754787236, 0.058998033305699416)
    [86, 150, 1600, 0.95, 0.021361564754787236, 0.058998033305699416],
    // python3 ref.py 5,5,40 -> (-0.16632365750729486, 0.16632365750729486)
    [5, 5, 40, 0.95, -0.16632365750729486, 0.16632365750729486],
    // near the edges: python3 ref.py 19,0,20 -> (-0.9911185511992047, -0.6358059417970023)
    [19, 0, 20, 0.95, -0.9911185511992047, -0.6358059417970023],
    // python3 ref.py 1,19,20 -> (0.5277376131065159, 0.9822371023984092)
    [1, 19, 20, 0.95, 0.5277376131065159, 0.9822371023984092],
    // python3 ref.py 0,1,2 -> (-0.48642965874002025, 0.9054687942657692)
    [0, 1, 2, 0.95, -0.48642965874002025, 0.9054687942657692],
    // effective (non-integer) counts: python3 ref.py 2.7,8.4,30.5 -> (-0.030140433594974727, 0.39191390547002486)
    [2.7, 8.4, 30.5, 0.95, -0.030140433594974727, 0.39191390547002486],
  ])('b=%f c=%f n=%f at confidence %f', (b, c, n, confidence, lo, hi) => {
    const ci = tangoInterval(b, c, n, confidence);
    expectClose(ci?.lo, lo, REFERENCE);
    expectClose(ci?.hi, hi, REFERENCE);
  });

  it('is the set of differences the score test does not reject', () => {
    // Tango 1998: the interval inverts the score test, so at each end |z| equals the critical value
    // (zForConfidence(0.95) = 1.959963984540054, scipy 1.10.1 norm.isf(0.025) -> 1.959963984540054)
    const ci = tangoInterval(8, 16, 86)!;
    expectClose(tangoScoreTest(8, 16, 86, ci.lo)!.z, 1.959963984540054, 1e-9);
    expectClose(tangoScoreTest(8, 16, 86, ci.hi)!.z, -1.959963984540054, 1e-9);
    expect(tangoScoreTest(8, 16, 86, ci.lo + 1e-6)!.p).toBeGreaterThan(0.05);
    expect(tangoScoreTest(8, 16, 86, ci.lo - 1e-6)!.p).toBeLessThan(0.05);
  });
});

describe('tangoInterval: edges', () => {
  it('b = c = 0 gives ±z²/(n + z²)', () => {
    // hand arithmetic: with b = c = 0 the constrained estimate is max(0, −Δ) and z(Δ)² = n|Δ|/(1 − |Δ|),
    // so the ends solve n|Δ|/(1 − |Δ|) = z²; n = 20: 3.841458820694124/23.841458820694124 = 0.16112515805281938
    // python3 ref.py 0,0,20 -> (-0.16112515805281938, 0.16112515805281932)
    const z2 = zForConfidence(0.95) ** 2;
    expect(tangoInterval(0, 0, 20)).toEqual({ lo: -z2 / (20 + z2), hi: z2 / (20 + z2) });
    expectClose(tangoInterval(0, 0, 20)!.hi, 0.16112515805281932, REFERENCE);
    // python3 ref.py 0,0,1000000 -> (-3.841444063944943e-06, 3.841444063944943e-06)
    const wide = tangoInterval(0, 0, 1_000_000)!;
    expectClose(wide.lo, -3.841444063944943e-6, 1e-18);
    expectClose(wide.hi, 3.841444063944943e-6, 1e-18);
  });

  it('b = n reaches −1, c = n reaches 1', () => {
    // hand arithmetic: with b = n the constrained estimate is (1 − Δ)/2 and z(Δ)² = n(1 + Δ)/(1 − Δ),
    // so the upper end is −1 + 2z²/(n + z²); n = 20: −1 + 2·0.16112515805281938 = −0.6777496838943612
    // python3 ref.py 20,0,20 -> (-1.0, -0.6777496838943613)
    const all = tangoInterval(20, 0, 20)!;
    expect(all.lo).toBe(-1);
    expectClose(all.hi, -0.6777496838943613, REFERENCE);
    // python3 ref.py 0,20,20 -> (0.6777496838943613, 1.0)
    const mirror = tangoInterval(0, 20, 20)!;
    expect(mirror.hi).toBe(1);
    expectClose(mirror.lo, 0.6777496838943613, REFERENCE);
    // a single pair: b = n = 1 gives −1 + 2z²/(1 + z²) = 0.5869 (hand arithmetic, z² = 3.8415)
    expectClose(tangoInterval(1, 0, 1)!.hi, -1 + (2 * 3.841458820694124) / (1 + 3.841458820694124), 1e-15);
  });

  it('stays inside (−1, 1) and around the estimate otherwise', () => {
    // property of the score interval (Tango 1998): z(Δ) is infinite at Δ = ±1 unless the data are all b or all c pairs
    for (let n = 1; n <= 12; n++) {
      for (let b = 0; b <= n; b++) {
        for (let c = 0; b + c <= n; c++) {
          const ci = tangoInterval(b, c, n)!;
          const d = (c - b) / n;
          expect(ci.lo).toBeLessThanOrEqual(d);
          expect(ci.hi).toBeGreaterThanOrEqual(d);
          expect(ci.lo > -1).toBe(b < n);
          expect(ci.hi < 1).toBe(c < n);
          if (b + c > 0 && b < n && c < n) {
            expect(ci.lo).toBeLessThan(d);
            expect(ci.hi).toBeGreaterThan(d);
          }
        }
      }
    }
  });

  it('swapping b and c negates the interval', () => {
    // symmetry of Tango's statistic under b <-> c, Δ <-> −Δ (Tango 1998; ratesci test1.R checks the same)
    const ab = tangoInterval(3, 9, 32)!;
    const ba = tangoInterval(9, 3, 32)!;
    expectClose(ba.lo, -ab.hi, 1e-14);
    expectClose(ba.hi, -ab.lo, 1e-14);
  });

  it('returns null without pairs and rejects bad input', () => {
    // contract (this module): null when n <= 0; RangeError with the function and argument named
    expect(tangoInterval(0, 0, 0)).toBeNull();
    expect(tangoInterval(0, 0, -1)).toBeNull();
    expect(() => tangoInterval(0, 0, 0, 1.5)).toThrow(/confidence must be strictly between 0 and 1/);
    expect(() => tangoInterval(Number.NaN, 1, 10)).toThrow(/tangoInterval: b must be a finite number, got NaN/);
    expect(() => tangoInterval(1, Infinity, 10)).toThrow(/tangoInterval: c must be a finite number, got Infinity/);
    expect(() => tangoInterval(1, 1, Number.NaN)).toThrow(/tangoInterval: n must be a finite number, got NaN/);
    expect(() => tangoInterval(-1, 1, 10)).toThrow(/tangoInterval: b must be in \[0, n\] = \[0, 10\], got -1/);
    expect(() => tangoInterval(1, 11, 10)).toThrow(/tangoInterval: c must be in \[0, n\]/);
    expect(() => tangoInterval(6, 5, 10)).toThrow(/tangoInterval: b \+ c must be at most n = 10, got 11/);
    expect(() => tangoInterval(1, 1, 10, 0)).toThrow(RangeError);
  });
});
