import { sum } from 'simple-statistics';
import type { AuditSums } from '../core/cell.js';
import { cohensKappa, fleissKappa } from '../stats/index.js';
import type { Agreement } from './types.js';

/**
 * Inter-annotator agreement of a slice: Cohen's kappa with two annotators (over rows both labelled),
 * Fleiss' kappa with three or more (over rows with at least two labels).
 */
export function agreementOf(audit: AuditSums | null): Agreement | null {
  if (!audit || audit.annRows.length < 2) return null;
  if (audit.annRows.length === 2) {
    // with two raters a row's pairwise agreement is 1 when they agree and 0 otherwise
    const kappa = cohensKappa(audit.agreeSum, audit.panelRows, audit.classCounts[0], audit.classCounts[1]);
    return { kappa, method: 'cohen', audited: audit.panelRows };
  }
  const totals = audit.classCounts[0].map((_, c) => sum(audit.classCounts.map((row) => row[c])));
  return { kappa: fleissKappa(audit.agreeSum, audit.panelRows, totals), method: 'fleiss', audited: audit.panelRows };
}

/** Agreement below this reads as at most "moderate" (Landis & Koch 1977 bands; common practice). */
export const LOW_AGREEMENT = 0.6;
