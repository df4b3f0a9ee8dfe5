import { ckmeans } from 'simple-statistics';
import { assertFinite } from './validate-input.js';

/**
 * Natural breaks: the interior edges of the optimal one-dimensional k-means clustering of `values`,
 * the k runs of the sorted values whose total within-run sum of squared deviations from the run means
 * is least, found exactly by dynamic programming (Wang & Song 2011, "Ckmeans.1d.dp: optimal k-means
 * clustering in one dimension by dynamic programming", The R Journal 3(2):29–33; computed by
 * simple-statistics 7.12.1 `ckmeans`, which follows Ckmeans.1d.dp 3.4.6's divide-and-conquer fill of
 * the table). Each edge lies halfway between the largest value of one run and the smallest of the
 * next, so a bin `[edge_{j−1}, edge_j)` holds exactly the values of run j, and a value a little off a
 * run still falls in it. Values are scaled by a power of two before the search (exact), so values
 * whose squares would overflow or underflow a double are cut as any others.
 *
 * With fewer distinct values than `bins`, each distinct value is a run of its own; one distinct value
 * (or none) gives no edge.
 * @param values finite numbers in any order; repeats count (pass distinct values to cut the value
 *   scale alone, whatever each value's frequency)
 * @param bins the number of runs wanted, a whole number ≥ 1
 * @returns the interior edges, ascending: min(bins, distinct values) − 1 of them
 * @throws RangeError when a value is not a finite number, or bins is not a whole number ≥ 1
 * @example
 * naturalBreaks([-1, 2, -1, 2, 4, 5, 6, -1, 2, -1], 3); // => [0.5, 3] (runs {-1 ×4}, {2 ×3}, {4, 5, 6})
 * naturalBreaks([9, 1, 2, 1, 2, 1], 2); // => [5.5] (runs {1, 1, 1, 2, 2} and {9})
 * naturalBreaks([3, 1, 2], 5); // => [1.5, 2.5] (three distinct values: three runs)
 * naturalBreaks([7, 7, 7], 3); // => []
 */
export function naturalBreaks(values: readonly number[], bins: number): number[] {
  const fn = 'naturalBreaks';
  assertFinite(fn, 'bins', bins);
  if (!(Number.isInteger(bins) && bins >= 1)) throw new RangeError(`${fn}: bins must be a whole number >= 1, got ${bins}`);
  values.forEach((v, i) => assertFinite(fn, `values[${i}]`, v));
  const sorted = [...values].sort((a, b) => a - b);
  if (sorted.length === 0) return [];
  // a power of two at least as large as the largest magnitude (at most 2^1023): dividing by it is exact,
  // and the scaled values lie in [−1, 1], whose squares neither overflow nor vanish
  const largest = Math.max(Math.abs(sorted[0]), Math.abs(sorted[sorted.length - 1]));
  const scale = largest > 0 ? 2 ** Math.min(1023, Math.max(-1022, Math.ceil(Math.log2(largest)))) : 1;
  const scaled = sorted.map((v) => v / scale);
  let distinct = 1;
  for (let i = 1; i < scaled.length; i++) if (scaled[i] !== scaled[i - 1]) distinct++;
  const k = Math.min(bins, distinct);
  if (k < 2) return [];
  const runs = ckmeans(scaled, k);
  const edges: number[] = [];
  let start = 0;
  for (let j = 0; j + 1 < runs.length; j++) {
    start += runs[j].length;
    // halfway between the run's last value and the next run's first, in the original values
    const edge = sorted[start - 1] / 2 + sorted[start] / 2;
    if (edges.length === 0 || edge > edges[edges.length - 1]) edges.push(edge);
  }
  return edges;
}
