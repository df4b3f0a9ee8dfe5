import type { Split } from '../core/split.js';
import { DEFAULTS } from '../core/defaults.js';

/** A rate with its confidence interval; `n` is the effective number of rows (Kish) behind it. */
export interface Rate {
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
  readonly n: number;
}

/** A gap between two rates (or a rate and the floor), with interval, two-sided p and FDR-adjusted q. */
export interface Gap {
  readonly value: number;
  readonly lo: number | null;
  readonly hi: number | null;
  readonly p: number | null;
  /** null when the slice is not part of the test family (thin slices) */
  readonly q: number | null;
}

export type Focus = 'bias' | 'variance' | 'mismatch' | 'at-floor' | 'below-floor' | 'thin' | 'unclear';
export const FOCI: readonly Focus[] = ['bias', 'variance', 'mismatch', 'at-floor', 'below-floor', 'thin', 'unclear'];

export type FloorSource = 'default' | 'table' | 'mixed' | 'annotators';


export interface SliceFloor {
  /** weighted mean floor over the slice's train rows (used for bias and headroom) */
  readonly value: number;
  /** weighted mean floor over the slice's dev rows (information only) */
  readonly dev: number | null;
  /** interval of the floor when its estimate has a sample size, else null */
  readonly lo: number | null;
  readonly hi: number | null;
  /** effective number of human-labelled rows behind the floor, null when the floor is taken as exact */
  readonly n: number | null;
  readonly source: FloorSource;
  /** annotator floors only: the rule, the slice's own (unshrunk) estimate, and its audited rows */
  readonly rule?: FloorRule | null;
  readonly raw?: Rate | null;
  readonly audited?: number | null;
}

/** How a floor is computed from annotator columns. */
export type FloorRule = 'panel' | 'typical' | 'best';

/** Inter-annotator agreement over the slice's rows with at least two annotator labels. */
export interface Agreement {
  readonly kappa: number | null;
  readonly method: 'cohen' | 'fleiss';
  /** rows with at least two annotator labels */
  readonly audited: number;
}

/** The learning-curve exponent used for a slice's yield. */
export interface Curve {
  readonly beta: number;
  readonly lo: number | null;
  readonly hi: number | null;
  /** runs with a usable point (train and dev rows, positive gap) */
  readonly runs: number;
  /** `fit`: fitted from the runs; `default`: --curve-exponent (no runs, or fewer than 3 training sizes) */
  readonly source: 'fit' | 'default';
}

export interface Headroom {
  readonly total: number;
  readonly bias: number;
  readonly variance: number;
  readonly mismatch: number | null;
}

export interface SliceReport {
  /** column → value; empty for the overall slice */
  readonly key: Readonly<Record<string, string>>;
  /** "col=value · col=value", or "overall" */
  readonly label: string;
  readonly rows: Readonly<Record<Split, number | null>>;
  /** weighted dev rows of the slice / all weighted dev rows */
  readonly share: number;
  readonly floor: SliceFloor;
  readonly error: Readonly<Record<Split, Rate | null>>;
  readonly gaps: {
    readonly avoidable_bias: Gap | null;
    readonly variance: Gap | null;
    readonly mismatch: Gap | null;
    readonly dev_overfit: Gap | null;
  };
  readonly headroom: Headroom | null;
  readonly yield: number | null;
  /** mean labelling cost of one new row in the slice (cost table, else --label-cost) */
  readonly cost: number;
  /** new labelled rows that would halve variance + mismatch under the slice's curve, when it is positive */
  readonly labels_to_halve: number | null;
  readonly curve: Curve;
  readonly agreement: Agreement | null;
  readonly focus: Focus;
  readonly flagged: boolean;
  readonly rank: number;
  /** plain-language notes for the reader (e.g. likely noisy labels) */
  readonly hints: readonly string[];
}

export interface InputInfo {
  readonly path: string;
  readonly bytes: number;
  readonly modified: string;
  readonly split?: Split;
}

/** The slice report: the JSON contract `floorgap.report/1` (docs/formats.md). */
export interface Report {
  readonly schema: 'floorgap.report/1';
  readonly by: readonly string[] | null;
  readonly confidence: number;
  readonly fdr: number;
  readonly fdr_method: 'bh' | 'by';
  readonly source: {
    readonly inputs: readonly InputInfo[];
    readonly roles: Readonly<Record<string, string | null>>;
    /** annotator columns the floors came from ([] when none) */
    readonly annotators: readonly string[];
    readonly where: string | null;
    readonly version: string;
  };
  /** the training run the numbers come from, when the input holds several runs */
  readonly run: string | null;
  readonly runs: readonly string[];
  readonly overall: SliceReport;
  readonly slices: readonly SliceReport[];
  /** notes for the reader (e.g. "no floor given: bias is measured against perfection") */
  readonly warnings: readonly string[];
}

/** Options of triage: every threshold the report depends on. */
export interface TriageOptions {
  readonly confidence: number;
  readonly fdr: number;
  readonly fdrMethod: 'bh' | 'by';
  readonly minRows: number;
  readonly floorMargin: number;
  readonly minHeadroom: number;
  readonly curveExponent: number;
  readonly labelCost: number;
  /** how annotator columns give a floor */
  readonly floorRule: FloorRule;
  /** the run whose numbers are reported (default: the run with the most training rows) */
  readonly run: string | null;
}

/** Triage's options when none is given (the values: core/defaults.ts). */
export const DEFAULT_TRIAGE_OPTIONS: TriageOptions = {
  confidence: DEFAULTS.confidence,
  fdr: DEFAULTS.fdr,
  fdrMethod: DEFAULTS.fdrMethod,
  minRows: DEFAULTS.minRows,
  floorMargin: DEFAULTS.floorMargin,
  minHeadroom: DEFAULTS.minHeadroom,
  curveExponent: DEFAULTS.curveExponent,
  labelCost: DEFAULTS.labelCost,
  floorRule: DEFAULTS.floorRule,
  run: null,
};
