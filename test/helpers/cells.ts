/**
 * Hand-made cells for triage tests: fixture (hand-built). A cell is the sufficient statistics of the
 * rows sharing one slice key, one split and one floor entry; these builders write them from counts so
 * that a test can state "450 errors in 5,000 train rows at floor 2 %" and nothing else.
 */
import type { CellRecord as Cell } from './cell-records.js';
import type { Split } from '../../src/core/split.js';
import type { ReportContext } from '../../src/triage/report.js';
import { DEFAULT_TRIAGE_OPTIONS, type TriageOptions } from '../../src/triage/types.js';

/** Rows of one split, all with the same weight, floor and floor entry. */
export interface RowsSpec {
  /** unweighted rows */
  readonly rows: number;
  /** unweighted rows that are errors (each counts `weight` in the weighted sums) */
  readonly errors: number;
  /** weight of every row; default 1 */
  readonly weight?: number;
  /** floor of every row; default 0 */
  readonly floor?: number;
  /** floor entry the rows took: -1 (default floor, the default) or a floor-table line index */
  readonly entry?: number;
  /** rows behind that entry's human estimate; default null (floor taken as exact) */
  readonly floorN?: number | null;
  /** labelling cost of every row from a cost table; default: none (the rows cost --label-cost) */
  readonly cost?: number;
}

/**
 * One cell from a row count: weight = rows·w, weightSq = rows·w², errors = errors·w,
 * floorSum = rows·w·floor.
 * @param key slice column → value
 * @param split the split of the rows
 * @param spec counts, weight and floor of the rows
 * @returns the cell
 * @example
 * cell({ line: 'A' }, 'train', { rows: 5000, errors: 450, floor: 0.02 }); // => { rows: 5000, weight: 5000, errors: 450, floorSum: 100, ... }
 */
export function cell(key: Readonly<Record<string, string | null>>, split: Split, spec: RowsSpec): Cell {
  if (spec.errors < 0 || spec.errors > spec.rows) throw new RangeError(`cell: errors must be in [0, rows] = [0, ${spec.rows}], got ${spec.errors}`);
  const w = spec.weight ?? 1;
  return {
    key: { ...key },
    split,
    run: null,
    rows: spec.rows,
    weight: spec.rows * w,
    weightSq: spec.rows * w * w,
    errors: spec.errors * w,
    floorSum: spec.rows * w * (spec.floor ?? 0),
    floorEntry: spec.entry ?? -1,
    floorN: spec.floorN ?? null,
    costSum: spec.cost === undefined ? 0 : spec.rows * w * spec.cost,
    costWeight: spec.cost === undefined ? 0 : spec.rows * w,
    audit: null,
  };
}

/** Per split: one block of rows, or several (different weights or floor entries) summed by the rollup. */
export type SliceSpec = Partial<Record<Split, RowsSpec | readonly RowsSpec[]>>;

/**
 * All cells of one slice.
 * @param key slice column → value
 * @param spec the rows of each split present in the slice
 * @returns one cell per block of rows
 * @example
 * sliceCells({ line: 'A' }, { train: { rows: 5000, errors: 450, floor: 0.02 }, dev: { rows: 5000, errors: 550, floor: 0.02 } }); // => two cells
 */
export function sliceCells(key: Readonly<Record<string, string | null>>, spec: SliceSpec): Cell[] {
  const out: Cell[] = [];
  for (const [split, blocks] of Object.entries(spec) as [Split, RowsSpec | readonly RowsSpec[]][]) {
    const list: readonly RowsSpec[] = Array.isArray(blocks) ? blocks : [blocks as RowsSpec];
    for (const b of list) out.push(cell(key, split, b));
  }
  return out;
}

/** The same rows spec for several splits: `same(['train', 'dev'], { rows: 100, errors: 5 })`. */
export function same(splits: readonly Split[], spec: RowsSpec): SliceSpec {
  return Object.fromEntries(splits.map((s) => [s, spec])) as SliceSpec;
}

/** A report context with no inputs and no warnings: fixture (hand-built). */
export const CONTEXT: ReportContext = { inputs: [], roles: {}, where: null, version: '0.0.0-test', warnings: [] };

/** The default triage options with some fields replaced. */
export function options(over: Partial<TriageOptions> = {}): TriageOptions {
  return { ...DEFAULT_TRIAGE_OPTIONS, ...over };
}
