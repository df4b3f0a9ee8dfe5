/** The four evaluation sets a row can belong to (README, "Splits"). */
export type Split = 'train' | 'train_dev' | 'dev' | 'test';
export const SPLITS: readonly Split[] = ['train', 'train_dev', 'dev', 'test'];

/**
 * One cell: sufficient statistics for the rows sharing one value of every cell column and one split.
 * Every number in the report derives from these; sums are additive across cells and across shards.
 */
export interface Cell {
  /** slice column values, `(missing)` for a missing value; a column absent from a grouping set is `null` */
  readonly key: Readonly<Record<string, string | null>>;
  readonly split: Split;
  /** the training run the rows belong to, when the input has a run column; else null */
  readonly run: string | null;
  /** unweighted row count (exact integer) */
  readonly rows: number;
  /** Σ w */
  readonly weight: number;
  /** Σ w² (for Kish's effective n) */
  readonly weightSq: number;
  /** Σ w · error (error is 0 or 1) */
  readonly errors: number;
  /** Σ w · floor of the row */
  readonly floorSum: number;
  /** which floor-table entry the rows took (-1: the default `--floor`) */
  readonly floorEntry: number;
  /** rows the human estimate of that entry came from; null when the entry gave none (treated as exact) */
  readonly floorN: number | null;
  /** Σ w · labelling cost, over the rows a cost-table entry matched */
  readonly costSum: number;
  /** Σ w over the rows a cost-table entry matched (the others cost --label-cost) */
  readonly costWeight: number;
  /** annotator audit sums (unweighted), when annotator columns are given; else null */
  readonly audit: AuditSums | null;
}

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
