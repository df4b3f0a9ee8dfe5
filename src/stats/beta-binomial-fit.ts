import { createRequire } from 'node:module';
import { sum as compensatedSum } from 'simple-statistics';
import { brentRoot } from './brent-root.js';
import { digammaDifference, lnGammaDifference } from './gamma-differences.js';
import { assertFinite, checkCount } from './validate-input.js';

type BetaQuantile = typeof import('@stdlib/stats-base-dists-beta-quantile');
let betaQuantileFn: BetaQuantile | null = null;
/** @stdlib's beta quantile, loaded on first use (it takes a noticeable time to load, and only audits need it). */
function betaQuantile(p: number, a: number, b: number): number {
  betaQuantileFn ??= createRequire(import.meta.url)('@stdlib/stats-base-dists-beta-quantile') as BetaQuantile;
  return betaQuantileFn(p, a, b);
}

/**
 * A Beta(α, β) prior for a family of proportions: mean α/(α + β), strength (prior sample size) α + β.
 */
export interface BetaPrior {
  /** First shape parameter, α > 0 (prior "successes"). */
  readonly alpha: number;
  /** Second shape parameter, β > 0 (prior "failures"). */
  readonly beta: number;
  /**
   * How it was obtained: 'marginal-likelihood' — maximum of the beta-binomial marginal
   * likelihood; 'pooled' — no usable between-group variance, so the pooled mean at the maximum
   * strength.
   */
  readonly method: 'marginal-likelihood' | 'pooled';
}

/** Search range of the strength s = α + β: below, and above as a multiple of max(Σn, maxStrength). */
const MIN_STRENGTH = 1e-6;
const MAX_STRENGTH_FACTOR = 1e6;
/** Search range of the mean in logit units: within ±64 of logit(Σx/Σn) and ±100 overall. */
const MAX_LOGIT_STEP = 64;
const MAX_LOGIT = 100;

/**
 * Empirical-Bayes Beta prior for many small proportions: fits Beta(α, β) to pairs (x_k, n_k) by
 * maximising the beta-binomial marginal likelihood (Skellam 1948, J. R. Stat. Soc. B 10:257;
 * the empirical-Bayes use of the fitted prior as in Efron & Morris 1975, J. Am. Stat. Assoc.
 * 70:311), x_k | p_k ~ Binomial(n_k, p_k), p_k ~ Beta(α, β):
 *
 *   ℓ(α, β) = Σ_k [lnΓ(α + x_k) − lnΓ(α)] + [lnΓ(β + n_k − x_k) − lnΓ(β)] − [lnΓ(α + β + n_k) − lnΓ(α + β)]
 *
 * (the binomial coefficients do not depend on α, β and are dropped). The lnΓ differences are
 * taken without cancellation (`lnGammaDifference`), so x_k and n_k may be non-integer (weighted
 * counts). In mean μ = α/(α + β) and strength s = α + β, ℓ is concave in μ for fixed s; the fit
 * solves ∂ℓ/∂μ = 0 for each s and then the profile equation dℓ/d ln s = 0 with Brent's method,
 * starting from Kleinman's moment estimator of the intra-group correlation ρ = 1/(1 + s)
 * (Kleinman 1973, J. Am. Stat. Assoc. 68:46, with weights n_k):
 *
 *   ρ̂ = [Σ n_k(p̂_k − p̂)² / (p̂(1 − p̂)) − (K − 1)] / [N − Σ n_k²/N − (K − 1)],  p̂ = Σx/Σn, N = Σn.
 *
 * The result is 'pooled' — mean Σx/Σn and strength maxStrength — when there is nothing to fit:
 * fewer than two groups with n > 0, every group with n ≤ 1 (strength not identifiable), every
 * x = 0 or every x = n, or no between-group variance beyond binomial noise (the likelihood is
 * largest as s → ∞, i.e. the maximum over s ≤ 1e6·max(Σn, maxStrength) stays below the binomial
 * limit Σ x ln p̂ + (n − x) ln(1 − p̂)). A pooled mean of exactly 0 or 1 is replaced by
 * (Σx + 0.5)/(Σn + 1), so α, β > 0 always. Otherwise the result is 'marginal-likelihood' with
 * the maximising mean and strength, the strength capped at maxStrength and floored at 1e-6.
 * @param groups the (x, n) pairs: x successes (errors, …) out of n, 0 ≤ x ≤ n; groups with n = 0 are ignored
 * @param options maxStrength: the largest allowed α + β, > 0 (default Σn: the prior is never
 *   stronger than all the data together; 1 when Σn = 0, i.e. Jeffreys' Beta(½, ½))
 * @returns the fitted prior
 * @throws RangeError when an x or n is NaN/infinite, n < 0, x is outside [0, n], or maxStrength is not a finite number > 0
 * @example
 * fitBetaPrior([{ x: 0, n: 10 }, { x: 5, n: 10 }, { x: 10, n: 10 }, { x: 2, n: 10 }]);
 * // => { alpha: 0.3235, beta: 0.3762, method: 'marginal-likelihood' } (to 1e-4)
 * fitBetaPrior([{ x: 2, n: 10 }, { x: 4, n: 20 }]); // => { alpha: 6, beta: 24, method: 'pooled' }
 */
export function fitBetaPrior(groups: readonly { x: number; n: number }[], options?: { maxStrength?: number }): BetaPrior {
  const fn = 'fitBetaPrior';
  const maxOption = options?.maxStrength;
  if (maxOption !== undefined) {
    assertFinite(fn, 'maxStrength', maxOption);
    if (!(maxOption > 0)) throw new RangeError(`${fn}: maxStrength must be > 0, got ${maxOption}`);
  }
  // Distinct (x, n) pairs with their multiplicities: many small groups repeat.
  const byPair = new Map<string, Group>();
  const xs: number[] = [];
  const ns: number[] = [];
  groups.forEach((group, i) => {
    assertFinite(fn, `groups[${i}].n`, group.n);
    if (group.n < 0) throw new RangeError(`${fn}: groups[${i}].n must be >= 0, got ${group.n}`);
    const x = checkCount(fn, `groups[${i}].x`, group.x, group.n);
    if (group.n === 0) return;
    xs.push(x);
    ns.push(group.n);
    const key = `${x}/${group.n}`;
    const seen = byPair.get(key);
    if (seen) seen.count += 1;
    else byPair.set(key, { x, y: group.n - x, n: group.n, count: 1 });
  });
  // Σx and Σn by simple-statistics' compensated sum (counts may be weighted, so not whole numbers)
  const sumX = compensatedSum(xs);
  const sumN = compensatedSum(ns);
  const distinct = [...byPair.values()];
  const usable = distinct.reduce((k, g) => k + g.count, 0);
  const maxStrength = maxOption ?? (sumN > 0 ? sumN : 1);

  const pooled = (): BetaPrior => {
    let mean = sumN > 0 ? sumX / sumN : 0;
    if (!(mean > 0 && mean < 1)) mean = (sumX + 0.5) / (sumN + 1);
    return { alpha: mean * maxStrength, beta: (1 - mean) * maxStrength, method: 'pooled' };
  };
  if (
    usable < 2 ||
    distinct.every((g) => g.n <= 1) ||
    distinct.every((g) => g.x === 0) ||
    distinct.every((g) => g.y === 0)
  ) {
    return pooled();
  }

  const vMin = Math.log(MIN_STRENGTH);
  const vMax = Math.log(MAX_STRENGTH_FACTOR * Math.max(sumN, maxStrength));
  const pHat = sumX / sumN;
  const v0 = Math.min(vMax, Math.max(vMin, Math.log(momentStrength(distinct, usable, sumN, pHat))));

  // Profile derivative dℓ/d ln s at the best mean for s = e^v; positive while ℓ still rises with s.
  const slope = (v: number): number => {
    const s = Math.exp(v);
    const mu = bestMean(distinct, s, pHat);
    return s * strengthScore(distinct, mu, s);
  };
  let v: number;
  let h = slope(v0);
  if (h === 0) {
    v = v0;
  } else {
    // Walk uphill in steps 1, 2, 4, … (in ln s) until the slope changes sign or a bound is reached.
    const direction = h > 0 ? 1 : -1;
    let inner = v0;
    let outer = v0;
    let step = 1;
    while (true) {
      inner = outer;
      outer = direction > 0 ? Math.min(vMax, outer + step) : Math.max(vMin, outer - step);
      h = slope(outer);
      if (h * direction <= 0 || outer === vMax || outer === vMin) break;
      step *= 2;
    }
    if (h * direction > 0) {
      // Still rising at the bound: as s → ∞ the likelihood tends to the binomial one.
      if (outer === vMax) return pooled();
      v = vMin;
    } else {
      v = brentRoot(slope, inner, outer, 1e-12);
    }
  }

  const strength = Math.exp(v);
  const mu = bestMean(distinct, strength, pHat);
  if (logLikelihood(distinct, mu, strength) <= binomialLimit(distinct, pHat)) return pooled();
  const s = Math.min(strength, maxStrength);
  const alpha = mu * s;
  const beta = (1 - mu) * s;
  if (!(alpha > 0 && beta > 0)) return pooled();
  return { alpha, beta, method: 'marginal-likelihood' };
}

/**
 * Posterior of one proportion under a Beta prior (conjugate Beta–binomial update, e.g. Gelman
 * et al. 2013, Bayesian Data Analysis 3rd ed., §2.4): x successes out of n give
 * Beta(α + x, β + n − x), summarised by its mean (α + x)/(α + β + n), the equal-tailed interval
 * from the Beta quantiles at (1 − confidence)/2 and (1 + confidence)/2
 * (`@stdlib/stats-base-dists-beta-quantile`, as `scipy.stats.beta.ppf`; the upper end is taken
 * as 1 − the lower quantile of Beta(β + n − x, α + x) to keep its accuracy near 1), and the
 * effective sample size n + α + β.
 * @param prior the prior, e.g. from `fitBetaPrior`
 * @param x successes (may be non-integer), 0 ≤ x ≤ n
 * @param n trials (may be non-integer), n ≥ 0; n = 0 returns the prior's mean and interval
 * @param confidence two-sided level of the interval, in (0, 1); default 0.95
 * @returns mean, interval ends lo ≤ mean ≤ hi, and n = n + α + β
 * @throws RangeError when an argument is NaN/infinite, α or β is not > 0, n < 0, x is outside [0, n], or confidence is not in (0, 1)
 * @example
 * betaPosterior({ alpha: 2, beta: 38, method: 'marginal-likelihood' }, 3, 5);
 * // => { mean: 0.1111, lo: 0.0379, hi: 0.2167, n: 45 } (to 1e-4)
 */
export function betaPosterior(
  prior: BetaPrior,
  x: number,
  n: number,
  confidence = 0.95,
): { mean: number; lo: number; hi: number; n: number } {
  const fn = 'betaPosterior';
  assertFinite(fn, 'prior.alpha', prior.alpha);
  assertFinite(fn, 'prior.beta', prior.beta);
  if (!(prior.alpha > 0)) throw new RangeError(`${fn}: prior.alpha must be > 0, got ${prior.alpha}`);
  if (!(prior.beta > 0)) throw new RangeError(`${fn}: prior.beta must be > 0, got ${prior.beta}`);
  assertFinite(fn, 'n', n);
  if (n < 0) throw new RangeError(`${fn}: n must be >= 0, got ${n}`);
  const xc = checkCount(fn, 'x', x, n);
  assertFinite(fn, 'confidence', confidence);
  if (!(confidence > 0 && confidence < 1)) {
    throw new RangeError(`${fn}: confidence must be strictly between 0 and 1 (e.g. 0.95), got ${confidence}`);
  }
  const a = prior.alpha + xc;
  const b = prior.beta + (n - xc);
  const tail = (1 - confidence) / 2;
  const mean = a / (a + b);
  const lo = Math.min(mean, betaQuantile(tail, a, b));
  const hi = Math.max(mean, 1 - betaQuantile(tail, b, a));
  return { mean, lo, hi, n: n + prior.alpha + prior.beta };
}

/** A distinct (x, n) pair, y = n − x, seen `count` times. */
interface Group {
  readonly x: number;
  readonly y: number;
  readonly n: number;
  count: number;
}

/** Kleinman's (1973) moment estimate of the strength 1/ρ − 1; Σn when it is undefined or ρ̂ ≤ 0. */
function momentStrength(groups: readonly Group[], k: number, sumN: number, pHat: number): number {
  let spread = 0;
  let sumN2 = 0;
  for (const g of groups) {
    const d = g.x / g.n - pHat;
    spread += g.count * g.n * d * d;
    sumN2 += g.count * g.n * g.n;
  }
  const rho = (spread / (pHat * (1 - pHat)) - (k - 1)) / (sumN - sumN2 / sumN - (k - 1));
  if (!(rho > 0) || !Number.isFinite(rho)) return sumN;
  return rho >= 1 ? MIN_STRENGTH : 1 / rho - 1;
}

/** ℓ(μ, s) up to terms free of μ and s. */
function logLikelihood(groups: readonly Group[], mu: number, s: number): number {
  const alpha = mu * s;
  const beta = (1 - mu) * s;
  let sum = 0;
  for (const g of groups) {
    sum +=
      g.count * (lnGammaDifference(alpha, g.x) + lnGammaDifference(beta, g.y) - lnGammaDifference(s, g.n));
  }
  return sum;
}

/** lim_{s→∞} max_μ ℓ(μ, s) = Σ x ln p̂ + (n − x) ln(1 − p̂), on the same scale as `logLikelihood`. */
function binomialLimit(groups: readonly Group[], pHat: number): number {
  let sum = 0;
  for (const g of groups) sum += g.count * (g.x * Math.log(pHat) + g.y * Math.log1p(-pHat));
  return sum;
}

/** ∂ℓ/∂s at (μ, s). */
function strengthScore(groups: readonly Group[], mu: number, s: number): number {
  const alpha = mu * s;
  const beta = (1 - mu) * s;
  let sum = 0;
  for (const g of groups) {
    sum +=
      g.count *
      (mu * digammaDifference(alpha, g.x) + (1 - mu) * digammaDifference(beta, g.y) - digammaDifference(s, g.n));
  }
  return sum;
}

/**
 * The μ maximising ℓ(μ, s) for fixed s: the root of ∂ℓ/∂μ = s·Σ[ψ(α + x) − ψ(α) − ψ(β + y) + ψ(β)],
 * which decreases in μ (ℓ is concave in μ), from +∞ at μ → 0 (some x > 0) to −∞ at μ → 1 (some y > 0).
 * Solved in t = logit μ, bracketed by walking out from logit p̂.
 */
function bestMean(groups: readonly Group[], s: number, pHat: number): number {
  const score = (t: number): number => {
    const mu = logistic(t);
    const alpha = mu * s;
    const beta = (1 - mu) * s;
    let sum = 0;
    for (const g of groups) sum += g.count * (digammaDifference(alpha, g.x) - digammaDifference(beta, g.y));
    return sum;
  };
  const t0 = Math.log(pHat / (1 - pHat));
  const f0 = score(t0);
  if (f0 === 0) return logistic(t0);
  const direction = f0 > 0 ? 1 : -1;
  let inner = t0;
  let outer = t0;
  for (let step = 1; step <= MAX_LOGIT_STEP; step *= 2) {
    inner = outer;
    outer = Math.min(MAX_LOGIT, Math.max(-MAX_LOGIT, t0 + direction * step));
    if (score(outer) * direction <= 0) return logistic(brentRoot(score, inner, outer, 1e-13));
    if (Math.abs(outer) === MAX_LOGIT) break;
  }
  return logistic(outer); // no sign change within reach: the maximum is at the edge of the search
}

function logistic(t: number): number {
  return t >= 0 ? 1 / (1 + Math.exp(-t)) : Math.exp(t) / (1 + Math.exp(t));
}
