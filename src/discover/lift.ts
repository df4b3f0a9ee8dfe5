/**
 * The lift of a slice over the rest of a parent: gap_f(C) − gap_f(R), R = parent without C, as a
 * linear combination of independent proportions, with its MOVER interval and p-value (Zou & Donner
 * 2008). C and R hold disjoint rows, so their error rates are independent; their floors are not when
 * they take the same floor-table entries: floor(C) − floor(R) = Σ_k (π_k(C) − π_k(R)) φ_k, so an entry
 * both take in the same share cancels and only the difference of shares carries its uncertainty.
 */
import type { Split } from '../core/split.js';
import type { SliceStats } from '../slices/rollup.js';
import { moverInterval, moverPValue, type ProportionTerm } from '../stats/index.js';
import type { Rate, SliceFloor } from '../triage/types.js';
import type { Part } from './types.js';

/** What a lift needs of a decomposed slice: its rates, its floor and the floor parts behind it. */
export interface Decomposed {
  readonly stats: SliceStats;
  readonly error: Readonly<Record<Split, Rate | null>>;
  readonly floor: SliceFloor;
}

/** One estimate inside a floor: an entry of the floor table (`entry`), or a slice's own annotator floor. */
interface FloorTerm {
  readonly id: string;
  readonly share: number;
  readonly value: number;
  /** null: taken as exact */
  readonly n: number | null;
}

/** The floor as Σ share · value over its estimates (see sliceFloor in triage). */
function floorTerms(d: Decomposed, own: string): FloorTerm[] {
  if (d.floor.source === 'annotators') return [{ id: own, share: 1, value: d.floor.value, n: d.floor.n }];
  const parts = d.stats.floorParts.length > 0 ? d.stats.floorParts : d.stats.devFloorParts;
  const w = parts.reduce((a, p) => a + p.weight, 0);
  if (!(w > 0)) return [{ id: 'exact', share: 1, value: d.floor.value, n: null }];
  return parts.filter((p) => p.weight > 0).map((p) => ({ id: `entry ${p.entry}`, share: p.weight / w, value: p.floorSum / p.weight, n: p.n }));
}

function rateTerm(r: Rate | null, coef: number): ProportionTerm | null {
  if (!r || !(r.n > 0)) return null;
  return { coef, x: Math.min(r.n, Math.max(0, r.value * r.n)), n: r.n };
}

/** The two rates whose difference is the part: [minuend, subtrahend], or null (bias: train only). */
function partRates(part: Part, d: Decomposed, trainDev: boolean): [Rate | null, Rate | null] {
  const e = d.error;
  if (part === 'bias') return [e.train, null];
  if (part === 'variance') return trainDev ? [e.train_dev, e.train] : [e.dev, e.train];
  return [e.dev, e.train_dev];
}

/** A lift with its interval and p-value (two-sided). */
export interface LiftEstimate {
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
  readonly p: number;
}

/**
 * The terms of gap_f(C) − gap_f(R): C's rates with +1/−1, R's with −1/+1; for bias, the floors'
 * estimates by entry with coefficient π_k(R) − π_k(C) (exact ones into the offset).
 */
function liftTerms(part: Part, c: Decomposed, r: Decomposed, trainDev: boolean): { terms: ProportionTerm[]; offset: number } | null {
  const [ca, cb] = partRates(part, c, trainDev);
  const [ra, rb] = partRates(part, r, trainDev);
  const terms: (ProportionTerm | null)[] = [rateTerm(ca, 1), rateTerm(ra, -1)];
  if (part !== 'bias') terms.push(rateTerm(cb, -1), rateTerm(rb, 1));
  if (terms.some((t) => t === null)) return null;
  let offset = 0;
  if (part === 'bias') {
    const coef = new Map<string, { coef: number; value: number; n: number | null }>();
    const add = (t: FloorTerm, sign: number) => {
      const e = coef.get(t.id) ?? { coef: 0, value: t.value, n: t.n };
      e.coef += sign * t.share;
      coef.set(t.id, e);
    };
    for (const t of floorTerms(c, 'slice')) add(t, -1);
    for (const t of floorTerms(r, 'rest')) add(t, 1);
    for (const e of coef.values()) {
      if (e.coef === 0) continue;
      if (e.n === null || !(e.n > 0)) offset += e.coef * e.value;
      else terms.push({ coef: e.coef, x: Math.min(e.n, Math.max(0, e.value * e.n)), n: e.n });
    }
  }
  return { terms: terms as ProportionTerm[], offset };
}

/**
 * gap_f(C) − gap_f(R) with its MOVER interval at `confidence` and the p-value that inverts it; null
 * when a rate it needs is missing.
 * @example
 * liftOf('variance', slice, rest, true, 0.95)?.value; // => (train_dev − train of C) − (train_dev − train of R)
 */
export function liftOf(part: Part, c: Decomposed, r: Decomposed, trainDev: boolean, confidence: number, wantP = true): LiftEstimate | null {
  const lt = liftTerms(part, c, r, trainDev);
  if (!lt) return null;
  const ci = moverInterval(lt.terms, confidence, lt.offset);
  if (!ci) return null;
  const value = lt.terms.reduce((a, t) => a + (t.coef * t.x) / t.n, lt.offset);
  const p = wantP ? moverPValue(lt.terms, lt.offset) : null;
  return { value, lo: ci.lo, hi: ci.hi, p: p ?? 1 };
}
