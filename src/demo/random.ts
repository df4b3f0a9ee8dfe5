/**
 * A small seeded pseudo-random number generator for the demo data: **mulberry32** (a 32-bit state
 * generator by Tommy Ettinger), which uses only 32-bit integer arithmetic (`Math.imul`, shifts, xor),
 * so a seed gives the same uniform stream on every platform and Node version.
 *
 * `normal` uses the Box–Muller transform (`Math.log`, `Math.cos`); V8 implements those with its own
 * portable math library, so the values also repeat across platforms. Callers round them anyway.
 *
 * Not for cryptography, and not for statistics needing a long period (2³² here).
 */
export class Random {
  private state: number;

  /** @param seed any integer; it is reduced to 32 bits */
  constructor(seed: number) {
    if (!Number.isFinite(seed)) throw new RangeError(`seed must be a finite number, got ${seed}`);
    // Mix the seed once (splitmix-style) so nearby seeds start far apart.
    let s = Math.trunc(seed) >>> 0;
    s = Math.imul(s ^ (s >>> 16), 0x7feb352d);
    s = Math.imul(s ^ (s >>> 15), 0x846ca68b);
    this.state = (s ^ (s >>> 16)) >>> 0;
  }

  /** A uniform number in [0, 1) with 32 bits of resolution. */
  uniform(): number {
    this.state = (this.state + 0x6d2b79f5) | 0;
    let t = this.state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  /** A uniform number in [lo, hi). */
  between(lo: number, hi: number): number {
    return lo + (hi - lo) * this.uniform();
  }

  /** True with probability `p`. */
  chance(p: number): boolean {
    return this.uniform() < p;
  }

  /** A uniform integer in [0, n). */
  int(n: number): number {
    return Math.floor(this.uniform() * n);
  }

  /**
   * One of `items`, picked with probability proportional to its weight.
   * @example rng.choice(['day', 'night'], [2, 1]) // 'day' two times in three
   */
  choice<T>(items: readonly T[], weights: readonly number[]): T {
    if (items.length === 0 || items.length !== weights.length) {
      throw new RangeError('choice: items and weights must be non-empty and of equal length');
    }
    let total = 0;
    for (const w of weights) total += w;
    let u = this.uniform() * total;
    for (let i = 0; i < items.length; i++) {
      u -= weights[i];
      if (u < 0) return items[i];
    }
    return items[items.length - 1];
  }

  /** A normal draw with the given mean and standard deviation (Box–Muller; uses two uniforms). */
  normal(mean = 0, sd = 1): number {
    const u1 = 1 - this.uniform(); // (0, 1], so the log is finite
    const u2 = this.uniform();
    return mean + sd * Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  }
}

/**
 * A 32-bit seed for an independent side stream of `seed`, one per `salt` (a murmur3-style finaliser over
 * the seed's low 32 bits and the salt). The demo generator uses it so that extra draws (the inspector
 * audit, the earlier training runs) never shift the main stream of a seed.
 * @example new Random(deriveSeed(24, 1)) // the audit stream of seed 24
 */
export function deriveSeed(seed: number, salt: number): number {
  if (!Number.isFinite(seed) || !Number.isFinite(salt)) {
    throw new RangeError(`deriveSeed: seed and salt must be finite numbers, got ${seed} and ${salt}`);
  }
  let h = (Math.trunc(seed) >>> 0) ^ Math.imul(Math.trunc(salt) >>> 0, 0x9e3779b1);
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  return (h ^ (h >>> 16)) >>> 0;
}
