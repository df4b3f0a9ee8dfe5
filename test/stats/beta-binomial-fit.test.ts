import { describe, it, expect } from 'vitest';
import { betaPosterior, fitBetaPrior, type BetaPrior } from '../../src/stats/beta-binomial-fit.js';
import { expectClose, expectRelClose } from './expect-close.js';

const groups = (x: number[], n: number[]) => x.map((xi, i) => ({ x: xi, n: n[i] }));

// Reference fits: scipy 1.10.1 / numpy 1.24.2, the same log-likelihood over p = (log α, log β):
//   nll = lambda p: -np.sum(betaln(np.exp(p[0]) + x, np.exp(p[1]) + n - x) - betaln(np.exp(p[0]), np.exp(p[1])))
//   m = x.sum() / n.sum()
//   r = minimize(nll, np.log([m*10, (1-m)*10]), method='Nelder-Mead',
//                options={'xatol': 1e-12, 'fatol': 1e-14, 'maxiter': 20000, 'maxfev': 40000}); np.exp(r.x)
// Nelder-Mead stops about 1e-7 (relative) short of the optimum, so each fit is then polished by solving
// the score equations (digamma form of the same gradient) from r.x:
//   grad = lambda p: [np.sum(digamma(a + x) - digamma(a) - digamma(a + b + n) + digamma(a + b)),
//                     np.sum(digamma(b + n - x) - digamma(b) - digamma(a + b + n) + digamma(a + b))]  (a, b = np.exp(p))
//   s = root(grad, r.x, method='hybr', options={'xtol': 1e-15}); np.exp(s.x)
const NELDER_MEAD = 1e-6; // relative
const SCORE_ROOT = 1e-10; // relative

describe('fitBetaPrior: scipy 1.10.1 maximisation of the beta-binomial likelihood', () => {
  it.each([
    // A: x = [0, 5, 10, 2], n = [10]*4 (strongly overdispersed: α, β < 1, U-shaped prior)
    //   Nelder-Mead -> [0.32352472299377955, 0.3761703953145678], nll 18.10494894599565
    //   score root  -> [0.3235247132985393, 0.3761703800465065]
    ['A', [0, 5, 10, 2], [10, 10, 10, 10], [0.32352472299377955, 0.3761703953145678], [0.3235247132985393, 0.3761703800465065]],
    // B: x = [0, 1, 3, 9, 2, 15, 1, 6], n = [20, 35, 15, 60, 25, 40, 80, 50]
    //   Nelder-Mead -> [1.0303245760285513, 7.539261266675523], nll 104.67333042891853
    //   score root  -> [1.0303246496013574, 7.539261631665892]
    ['B', [0, 1, 3, 9, 2, 15, 1, 6], [20, 35, 15, 60, 25, 40, 80, 50], [1.0303245760285513, 7.539261266675523], [1.0303246496013574, 7.539261631665892]],
    // C: non-integer (weighted) counts x = [0.5, 2.25, 7.75, 1.0, 3.5], n = [10.5, 12.0, 20.25, 8.0, 9.5]
    //   Nelder-Mead -> [9.336291765938956, 29.43055344208624], nll 33.716850445172575
    //   score root  -> [9.336288226451762, 29.43054122437744]
    ['C', [0.5, 2.25, 7.75, 1.0, 3.5], [10.5, 12.0, 20.25, 8.0, 9.5], [9.336291765938956, 29.43055344208624], [9.336288226451762, 29.43054122437744]],
  ])('dataset %s', (_, x, n, nelderMead, scoreRoot) => {
    const prior = fitBetaPrior(groups(x, n));
    expect(prior.method).toBe('marginal-likelihood');
    expectRelClose(prior.alpha, nelderMead[0], NELDER_MEAD);
    expectRelClose(prior.beta, nelderMead[1], NELDER_MEAD);
    expectRelClose(prior.alpha, scoreRoot[0], SCORE_ROOT);
    expectRelClose(prior.beta, scoreRoot[1], SCORE_ROOT);
  });

  it('does not depend on the order of the groups, and repeating every group keeps the maximiser', () => {
    // property of the likelihood (a sum over groups): reordering leaves ℓ unchanged, listing every
    // group twice gives 2ℓ with the same argmax (Σn doubles, but the default cap Σn is not binding here)
    const a = groups([0, 5, 10, 2], [10, 10, 10, 10]);
    const forward = fitBetaPrior(a);
    const reversed = fitBetaPrior([...a].reverse());
    const doubled = fitBetaPrior([...a, ...a]);
    expectRelClose(reversed.alpha, forward.alpha, 1e-12);
    expectRelClose(reversed.beta, forward.beta, 1e-12);
    expectRelClose(doubled.alpha, 0.3235247132985393, SCORE_ROOT);
    expectRelClose(doubled.beta, 0.3761703800465065, SCORE_ROOT);
  });

  it('ignores groups with n = 0', () => {
    // contract (this module): n = 0 carries no information
    const b = groups([0, 1, 3, 9, 2, 15, 1, 6], [20, 35, 15, 60, 25, 40, 80, 50]);
    expect(fitBetaPrior([...b, { x: 0, n: 0 }, { x: 0, n: 0 }])).toEqual(fitBetaPrior(b));
  });
});

describe('fitBetaPrior: pooled prior when there is nothing to fit', () => {
  it('no between-group variance: the likelihood rises without bound in α + β', () => {
    // D: x = [1, 3, 0, 7, 2, 4, 12, 5], n = [20, 35, 15, 60, 25, 40, 80, 50] is underdispersed.
    // scipy 1.10.1, same Nelder-Mead call as above -> [372977700.1467111, 3194087031.7277637] (runs off
    // towards α + β = ∞); the supremum is the binomial limit, numpy: -(34*np.log(34/325) + 291*np.log(291/325))
    // -> 108.90985567331089 (Nelder-Mead's reported nll 108.9096450805664 lies below it only through
    // cancellation in betaln at arguments near 1e9).
    // contract (this module): pooled mean 34/325 at strength maxStrength = Σn = 325 -> Beta(34, 291)
    const prior = fitBetaPrior(groups([1, 3, 0, 7, 2, 4, 12, 5], [20, 35, 15, 60, 25, 40, 80, 50]));
    expect(prior.method).toBe('pooled');
    expectClose(prior.alpha, 34, 1e-12);
    expectClose(prior.beta, 291, 1e-12);
    // identical proportions 2/10, 4/20: pooled mean 0.2, strength 30
    expect(fitBetaPrior(groups([2, 4], [10, 20]))).toEqual({ alpha: 6, beta: 24, method: 'pooled' });
  });

  it('fewer than two usable groups', () => {
    // contract (this module): mean Σx/Σn, strength Σn -> Beta(x, n − x) for one group
    expect(fitBetaPrior(groups([3], [10]))).toEqual({ alpha: 3, beta: 7, method: 'pooled' });
    expect(fitBetaPrior(groups([3, 0], [10, 0]))).toEqual({ alpha: 3, beta: 7, method: 'pooled' });
    // no data at all: mean (0 + 0.5)/(0 + 1) = 0.5, strength 1 -> Jeffreys' Beta(½, ½)
    expect(fitBetaPrior([])).toEqual({ alpha: 0.5, beta: 0.5, method: 'pooled' });
  });

  it('all x = 0 or all x = n: mean (Σx + 0.5)/(Σn + 1), never 0 or 1', () => {
    // contract (this module), by hand: Σx = 0, Σn = 16 -> mean 0.5/17, strength 16 -> α = 8/17, β = 264/17
    const none = fitBetaPrior(groups([0, 0, 0], [5, 8, 3]));
    expect(none.method).toBe('pooled');
    expectClose(none.alpha, 8 / 17, 1e-15);
    expectClose(none.beta, 264 / 17, 1e-14);
    // Σx = Σn = 16 -> mean 16.5/17 -> α = 264/17, β = 8/17
    const all = fitBetaPrior(groups([5, 8, 3], [5, 8, 3]));
    expect(all.method).toBe('pooled');
    expectClose(all.alpha, 264 / 17, 1e-14);
    expectClose(all.beta, 8 / 17, 1e-14);
  });

  it('every group has a single trial: strength not identifiable', () => {
    // Bernoulli groups: the beta-binomial likelihood with n = 1 does not depend on α + β.
    // contract (this module): pooled mean 1/2 at strength Σn = 2 -> Beta(1, 1)
    expect(fitBetaPrior(groups([0, 1], [1, 1]))).toEqual({ alpha: 1, beta: 1, method: 'pooled' });
  });

  it('honours maxStrength for the pooled prior', () => {
    // contract (this module): Beta(mean·maxStrength, (1 − mean)·maxStrength), mean = 34/325
    const prior = fitBetaPrior(groups([1, 3, 0, 7, 2, 4, 12, 5], [20, 35, 15, 60, 25, 40, 80, 50]), { maxStrength: 50 });
    expectClose(prior.alpha, (34 / 325) * 50, 1e-12);
    expectClose(prior.beta, (291 / 325) * 50, 1e-12);
  });
});

describe('fitBetaPrior: strength bounds', () => {
  it('caps α + β at maxStrength and keeps the fitted mean', () => {
    // dataset B: fitted strength 1.0303246496013574 + 7.539261631665892 = 8.569586281267249 (scipy score
    // root above), mean 1.0303246496013574/8.569586281267249 = 0.12023038403307791; capped at 5 -> α = 0.60115, β = 4.39885
    const prior = fitBetaPrior(groups([0, 1, 3, 9, 2, 15, 1, 6], [20, 35, 15, 60, 25, 40, 80, 50]), { maxStrength: 5 });
    expect(prior.method).toBe('marginal-likelihood');
    expectClose(prior.alpha + prior.beta, 5, 1e-12);
    expectRelClose(prior.alpha / 5, 0.12023038403307791, 1e-10);
  });

  it('floors α + β at 1e-6 when every group is all-or-nothing', () => {
    // x = [0, 10, 0, 10] of 10: the likelihood rises as α + β → 0 (a two-point mixture at 0 and 1)
    // contract (this module): strength floored at 1e-6, mean ½ by symmetry
    const prior = fitBetaPrior(groups([0, 10, 0, 10], [10, 10, 10, 10]));
    expect(prior.method).toBe('marginal-likelihood');
    expectClose(prior.alpha + prior.beta, 1e-6, 1e-18);
    expectClose(prior.alpha / (prior.alpha + prior.beta), 0.5, 1e-9);
  });

  it('rejects NaN, negative n, x outside [0, n] and a bad maxStrength', () => {
    // contract (this module): RangeError naming the function and the group
    expect(() => fitBetaPrior([{ x: Number.NaN, n: 10 }])).toThrow(/fitBetaPrior: groups\[0\]\.x must be a finite number, got NaN/);
    expect(() => fitBetaPrior([{ x: 1, n: -10 }])).toThrow(/groups\[0\]\.n must be >= 0, got -10/);
    expect(() => fitBetaPrior([{ x: 0, n: 10 }, { x: 11, n: 10 }])).toThrow(/groups\[1\]\.x must be in \[0, n\]/);
    expect(() => fitBetaPrior([{ x: 1, n: 0 }])).toThrow(RangeError);
    expect(() => fitBetaPrior([], { maxStrength: 0 })).toThrow(/maxStrength must be > 0, got 0/);
    expect(() => fitBetaPrior([], { maxStrength: Infinity })).toThrow(/maxStrength must be a finite number/);
  });
});

// The dataset-B prior (scipy score root above): mean 0.12023038403307791, strength 8.569586281267249.
const PRIOR_B: BetaPrior = { alpha: 1.0303246496013574, beta: 7.539261631665892, method: 'marginal-likelihood' };

describe('betaPosterior: scipy 1.10.1 scipy.stats.beta', () => {
  it.each([
    // beta.mean(5, 40) -> 0.1111111111111111; beta.ppf(0.025, 5, 40) -> 0.03794371293927478; beta.ppf(0.975, 5, 40) -> 0.21668658946527453
    [{ alpha: 2, beta: 38 }, 3, 5, 0.95, 0.1111111111111111, 0.03794371293927478, 0.21668658946527453],
    // beta.ppf(0.05, 0.5, 0.5) -> 0.0061558297024311365; beta.ppf(0.95, 0.5, 0.5) -> 0.9938441702975689 (Jeffreys, no data)
    [{ alpha: 0.5, beta: 0.5 }, 0, 0, 0.9, 0.5, 0.0061558297024311365, 0.9938441702975689],
    // beta.ppf(0.005, 0.3, 50.7) -> 2.9600222336899804e-10; beta.ppf(0.995, 0.3, 50.7) -> 0.061957817558000054
    [{ alpha: 0.3, beta: 0.7 }, 0, 50, 0.99, 0.3 / 51, 2.9600222336899804e-10, 0.061957817558000054],
    // non-integer counts: beta.ppf(0.1, 2.5, 7.25) -> 0.09613061442467213; beta.ppf(0.9, 2.5, 7.25) -> 0.44116144066963553
    [{ alpha: 1, beta: 2 }, 1.5, 6.75, 0.8, 2.5 / 9.75, 0.09613061442467213, 0.44116144066963553],
  ])('prior %j, x = %f of n = %f at %f', (shape, x, n, confidence, mean, lo, hi) => {
    const post = betaPosterior({ ...shape, method: 'marginal-likelihood' }, x, n, confidence);
    expectRelClose(post.mean, mean, 1e-14);
    expectRelClose(post.lo, lo, 1e-10);
    expectRelClose(post.hi, hi, 1e-10);
    expectClose(post.n, n + shape.alpha + shape.beta, 1e-14);
  });
});

describe('betaPosterior: shrinkage under the dataset-B prior (mean 0.1202, strength 8.57)', () => {
  it('a 5-row group with 3 errors (raw 0.6) moves most of the way to the prior mean', () => {
    // scipy 1.10.1: beta.mean(4.030324649601358, 9.539261631665891) -> 0.29701160861220965
    //   beta.ppf(0.025, …) -> 0.09572685385761712; beta.ppf(0.975, …) -> 0.5546341016601489
    // raw 0.6 -> 0.297: 63 % of the distance to the prior mean 0.1202 (by hand: (0.6 − 0.2970)/(0.6 − 0.1202))
    const post = betaPosterior(PRIOR_B, 3, 5);
    expectRelClose(post.mean, 0.29701160861220965, 1e-12);
    expectRelClose(post.lo, 0.09572685385761712, 1e-10);
    expectRelClose(post.hi, 0.5546341016601489, 1e-10);
    expectClose(post.n, 13.569586281267249, 1e-12);
    expect((0.6 - post.mean) / (0.6 - 0.12023038403307791)).toBeGreaterThan(0.6);
  });

  it('a 2,000-row group with 1,200 errors (raw 0.6) barely moves', () => {
    // scipy 1.10.1: beta.mean(1201.0303246496014, 807.5392616316658) -> 0.5979530571670305
    //   beta.ppf(0.025, …) -> 0.5764258499944952; beta.ppf(0.975, …) -> 0.6192954986465196
    // raw 0.6 -> 0.59795: 0.43 % of the distance to the prior mean (by hand: 8.57/(2000 + 8.57))
    const post = betaPosterior(PRIOR_B, 1200, 2000);
    expectRelClose(post.mean, 0.5979530571670305, 1e-12);
    expectRelClose(post.lo, 0.5764258499944952, 1e-10);
    expectRelClose(post.hi, 0.6192954986465196, 1e-10);
    expect((0.6 - post.mean) / (0.6 - 0.12023038403307791)).toBeLessThan(0.005);
    expectClose(post.n, 2008.5695862812672, 1e-10);
  });

  it('with no data returns the prior itself', () => {
    // scipy 1.10.1: beta.mean(1.0303246496013574, 7.539261631665892) -> 0.12023038403307791
    //   beta.ppf(0.025, …) -> 0.00378202813625646; beta.ppf(0.975, …) -> 0.39150912777713187
    const post = betaPosterior(PRIOR_B, 0, 0);
    expectRelClose(post.mean, 0.12023038403307791, 1e-12);
    expectRelClose(post.lo, 0.00378202813625646, 1e-10);
    expectRelClose(post.hi, 0.39150912777713187, 1e-10);
    expectClose(post.n, 8.569586281267249, 1e-12);
  });

  it('rejects NaN, a non-positive prior, x outside [0, n] and bad confidence', () => {
    // contract (this module): RangeError naming the function and the argument
    expect(() => betaPosterior(PRIOR_B, Number.NaN, 5)).toThrow(/betaPosterior: x must be a finite number, got NaN/);
    expect(() => betaPosterior(PRIOR_B, 6, 5)).toThrow(/betaPosterior: x must be in \[0, n\]/);
    expect(() => betaPosterior(PRIOR_B, 0, -1)).toThrow(/betaPosterior: n must be >= 0/);
    expect(() => betaPosterior({ ...PRIOR_B, alpha: 0 }, 1, 5)).toThrow(/betaPosterior: prior\.alpha must be > 0, got 0/);
    expect(() => betaPosterior({ ...PRIOR_B, beta: Number.NaN }, 1, 5)).toThrow(/prior\.beta must be a finite number/);
    expect(() => betaPosterior(PRIOR_B, 1, 5, 1)).toThrow(/confidence must be strictly between 0 and 1/);
  });
});
