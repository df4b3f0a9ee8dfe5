import { describe, it, expect } from 'vitest';
import { linearRegression } from 'simple-statistics';
import { fitPowerLaw, logGapWeight } from '../../src/stats/power-law-fit.js';
import { expectClose } from './expect-close.js';

const LIBRARY = 1e-12; // same least-squares estimate as numpy/statsmodels, so agreement is to rounding
// Interval ends: statsmodels 0.13.5 conf_int() takes t from scipy 1.10.1 t.ppf, which is off by up to
// 5e-9 relative (mpmath 1.2.1, 40 digits: t_{0.95, 30} = 1.6972608865939578196, scipy t.ppf(0.95, 30)
// -> 1.6972608943617384; @stdlib/stats-base-dists-t-quantile 0.2.3 quantile(0.95, 30) -> 1.6972608865939576),
// so ends agree with statsmodels to about 5e-9·t·se.
const INTERVAL = 1e-9;

const N = [1000, 2000, 4000, 8000, 16000];
const GAPS = [0.0181, 0.0112, 0.0079, 0.0056, 0.0041];

describe('fitPowerLaw: unweighted, numpy 1.24.2 polyfit(log n, log g, 1)', () => {
  it('recovers an exact power law g = 0.5·n^−0.5', () => {
    // numpy 1.24.2: n = np.array([1000, 2000, 4000, 8000, 16000.]); c = np.polyfit(np.log(n), np.log(0.5*n**-0.5), 1)
    //   -> [-0.5000000000000006, -0.6931471805599374]; np.exp(c[1]) -> 0.500000000000004
    const fit = fitPowerLaw(N.map((n) => ({ n, g: 0.5 * n ** -0.5 })))!;
    expectClose(fit.a, 0.5, LIBRARY);
    expectClose(fit.beta, 0.5, LIBRARY);
    expect(fit.points).toBe(5);
    // residuals are rounding only, so the interval collapses onto β
    expectClose(fit.lo, 0.5, 1e-12);
    expectClose(fit.hi, 0.5, 1e-12);
  });

  it('fits noisy gaps: a = 0.6556, β = 0.5285', () => {
    // numpy 1.24.2: np.polyfit(np.log(n), np.log([0.0181, 0.0112, 0.0079, 0.0056, 0.0041]), 1)
    //   -> [-0.5284587764930249, -0.422203544501969]; np.exp(-0.422203544501969) -> 0.6556005819176978
    const fit = fitPowerLaw(N.map((n, i) => ({ n, g: GAPS[i] })))!;
    expectClose(fit.a, 0.6556, 1e-4);
    expectClose(fit.beta, 0.5285, 1e-4);
    expectClose(fit.a, 0.6556005819176978, LIBRARY);
    expectClose(fit.beta, 0.5284587764930249, LIBRARY);
    // statsmodels 0.13.5: sm.OLS(np.log(g), sm.add_constant(np.log(n))).fit().conf_int(0.05)[1]
    //   -> [-0.6107342667188831, -0.4461832862671664] (slope; β = −slope); bse[1] -> 0.025852907585351807
    expectClose(fit.lo, 0.4461832862671664, INTERVAL);
    expectClose(fit.hi, 0.6107342667188831, INTERVAL);
  });

  it('agrees with simple-statistics 7.12.1 linearRegression on the logs', () => {
    // simple-statistics 7.12.1: linearRegression([[log n, log g], …]) -> { m: slope, b: intercept }, run here
    const line = linearRegression(N.map((n, i) => [Math.log(n), Math.log(GAPS[i])]));
    const fit = fitPowerLaw(N.map((n, i) => ({ n, g: GAPS[i] })))!;
    expectClose(fit.beta, -line.m, LIBRARY);
    expectClose(fit.a, Math.exp(line.b), LIBRARY);
  });

  it('gives a wide interval with one residual degree of freedom', () => {
    // statsmodels 0.13.5: sm.OLS(np.log([0.2, 0.07, 0.02]), sm.add_constant(np.log([100, 1000, 10000.]))).fit()
    //   .params -> [0.7269706545593957, -0.5000000000000002]; .conf_int(0.05)[1] -> [-0.8232801205379809, -0.17671987946201945]
    //   (scipy 1.10.1: t.ppf(0.975, 1) -> 12.706204736432095)
    const fit = fitPowerLaw([
      { n: 100, g: 0.2 },
      { n: 1000, g: 0.07 },
      { n: 10000, g: 0.02 },
    ])!;
    expectClose(fit.beta, 0.5, LIBRARY);
    expectClose(fit.a, Math.exp(0.7269706545593957), LIBRARY);
    expectClose(fit.lo, 0.17671987946201945, INTERVAL);
    expectClose(fit.hi, 0.8232801205379809, INTERVAL);
  });
});

describe('fitPowerLaw: weighted, statsmodels 0.13.5 WLS', () => {
  const NW = [500, 1000, 2000, 4000, 8000, 16000];
  const GW = [0.031, 0.0205, 0.0152, 0.0101, 0.0078, 0.0049];
  const W = [1.5, 2, 3.5, 5, 8, 12];
  const points = NW.map((n, i) => ({ n, g: GW[i], weight: W[i] }));

  it('matches polyfit(w = √weights) and WLS(weights).conf_int()', () => {
    // numpy 1.24.2: np.polyfit(np.log(nw), np.log(gw), 1, w=np.sqrt(w)) -> [-0.5233471023051722, -0.22215138986449687]
    //   np.exp(-0.22215138986449687) -> 0.800794123043762
    // statsmodels 0.13.5: sm.WLS(np.log(gw), sm.add_constant(np.log(nw)), weights=w).fit()
    //   .params -> [-0.22215138986448757, -0.523347102305173]; .bse[1] -> 0.021918712804310004
    //   .conf_int(0.05)[1] -> [-0.5842032051829358, -0.4624909994274102]
    const fit = fitPowerLaw(points)!;
    expectClose(fit.beta, 0.5233471023051722, LIBRARY);
    expectClose(fit.a, 0.800794123043762, LIBRARY);
    expectClose(fit.lo, 0.4624909994274102, INTERVAL);
    expectClose(fit.hi, 0.5842032051829358, INTERVAL);
    expect(fit.points).toBe(6);
  });

  it('uses the exact t quantile: half-width / se(β) = t_{0.975, 4}', () => {
    // statsmodels 0.13.5: same WLS fit, .bse[1] -> 0.021918712804310004 (no t quantile involved)
    // mpmath 1.2.1 (mp.dps = 40): findroot(lambda t: betainc(2, 0.5, 0, 4/(4 + t*t), regularized=True)/2 - 0.025, 2)
    //   -> 2.7764451051977943036   (scipy 1.10.1 t.ppf(0.975, 4) -> 2.7764451051977987)
    const fit = fitPowerLaw(points)!;
    const halfWidth = (fit.hi! - fit.lo!) / 2;
    expectClose(halfWidth / 0.021918712804310004, 2.7764451051977943, 1e-12);
  });

  it('uses the requested confidence level', () => {
    // statsmodels 0.13.5: same WLS fit, .conf_int(0.10)[1] -> [-0.5700744396480758, -0.4766197649622702]
    const fit = fitPowerLaw(points, 0.9)!;
    expectClose(fit.lo, 0.4766197649622702, INTERVAL);
    expectClose(fit.hi, 0.5700744396480758, INTERVAL);
  });

  it('depends only on the ratios of the weights', () => {
    // WLS property: scaling all weights by c scales s² and Σw(x − x̄)² alike, so se(β) is unchanged
    const base = fitPowerLaw(points)!;
    const scaled = fitPowerLaw(points.map((p) => ({ ...p, weight: p.weight * 1e6 })))!;
    expectClose(scaled.beta, base.beta, 1e-13);
    expectClose(scaled.a, base.a, 1e-13);
    expectClose(scaled.lo, base.lo!, 1e-13);
    expectClose(scaled.hi, base.hi!, 1e-13);
  });

  it('takes weights from logGapWeight (delta method)', () => {
    // delta method, by hand: weight = g²/Var(g); with Var(g) = g²/4 every weight is 4 -> the unweighted fit
    // (numpy 1.24.2 polyfit values as in the unweighted test: β = 0.5284587764930249)
    const fit = fitPowerLaw(N.map((n, i) => ({ n, g: GAPS[i], weight: logGapWeight(GAPS[i], GAPS[i] ** 2 / 4) })))!;
    expectClose(fit.beta, 0.5284587764930249, LIBRARY);
    expectClose(fit.lo, 0.4461832862671664, INTERVAL);
  });
});

describe('fitPowerLaw: dropped points and degenerate input', () => {
  it('drops g ≤ 0, n ≤ 0 and weight-0 points', () => {
    // contract (this module): such points carry no log or no information; result as without them
    const clean = fitPowerLaw(N.map((n, i) => ({ n, g: GAPS[i] })))!;
    const noisy = fitPowerLaw([
      ...N.map((n, i) => ({ n, g: GAPS[i] })),
      { n: 500, g: 0 },
      { n: 700, g: -0.01 },
      { n: 0, g: 0.05 },
      { n: -5, g: 0.05 },
      { n: 300, g: 0.05, weight: 0 },
    ])!;
    expect(noisy).toEqual(clean);
    expect(noisy.points).toBe(5);
  });

  it('returns lo = hi = null with exactly two points', () => {
    // contract (this module): k − 2 = 0 residual degrees of freedom; line through two points by hand:
    //   β = −ln(0.05/0.1)/ln(400/100) = 0.5, a = 0.1·100^0.5 = 1
    const fit = fitPowerLaw([
      { n: 100, g: 0.1 },
      { n: 400, g: 0.05 },
    ])!;
    expectClose(fit.beta, 0.5, 1e-14);
    expectClose(fit.a, 1, 1e-14);
    expect(fit.lo).toBeNull();
    expect(fit.hi).toBeNull();
    expect(fit.points).toBe(2);
  });

  it('fits replicates at two distinct n, with an interval', () => {
    // statsmodels 0.13.5: sm.OLS(np.log([0.1, 0.12, 0.05]), sm.add_constant(np.log([100, 100, 400.]))).fit()
    //   .params -> [0.393990329305701, -0.5657586014584494]; .conf_int(0.05)[1] -> [-2.0129602360662644, 0.8814430331493656]
    const fit = fitPowerLaw([
      { n: 100, g: 0.1 },
      { n: 100, g: 0.12 },
      { n: 400, g: 0.05 },
    ])!;
    expectClose(fit.beta, 0.5657586014584494, LIBRARY);
    expectClose(fit.a, Math.exp(0.393990329305701), LIBRARY);
    expectClose(fit.lo, -0.8814430331493656, INTERVAL);
    expectClose(fit.hi, 2.0129602360662644, INTERVAL);
    expect(fit.points).toBe(3);
  });

  it('returns null with fewer than two distinct n', () => {
    // contract (this module): no slope without two distinct n
    expect(fitPowerLaw([])).toBeNull();
    expect(fitPowerLaw([{ n: 100, g: 0.1 }])).toBeNull();
    expect(
      fitPowerLaw([
        { n: 100, g: 0.1 },
        { n: 100, g: 0.2 },
      ]),
    ).toBeNull();
    expect(
      fitPowerLaw([
        { n: 100, g: 0.1 },
        { n: 400, g: 0 },
      ]),
    ).toBeNull();
  });

  it('rejects NaN, infinite values, negative weights and bad confidence', () => {
    // contract (this module): RangeError naming the function and the point
    expect(() => fitPowerLaw([{ n: Number.NaN, g: 0.1 }])).toThrow(/fitPowerLaw: points\[0\]\.n must be a finite number, got NaN/);
    expect(() => fitPowerLaw([{ n: 10, g: Infinity }])).toThrow(/points\[0\]\.g must be a finite number/);
    expect(() => fitPowerLaw([{ n: 10, g: 0.1, weight: Number.NaN }])).toThrow(/points\[0\]\.weight must be a finite number/);
    expect(() => fitPowerLaw([{ n: 10, g: 0.1, weight: -1 }])).toThrow(/points\[0\]\.weight must be >= 0, got -1/);
    expect(() => fitPowerLaw([], 1)).toThrow(/confidence must be strictly between 0 and 1/);
    expect(() => fitPowerLaw([], Number.NaN)).toThrow(RangeError);
  });
});

describe('logGapWeight', () => {
  it('is g²/Var(g), the inverse variance of log g by the delta method', () => {
    // delta method by hand: Var(log g) ≈ Var(g)/g² = 0.0001/0.0004 = 0.25 -> weight 4
    expectClose(logGapWeight(0.02, 0.0001), 4, 1e-14);
    // by hand: 0.1²/0.0025 = 4 (se(g) = 0.05, half the gap)
    expectClose(logGapWeight(0.1, 0.0025), 4, 1e-14);
  });

  it('is 0 for a non-positive gap or variance', () => {
    // contract (this module)
    expect(logGapWeight(0, 0.0001)).toBe(0);
    expect(logGapWeight(-0.01, 0.0001)).toBe(0);
    expect(logGapWeight(0.02, 0)).toBe(0);
    expect(logGapWeight(0.02, -1)).toBe(0);
  });

  it('rejects NaN and infinite input', () => {
    // contract (this module)
    expect(() => logGapWeight(Number.NaN, 1)).toThrow(/logGapWeight: gap must be a finite number, got NaN/);
    expect(() => logGapWeight(0.1, Infinity)).toThrow(/logGapWeight: variance must be a finite number/);
  });
});
