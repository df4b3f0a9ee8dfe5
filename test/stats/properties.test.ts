/**
 * Property-based tests (fast-check) of the interval and multiple-testing functions of src/stats: facts
 * that hold for every input of the method's domain, not only for the reference values checked in the
 * per-function tests. Each property names the published source of the fact it checks. Every property
 * runs fast-check's default 100 cases with a fixed seed, so that a failure reproduces.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  benjaminiHochberg,
  benjaminiYekutieli,
  betaPosterior,
  kishEffectiveN,
  newcombeInterval,
  wilsonInterval,
  type BetaPrior,
} from '../../src/stats/index.js';

/** fast-check settings of every property here: fixed seed (reproducible), default 100 runs. */
const RUNS = { seed: 42 } as const;

/** Confidence levels a user passes with --confidence (common practice: 80, 90, 95 and 99 %). */
const confidence = fc.constantFrom(0.8, 0.9, 0.95, 0.99);

/** A trial count n in [1, 10^6] and a success count x in [0, n], with the edges x = 0 and x = n drawn often. */
const countPair = (maxN = 1_000_000) =>
  fc
    .integer({ min: 1, max: maxN })
    .chain((n) => fc.tuple(fc.oneof(fc.constant(0), fc.constant(n), fc.integer({ min: 0, max: n }), fc.integer({ min: 0, max: Math.min(n, 5) })), fc.constant(n)));

/** Weighted rows (weight > 0, error or not), as triage sees a slice: 1 to 40 rows. */
const weightedRows = fc.array(fc.tuple(fc.oneof(fc.integer({ min: 1, max: 5 }), fc.double({ min: 0.001, max: 1000, noNaN: true })), fc.boolean()), {
  minLength: 1,
  maxLength: 40,
});

/**
 * x = p̂·n_eff and n = n_eff of weighted rows, the way src/triage passes weighted data to the intervals
 * (Kish 1965, Survey Sampling: n_eff = (Σw)²/Σw²).
 */
function weightedCount(rows: readonly (readonly [number, boolean])[]): { x: number; n: number; p: number } {
  let sumW = 0;
  let sumW2 = 0;
  let errors = 0;
  for (const [w, isError] of rows) {
    sumW += w;
    sumW2 += w * w;
    if (isError) errors += w;
  }
  const n = kishEffectiveN(sumW, sumW2);
  const p = errors / sumW;
  return { x: p * n, n, p };
}

/** p-values: uniform in [0, 1], plus the edges, ties and tiny values multiple-testing code must handle. */
const pValue = fc.oneof(
  fc.double({ min: 0, max: 1, noNaN: true }),
  fc.constantFrom(0, 1, 0.05, 0.5, 1e-300, Number.MIN_VALUE, 1 - 2 ** -53),
  fc.double({ min: 0, max: 1e-6, noNaN: true }),
);
/** A family of p-values, some hypotheses untested (null). */
const family = fc.array(fc.oneof({ weight: 9, arbitrary: pValue }, { weight: 1, arbitrary: fc.constant(null) }), { minLength: 0, maxLength: 60 });
/** A family and a permutation of its indices. */
const familyAndPermutation = family.chain((p) =>
  fc.tuple(
    fc.constant(p),
    fc.shuffledSubarray(
      p.map((_, i) => i),
      { minLength: p.length, maxLength: p.length },
    ),
  ),
);

/** Definition of a proportion interval: both ends in [0, 1], the point estimate between them. */
function expectInUnitAround(lo: number, hi: number, p: number, why: string): void {
  expect(lo, why).toBeGreaterThanOrEqual(0);
  expect(hi, why).toBeLessThanOrEqual(1);
  expect(lo, why).toBeLessThanOrEqual(p);
  expect(hi, why).toBeGreaterThanOrEqual(p);
}

describe('wilsonInterval: properties', () => {
  /**
   * Wilson 1927, J. Am. Stat. Assoc. 22:209: the score interval is the set of p whose score test does
   * not reject, so it lies in [0, 1] (it cannot overshoot, unlike the Wald interval: Newcombe 1998,
   * Stat. Med. 17:857, method 3) and contains p̂ = x/n, where the score statistic is 0.
   */
  it('lies in [0, 1] and contains x/n for integer 0 ≤ x ≤ n ≤ 10^6', () => {
    fc.assert(
      fc.property(countPair(), confidence, ([x, n], c) => {
        const ci = wilsonInterval(x, n, c);
        expect(ci).not.toBeNull();
        const { lo, hi } = ci!;
        const p = x / n;
        const why = `wilsonInterval(${x}, ${n}, ${c}) = [${lo}, ${hi}], x/n = ${p}`;
        expectInUnitAround(lo, hi, p, why);
      }),
      RUNS,
    );
  });

  /**
   * Wilson 1927, J. Am. Stat. Assoc. 22:209, with the weighted form x = p̂·n_eff, n = n_eff (Kish 1965,
   * Survey Sampling; the use documented in src/stats/wilson-interval.ts): the interval depends on x only
   * through p̂ = x/n, so it lies in [0, 1] and contains p̂ for any effective n.
   */
  it('weighted (effective n): lies in [0, 1] and contains p̂', () => {
    fc.assert(
      fc.property(weightedRows, confidence, (rows, c) => {
        const { x, n, p } = weightedCount(rows);
        const ci = wilsonInterval(x, n, c);
        expect(ci).not.toBeNull();
        const { lo, hi } = ci!;
        const why = `wilsonInterval(${x}, ${n}, ${c}) = [${lo}, ${hi}], p̂ = ${p}`;
        expectInUnitAround(lo, hi, p, why);
      }),
      RUNS,
    );
  });

  /**
   * Wilson 1927, J. Am. Stat. Assoc. 22:209: non-integer counts, x = u·n with u ∈ [0, 1] and
   * n ∈ (0, 10^6] (n below 1 included): the interval lies in [0, 1] and contains x/n.
   */
  it('non-integer x and n: lies in [0, 1] and contains x/n', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1e-6, max: 1e6, noNaN: true }),
        fc.oneof(fc.double({ min: 0, max: 1, noNaN: true }), fc.constantFrom(0, 1)),
        confidence,
        (n, u, c) => {
          const x = u * n;
          const ci = wilsonInterval(x, n, c)!;
          const p = x / n;
          const why = `wilsonInterval(${x}, ${n}, ${c}) = [${ci.lo}, ${ci.hi}], x/n = ${p}`;
          expect(ci.lo, why).toBeGreaterThanOrEqual(0);
          expect(ci.hi, why).toBeLessThanOrEqual(1);
          expect(ci.lo, why).toBeLessThanOrEqual(p);
          expect(ci.hi, why).toBeGreaterThanOrEqual(p);
        },
      ),
      RUNS,
    );
  });

  /**
   * Wilson 1927, J. Am. Stat. Assoc. 22:209: the score interval is equivariant under relabelling
   * successes as failures (Newcombe 1998, Stat. Med. 17:857, method 3): lo(x, n) = 1 − hi(n − x, n)
   * and hi(x, n) = 1 − lo(n − x, n).
   */
  it('is symmetric under x → n − x (to 1e-12)', () => {
    fc.assert(
      fc.property(countPair(), confidence, ([x, n], c) => {
        const a = wilsonInterval(x, n, c)!;
        const b = wilsonInterval(n - x, n, c)!;
        expect(Math.abs(a.lo - (1 - b.hi))).toBeLessThanOrEqual(1e-12);
        expect(Math.abs(a.hi - (1 - b.lo))).toBeLessThanOrEqual(1e-12);
      }),
      RUNS,
    );
  });

  /**
   * Wilson 1927, J. Am. Stat. Assoc. 22:209: at a fixed p̂ the width 2z·√(p̂(1 − p̂)n + z²/4)/(n + z²)
   * falls strictly as n grows (its log-derivative is negative because p̂(1 − p̂)(z² − n) ≤ z²/4 < z²/2;
   * hand arithmetic on the formula), so k·x of k·n rows (k ≥ 2) gives a strictly narrower interval.
   */
  it('narrows strictly as n grows at a fixed rate x/n (x, n → k·x, k·n, k ≥ 2)', () => {
    fc.assert(
      fc.property(countPair(100_000), fc.integer({ min: 2, max: 10 }), confidence, ([x, n], k, c) => {
        const narrow = wilsonInterval(k * x, k * n, c)!;
        const wide = wilsonInterval(x, n, c)!;
        expect(narrow.hi - narrow.lo).toBeLessThan(wide.hi - wide.lo);
      }),
      RUNS,
    );
  });
});

describe('betaPosterior: properties', () => {
  /** A Beta prior as fitBetaPrior returns it: α, β > 0, from very weak to very strong. */
  const prior: fc.Arbitrary<BetaPrior> = fc.record({
    alpha: fc.double({ min: 1e-3, max: 1e4, noNaN: true }),
    beta: fc.double({ min: 1e-3, max: 1e4, noNaN: true }),
    method: fc.constant('marginal-likelihood' as const),
  });

  /**
   * Conjugate Beta–binomial update (Gelman et al. 2013, Bayesian Data Analysis 3rd ed., §2.4): the
   * posterior Beta(α + x, β + n − x) lives on [0, 1], so its equal-tailed interval lies in [0, 1]; the
   * interval contains the method's own point estimate, the posterior mean (α + x)/(α + β + n) (not x/n,
   * which the prior shrinks towards its mean).
   */
  it('lies in [0, 1] and contains its posterior mean, for integer 0 ≤ x ≤ n ≤ 10^6', () => {
    fc.assert(
      fc.property(prior, countPair(), confidence, (pr, [x, n], c) => {
        const post = betaPosterior(pr, x, n, c);
        expect(post.lo).toBeGreaterThanOrEqual(0);
        expect(post.hi).toBeLessThanOrEqual(1);
        expect(post.lo).toBeLessThanOrEqual(post.mean);
        expect(post.hi).toBeGreaterThanOrEqual(post.mean);
      }),
      RUNS,
    );
  });

  /** Gelman et al. 2013, Bayesian Data Analysis 3rd ed., §2.4, with weighted (non-integer) counts x = p̂·n_eff. */
  it('weighted (effective n): lies in [0, 1] and contains its posterior mean', () => {
    fc.assert(
      fc.property(prior, weightedRows, confidence, (pr, rows, c) => {
        const { x, n } = weightedCount(rows);
        const post = betaPosterior(pr, x, n, c);
        expect(post.lo).toBeGreaterThanOrEqual(0);
        expect(post.hi).toBeLessThanOrEqual(1);
        expect(post.lo).toBeLessThanOrEqual(post.mean);
        expect(post.hi).toBeGreaterThanOrEqual(post.mean);
      }),
      RUNS,
    );
  });
});

describe('newcombeInterval: properties', () => {
  /**
   * Newcombe 1998, Stat. Med. 17:873, method 10 (hybrid score interval): built from two Wilson intervals
   * that contain p̂₁ and p̂₂, it contains d = p̂₁ − p̂₂; and since √(a² + b²) ≤ a + b for a, b ≥ 0,
   * lo ≥ l₁ − u₂ ≥ −1 and hi ≤ u₁ − l₂ ≤ 1 (hand arithmetic on the method's formula).
   */
  it('lies in [−1, 1] and contains p̂₁ − p̂₂ for integer counts up to 10^6', () => {
    fc.assert(
      fc.property(countPair(), countPair(), confidence, ([x1, n1], [x2, n2], c) => {
        const ci = newcombeInterval(x1, n1, x2, n2, c);
        expect(ci).not.toBeNull();
        const { lo, hi } = ci!;
        const d = x1 / n1 - x2 / n2;
        expect(lo).toBeGreaterThanOrEqual(-1);
        expect(hi).toBeLessThanOrEqual(1);
        expect(lo).toBeLessThanOrEqual(d);
        expect(hi).toBeGreaterThanOrEqual(d);
      }),
      RUNS,
    );
  });

  /** Newcombe 1998, Stat. Med. 17:873, method 10, with weighted counts x = p̂·n_eff (as src/triage calls it). */
  it('weighted (effective n): lies in [−1, 1] and contains p̂₁ − p̂₂', () => {
    fc.assert(
      fc.property(weightedRows, weightedRows, confidence, (rows1, rows2, c) => {
        const a = weightedCount(rows1);
        const b = weightedCount(rows2);
        const ci = newcombeInterval(a.x, a.n, b.x, b.n, c)!;
        const d = a.p - b.p;
        expect(ci.lo).toBeGreaterThanOrEqual(-1);
        expect(ci.hi).toBeLessThanOrEqual(1);
        expect(ci.lo).toBeLessThanOrEqual(d);
        expect(ci.hi).toBeGreaterThanOrEqual(d);
      }),
      RUNS,
    );
  });
});

/** The checks shared by BH and BY: q ≥ p, q ≤ 1, null passes through, q monotone in p. */
function expectAdjusted(p: readonly (number | null)[], q: readonly (number | null)[]): void {
  expect(q).toHaveLength(p.length);
  for (let i = 0; i < p.length; i++) {
    if (p[i] === null) {
      expect(q[i]).toBeNull();
      continue;
    }
    expect(q[i], `q[${i}] for p = ${p[i]}`).toBeGreaterThanOrEqual(p[i] as number);
    expect(q[i]).toBeLessThanOrEqual(1);
  }
  const tested = p.flatMap((v, i) => (v === null ? [] : [i]));
  for (const i of tested) {
    for (const j of tested) {
      if ((p[i] as number) <= (p[j] as number)) expect(q[i] as number, `p[${i}] = ${p[i]} ≤ p[${j}] = ${p[j]}`).toBeLessThanOrEqual(q[j] as number);
    }
  }
}

describe('benjaminiHochberg: properties', () => {
  /**
   * Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57:289 (step-up procedure; adjusted form of R
   * `p.adjust(p, "BH")`): q₍ᵢ₎ = min(1, min over j ≥ i of m·p₍ⱼ₎/j) ≥ p₍ᵢ₎ because p₍ⱼ₎ ≥ p₍ᵢ₎ and m/j ≥ 1;
   * q ≤ 1; the running minimum makes q monotone in p; untested (null) entries pass through.
   */
  it('q ≥ p, q ≤ 1, monotone in p; null stays null', () => {
    fc.assert(
      fc.property(family, (p) => expectAdjusted(p, benjaminiHochberg(p))),
      RUNS,
    );
  });

  /**
   * Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57:289: the procedure depends only on the sorted
   * p-values, so permuting the input permutes the q-values (ties get equal q-values).
   */
  it('permuting the p-values permutes the q-values', () => {
    fc.assert(
      fc.property(familyAndPermutation, ([p, perm]) => {
        const q = benjaminiHochberg(p);
        const qp = benjaminiHochberg(perm.map((i) => p[i]));
        expect(qp).toEqual(perm.map((i) => q[i]));
      }),
      RUNS,
    );
  });
});

describe('benjaminiYekutieli: properties', () => {
  /**
   * Benjamini & Yekutieli 2001, Ann. Stat. 29:1165, Theorem 1.3 (adjusted form of R `p.adjust(p, "BY")`):
   * q = min(1, c(m)·q_BH) with c(m) = Σ 1/i ≥ 1, so q ≥ q_BH ≥ p, q ≤ 1, monotone in p.
   */
  it('q ≥ p, q ≤ 1, monotone in p, and q ≥ the BH q-value; null stays null', () => {
    fc.assert(
      fc.property(family, (p) => {
        const q = benjaminiYekutieli(p);
        expectAdjusted(p, q);
        const bh = benjaminiHochberg(p);
        q.forEach((v, i) => {
          if (v !== null) expect(v).toBeGreaterThanOrEqual(bh[i] as number);
        });
      }),
      RUNS,
    );
  });

  /** Benjamini & Yekutieli 2001, Ann. Stat. 29:1165: a function of the sorted p-values, so order does not matter. */
  it('permuting the p-values permutes the q-values', () => {
    fc.assert(
      fc.property(familyAndPermutation, ([p, perm]) => {
        const q = benjaminiYekutieli(p);
        const qp = benjaminiYekutieli(perm.map((i) => p[i]));
        expect(qp).toEqual(perm.map((i) => q[i]));
      }),
      RUNS,
    );
  });
});
