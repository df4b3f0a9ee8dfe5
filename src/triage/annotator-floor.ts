import { sum } from 'simple-statistics';
import type { AuditSums } from '../core/cell.js';
import { betaPosterior, wilsonInterval, type BetaPrior } from '../stats/index.js';
import type { FloorRule, Rate } from './types.js';

/**
 * The counts a floor rule reads from an audit: x human errors out of n labels (or rows).
 * - panel: the majority vote's error over rows with at least two labels (ties count w/k);
 * - typical: all single labels pooled, i.e. the mean single-annotator error;
 * - best: the annotator with the lowest error in this slice (optimistic: a minimum over noisy estimates).
 * @example
 * ruleCounts(audit, 'panel'); // => { x: 4.5, n: 60 }
 */
export function ruleCounts(audit: AuditSums, rule: FloorRule): { x: number; n: number } | null {
  switch (rule) {
    case 'panel':
      return audit.panelRows > 0 ? { x: audit.panelErrors, n: audit.panelRows } : null;
    case 'typical': {
      const n = sum(audit.annRows);
      return n > 0 ? { x: sum(audit.annErrors), n } : null;
    }
    case 'best': {
      let best: { x: number; n: number } | null = null;
      audit.annRows.forEach((n, j) => {
        if (n <= 0) return;
        const x = audit.annErrors[j];
        if (!best || x / n < best.x / best.n) best = { x, n };
      });
      return best;
    }
  }
}

/** An annotator floor: the shrunk estimate (posterior) and the slice's raw estimate. */
export interface AnnotatorFloor {
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
  /** effective n of the posterior: n + α + β */
  readonly n: number;
  readonly raw: Rate | null;
  readonly audited: number;
}

/**
 * Empirical-Bayes floor of a slice from its audit: the posterior mean of Beta(α + x, β + n − x) under
 * a prior fitted across the report's slices, so slices with few audited rows are pulled toward the
 * overall audited floor. A slice with no usable audit takes the prior mean.
 */
export function annotatorFloor(audit: AuditSums, rule: FloorRule, prior: BetaPrior, confidence: number): AnnotatorFloor {
  const counts = ruleCounts(audit, rule) ?? { x: 0, n: 0 };
  const post = betaPosterior(prior, counts.x, counts.n, confidence);
  let raw: Rate | null = null;
  if (counts.n > 0) {
    const ci = wilsonInterval(counts.x, counts.n, confidence)!;
    raw = { value: counts.x / counts.n, lo: ci.lo, hi: ci.hi, n: counts.n };
  }
  return { value: post.mean, lo: post.lo, hi: post.hi, n: post.n, raw, audited: audit.audited };
}
