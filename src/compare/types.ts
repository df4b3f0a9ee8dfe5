/** The comparison of two models' reports (`floorgap.compare/1`, docs/formats.md) and its options. */
import type { Split } from '../core/split.js';
import type { InputInfo, SliceReport } from '../triage/types.js';

/** The measures whose change is compared, in the order the output lists them. */
export const MEASURES = ['dev_error', 'avoidable_bias', 'variance', 'mismatch', 'dev_overfit'] as const;
export type Measure = (typeof MEASURES)[number];

/**
 * What a change says: dev error improved or regressed, a part fell or rose (q ≤ fdr and the interval
 * excludes 0); otherwise no clear change, or within ±margin when the whole interval lies inside it;
 * thin when either side's slice is thin (not tested).
 */
export type Verdict = 'improved' | 'regressed' | 'fell' | 'rose' | 'no-clear-change' | 'within-margin' | 'thin';

/** The change of one measure of one slice, after − before. */
export interface Change {
  readonly value: number;
  readonly lo: number | null;
  readonly hi: number | null;
  readonly p: number | null;
  /** null when the change is not part of the test family (thin slices) */
  readonly q: number | null;
  readonly verdict: Verdict;
  /** every split the measure reads was paired by id */
  readonly paired: boolean;
}

/** One slice on both sides and the change of each measure. */
export interface SliceComparison {
  readonly key: Readonly<Record<string, string>>;
  readonly label: string;
  /** the slice's report on each side; null when a side has no such slice */
  readonly before: SliceReport | null;
  readonly after: SliceReport | null;
  readonly change: Readonly<Record<Measure, Change | null>>;
  /** one line: what moved, and whether dev error fell with it */
  readonly reading: string;
}

/** How one split was compared. */
export interface SplitPairingInfo {
  /** rows by id on both sides (paired test), or the two sides' rates taken as independent */
  readonly method: 'paired' | 'unpaired' | 'absent';
  /** pairs of usable rows with the same id (0 when unpaired) */
  readonly pairs: number;
  /** usable rows of the split on each side */
  readonly before_rows: number;
  readonly after_rows: number;
}

/** The comparison: the JSON contract `floorgap.compare/1`. */
export interface Comparison {
  readonly schema: 'floorgap.compare/1';
  readonly by: readonly string[] | null;
  readonly confidence: number;
  readonly fdr: number;
  readonly fdr_method: 'bh' | 'by';
  /** --margin, null without it */
  readonly margin: number | null;
  readonly before: { readonly inputs: readonly InputInfo[]; readonly run: string | null };
  readonly after: { readonly inputs: readonly InputInfo[]; readonly run: string | null };
  readonly roles: Readonly<Record<string, string | null>>;
  readonly pairing: Readonly<Record<Split, SplitPairingInfo>>;
  readonly overall: SliceComparison;
  readonly slices: readonly SliceComparison[];
  readonly warnings: readonly string[];
}

/** The options of a comparison (the report's statistics options, and --margin). */
export interface CompareOptions {
  readonly confidence: number;
  readonly fdr: number;
  readonly fdrMethod: 'bh' | 'by';
  readonly margin: number | null;
}
