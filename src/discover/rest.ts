/**
 * The rows of a parent slice outside one of its children, from sums alone: every sum of the slice
 * statistics is additive over rows, so the rest is the parent's sums minus the child's.
 */
import type { AuditSums } from '../core/cell.js';
import { SPLITS } from '../core/split.js';
import type { FloorPart, SliceStats, SplitSums } from '../slices/rollup.js';

/** Sums this small (relative to the parent's) are rounding left over by the subtraction, not rows. */
const ROUNDING = 1e-9;

function minus(a: number, b: number): number {
  const d = a - b;
  return Math.abs(d) <= ROUNDING * Math.max(1, Math.abs(a)) ? 0 : d;
}

function restParts(parent: readonly FloorPart[], child: readonly FloorPart[]): FloorPart[] {
  const out: FloorPart[] = [];
  for (const p of parent) {
    const c = child.find((x) => x.entry === p.entry);
    const weight = c ? minus(p.weight, c.weight) : p.weight;
    if (weight <= 0) continue;
    out.push({ entry: p.entry, weight, floorSum: c ? minus(p.floorSum, c.floorSum) : p.floorSum, n: p.n });
  }
  return out;
}

function restAudit(p: AuditSums | null, c: AuditSums | null): AuditSums | null {
  if (!p) return null;
  if (!c) return p;
  return {
    audited: minus(p.audited, c.audited),
    panelRows: minus(p.panelRows, c.panelRows),
    panelErrors: minus(p.panelErrors, c.panelErrors),
    agreeSum: minus(p.agreeSum, c.agreeSum),
    annRows: p.annRows.map((v, j) => minus(v, c.annRows[j] ?? 0)),
    annErrors: p.annErrors.map((v, j) => minus(v, c.annErrors[j] ?? 0)),
    classCounts: p.classCounts.map((row, j) => row.map((v, k) => minus(v, c.classCounts[j]?.[k] ?? 0))),
  };
}

/**
 * The rows of `parent` outside `child` (a slice within it): split sums, floor parts and audit sums of
 * the parent minus the child's. The key is the parent's.
 * @example
 * restOf(station, stationDome).splits.dev?.rows; // => the dev rows of the station under every other lighting
 */
export function restOf(parent: SliceStats, child: SliceStats): SliceStats {
  const splits: Partial<Record<(typeof SPLITS)[number], SplitSums>> = {};
  for (const s of SPLITS) {
    const p = parent.splits[s];
    if (!p) continue;
    const c = child.splits[s];
    const rows = c ? minus(p.rows, c.rows) : p.rows;
    if (rows <= 0) continue;
    splits[s] = c
      ? {
          rows,
          weight: minus(p.weight, c.weight),
          weightSq: minus(p.weightSq, c.weightSq),
          errors: Math.max(0, minus(p.errors, c.errors)),
          floorSum: Math.max(0, minus(p.floorSum, c.floorSum)),
          costSum: minus(p.costSum, c.costSum),
          costWeight: minus(p.costWeight, c.costWeight),
        }
      : p;
  }
  return {
    key: parent.key,
    splits,
    floorParts: restParts(parent.floorParts, child.floorParts),
    devFloorParts: restParts(parent.devFloorParts, child.devFloorParts),
    audit: restAudit(parent.audit, child.audit),
  };
}
