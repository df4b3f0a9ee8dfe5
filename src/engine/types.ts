/** The four evaluation sets a row can belong to (see shared/GLOSSARY.md). */
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
}

/** A slice column: categorical, or numeric cut into bins labelled by their ranges. */
export interface SliceColumn {
  readonly name: string;
  readonly kind: 'category' | 'binned';
  /** bin edges (ascending, interior edges only) for `binned` columns */
  readonly edges?: readonly number[];
}
