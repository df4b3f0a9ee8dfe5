import { DEFAULTS } from '../core/defaults.js';
import type { Gap, Rate, Report, SliceReport } from '../triage/types.js';

/** A part of the decomposition a discovered slice is tested on. */
export type Part = 'bias' | 'variance' | 'mismatch';
export const PARTS: readonly Part[] = ['bias', 'variance', 'mismatch'];

/** How much a slice's gap exceeds the gap of the rest of its weakest parent (points of error, as a fraction). */
export interface Lift {
  readonly part: Part;
  /** gap(C) − gap(P without C), for the parent P with the smallest lift */
  readonly value: number;
  /** MOVER interval (Zou & Donner 2008) of that difference */
  readonly lo: number;
  readonly hi: number;
  /** two-sided p-value of that parent's lift (the inverted MOVER interval) */
  readonly p: number;
  /** the parent's conditions ({} for all rows) */
  readonly over: Readonly<Record<string, string>>;
}

/** A found slice: every field of a report slice, and what the search adds. */
export interface DiscoveredSlice extends SliceReport {
  /** column → value: the slice's conditions (the same as `key`) */
  readonly conditions: Readonly<Record<string, string>>;
  /** the part the slice was found on (its largest significant part headroom) */
  readonly part: Part;
  readonly lift: Lift;
  /** q-value of the intersection–union p-value max(p_gap, p_lift over every parent) of that part */
  readonly q: number;
  /** that part's headroom (points of overall dev error, as a fraction) and the lower end of its interval */
  readonly part_headroom: { readonly value: number; readonly lo: number };
  /** share of this slice's dev weight it has in common with each higher-ranked listed slice (only those it overlaps) */
  readonly overlap: readonly { readonly label: string; readonly share: number | null }[];
  /** with --all: the listed descendants a folded slice's effect lives in; [] for a listed slice */
  readonly explained_by: readonly string[];
  /** each parent (the conditions with one left out; all rows for one condition) and the lift over its rest */
  readonly parents: readonly ParentSummary[];
}

/** A parent of a discovered slice, with its numbers for the found part and the slice's lift over its rest. */
export interface ParentSummary {
  /** {} for all rows */
  readonly conditions: Readonly<Record<string, string>>;
  readonly label: string;
  /** the parent's own gap of the found part */
  readonly gap: Gap | null;
  readonly dev_error: Rate | null;
  readonly floor: number;
  readonly share: number;
  /** the slice's gap minus the gap of the parent's other rows */
  readonly lift: { readonly value: number; readonly lo: number; readonly hi: number; readonly p: number };
}

/** The search settings, as given (or defaulted). */
export interface DiscoverSettings {
  readonly depth: number;
  readonly min_rows: number;
  readonly min_lift: number;
  readonly min_headroom: number;
  readonly fdr: number;
  readonly fdr_method: 'bh' | 'by';
  readonly confidence: number;
  readonly top: number;
  readonly all: boolean;
  /** the candidate columns conditions are drawn from */
  readonly columns: readonly string[];
  /** `cross`: cells of the full cross, any depth; `sets`: grouping sets, depth 2 at most */
  readonly cells: 'cross' | 'sets';
}

/** How many slices the search met and what became of them. */
export interface DiscoverCounts {
  /** every conjunction of 1..depth conditions that holds a row */
  readonly candidates: number;
  /** with at least min-rows train and dev rows, decomposed and tested */
  readonly examined: number;
  /** under a thin parent: thin themselves, never decomposed */
  readonly thin: number;
  /** skipped by the headroom bound (docs/method.md); each counts in the family with p = 1 */
  readonly skipped: number;
  /** the same rows as a parent (the rest of the parent is thin): the simpler slice kept */
  readonly nested: number;
  /** tests in the false-discovery family */
  readonly hypotheses: number;
  /** slices found, before folding */
  readonly found: number;
  /** found slices folded into their found descendants */
  readonly folded: number;
}

/** The result of `floorgap discover`: the JSON contract `floorgap.discover/1` (docs/formats.md). */
export interface Discovery {
  readonly schema: 'floorgap.discover/1';
  readonly settings: DiscoverSettings;
  readonly source: Report['source'];
  readonly run: string | null;
  readonly runs: readonly string[];
  readonly counts: DiscoverCounts;
  readonly overall: SliceReport;
  /** the found slices ranked by the lower end of their part headroom, at most `top` (with `all`, folded ones too) */
  readonly slices: readonly DiscoveredSlice[];
  readonly warnings: readonly string[];
}

/** Options of the search beyond triage's. */
export interface DiscoverOptions {
  /** conditions per slice, 1 to 3 */
  readonly depth: number;
  /** the smallest lift over every parent's rest that counts (fraction of error) */
  readonly minLift: number;
  /** how many found slices to list */
  readonly top: number;
  /** list folded slices too, with what explains them */
  readonly all: boolean;
  /** skip slices through the headroom bound (default true; false examines every slice, for tests of the bound) */
  readonly prune?: boolean;
}

/** The search's options when none is given (the values: core/defaults.ts). */
export const DISCOVER_DEFAULTS: DiscoverOptions = { depth: DEFAULTS.depth, minLift: DEFAULTS.minLift, top: DEFAULTS.top, all: false };
