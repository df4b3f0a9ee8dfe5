/** Types the layers share about cells: a slice column, and the sums of an annotator audit. */

/**
 * Sufficient statistics of an annotator audit over some rows. Counts are unweighted: an audit is a
 * sample of rows, not of the weighted population. "Panel rows" are rows with at least two labels.
 */
export interface AuditSums {
  /** rows with at least one annotator label */
  readonly audited: number;
  /** rows with at least two annotator labels */
  readonly panelRows: number;
  /** Σ over panel rows of the majority vote's error (a tie of k labels, w of them wrong, counts w/k) */
  readonly panelErrors: number;
  /** Σ over panel rows of the row's pairwise agreement P_i = Σ_c n_c(n_c − 1) / (n(n − 1)) */
  readonly agreeSum: number;
  /** per annotator: rows labelled */
  readonly annRows: readonly number[];
  /** per annotator: labels that differ from the row's label */
  readonly annErrors: readonly number[];
  /** per annotator, per class (last index: any other class): labels given on panel rows */
  readonly classCounts: readonly (readonly number[])[];
}

/** A slice column: categorical, or numeric cut into bins labelled by their ranges. */
export interface SliceColumn {
  readonly name: string;
  readonly kind: 'category' | 'binned';
  /** bin edges (ascending, interior edges only) for `binned` columns */
  readonly edges?: readonly number[];
}
