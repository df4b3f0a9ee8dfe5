/**
 * A closed interval [lo, hi], used for confidence intervals. For a proportion both ends lie in
 * [0, 1]; for a difference of proportions both ends lie in [−1, 1]. Always `lo <= hi`.
 */
export interface Interval {
  /** Lower bound. */
  readonly lo: number;
  /** Upper bound. */
  readonly hi: number;
}
