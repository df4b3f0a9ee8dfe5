/** The plan of a cell scan: what the cell query groups and sums, decided before it runs. */
import type { SliceColumn } from '../core/cell.js';
import type { FloorEntry } from '../read/keyed-table.js';
import type { Roles } from '../read/roles.js';

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

