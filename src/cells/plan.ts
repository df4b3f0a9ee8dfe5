/** The plan of a cell scan: what the cell query groups and sums, decided before it runs. */
import type { SliceColumn } from '../core/cell.js';
import type { FloorEntry } from '../read/keyed-table.js';
import type { RoleOptions, Roles } from '../read/roles.js';
import type { SourceSpec } from '../read/source.js';
import type { BinMethod } from './profile.js';
import { DEFAULTS } from '../core/defaults.js';

/** Everything the cell scan needs to know. */
export interface CellPlan {
  readonly roles: Roles;
  /** the column holding the split (a role column, or `__fg_split` for per-split files) */
  readonly splitColumn: string;
  readonly columns: readonly SliceColumn[];
  readonly floorEntries: readonly FloorEntry[];
  readonly defaultFloor: number;
  readonly where: string | null;
  /** the column naming the training run, when the table holds several runs */
  readonly runColumn?: string | null;
  /** annotator columns (human labels on audited rows) */
  readonly annotators?: readonly string[];
  /** classes counted for agreement; labels outside the list count as one "other" class */
  readonly classes?: readonly string[];
  /** cost-table entries (value = label cost per row); rows no entry matches take --label-cost at triage */
  readonly costEntries?: readonly FloorEntry[];
  /** most cells a scan may read into memory (a query giving more fails with advice); default no limit */
  readonly cellLimit?: number;
}

/** How rows are grouped into cells: the full cross of all slice columns, or grouping sets. */
export type Grouping = { readonly kind: 'cross' } | { readonly kind: 'sets'; readonly sets: readonly (readonly string[])[] };

/** Value shown for a missing slice value. */
export const MISSING = '(missing)';

/** Options of loading rows into cells. */
export interface LoadOptions {
  readonly source: SourceSpec;
  readonly roles: RoleOptions;
  readonly where: string | null;
  /** the `--by` columns (role names `label`/`pred` accepted); they join the cell columns */
  readonly by: readonly string[] | null;
  readonly sliceCols: readonly string[] | null;
  readonly bins: number;
  /** how numeric columns are cut into bins: 'quantile' (the default, about equal frequency) or 'natural' (natural breaks) */
  readonly binMethod?: BinMethod;
  readonly maxCells: number;
  /** most slices one grouping (the `--by` cross, or the overview) may hold; default {@link MAX_SLICES} */
  readonly maxSlices?: number;
  readonly floor: number | null;
  readonly floorTable: string | null;
  /** annotator columns: human labels on audited rows */
  readonly annotators?: readonly string[] | null;
  /** cost table (key columns + label_cost); rows it does not cover cost --label-cost */
  readonly costTable?: string | null;
}

/**
 * Most cells a scan reads into memory: 5 × `--max-cells`, and never less than 1,000,000 (about 100 MB),
 * so that a small `--max-cells` (which only chooses grouping sets sooner) does not refuse small tables.
 */
export function cellLimit(maxCells: number): number {
  return 5 * Math.max(maxCells, DEFAULTS.maxCells);
}
