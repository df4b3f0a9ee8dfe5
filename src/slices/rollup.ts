/**
 * Cells → slices: every roll-up is an arquero `groupby(…).rollup(…)` over the integer-coded cell table
 * (cells/cell-table.ts). Keys are decoded only for the slices that come out. Three roll-ups make a
 * slice's sufficient statistics: the sums per split, the floor parts (train and dev weight per floor
 * entry) and, only over cells that hold audited rows, the annotator sums.
 */
import * as aq from 'arquero';
import { auditColumn, auditFieldCount, keyColumn, servingCells, SUM_COLUMNS, type CellTable } from '../cells/cell-table.js';
import type { AuditSums } from '../core/cell.js';
import { SPLITS, type Split } from '../core/split.js';

const { op } = aq;
type ColumnTable = ReturnType<typeof aq.table>;

/** Sums of one split of one slice. */
export interface SplitSums {
  readonly rows: number;
  readonly weight: number;
  readonly weightSq: number;
  readonly errors: number;
  readonly floorSum: number;
  /** Σ w · labelling cost over rows a cost-table entry matched, and Σ w over those rows */
  readonly costSum: number;
  readonly costWeight: number;
}

/** Train weight that took one floor entry, for the floor's effective sample size. */
export interface FloorPart {
  readonly entry: number;
  readonly weight: number;
  readonly floorSum: number;
  readonly n: number | null;
}

/** The sufficient statistics of one slice, rolled up from cells. */
export interface SliceStats {
  readonly key: Readonly<Record<string, string>>;
  readonly splits: Readonly<Partial<Record<Split, SplitSums>>>;
  /** per floor entry (ascending), over the slice's train rows */
  readonly floorParts: readonly FloorPart[];
  /** per floor entry (ascending), over the slice's dev rows (for the floor's source when train has none) */
  readonly devFloorParts: readonly FloorPart[];
  /** annotator audit sums over every split of the slice, or null without annotators */
  readonly audit: AuditSums | null;
}

const TRAIN = SPLITS.indexOf('train');
const DEV = SPLITS.indexOf('dev');

/** Audit sums from the flat fields (audited, panel rows, panel errors, agreement, then per annotator rows, errors, classes). */
function auditSums(get: (f: number) => number, annotators: number, classes: number): AuditSums {
  const annRows: number[] = [];
  const annErrors: number[] = [];
  const classCounts: number[][] = [];
  for (let j = 0; j < annotators; j++) {
    const base = 4 + j * (2 + classes);
    annRows.push(get(base));
    annErrors.push(get(base + 1));
    classCounts.push(Array.from({ length: classes }, (_, k) => get(base + 2 + k)));
  }
  return { audited: get(0), panelRows: get(1), panelErrors: get(2), agreeSum: get(3), annRows, annErrors, classCounts };
}

/** A slice of the result being assembled. */
interface Slot {
  readonly key: Record<string, string>;
  readonly splits: Partial<Record<Split, SplitSums>>;
  readonly floorParts: FloorPart[];
  readonly devFloorParts: FloorPart[];
  audit: AuditSums | null;
}

type Row = Record<string, number>;

/**
 * Rolls up the cells of `t` (already selected for the grouping) by the `by` columns and, when `byRun`,
 * by run too: one map per run code (−1 without runs), slices in the order their first cell appears.
 */
function rollup(cells: CellTable, t: ColumnTable, by: readonly string[], byRun: boolean): Map<number, Slot[]> {
  const idx = by.map((b) => cells.columns.indexOf(b));
  const keys = idx.map(keyColumn);
  const group = byRun ? ['run', ...keys] : keys;
  const out = new Map<number, Slot[]>();
  const slots = new Map<string, Slot>();
  const slotOf = (r: Row): Slot => {
    const run = byRun ? r.run : -1;
    const id = `${run}|${keys.map((k) => r[k]).join(',')}`;
    let slot = slots.get(id);
    if (!slot) {
      const key: Record<string, string> = {};
      idx.forEach((c, b) => (key[by[b]] = cells.dicts[c][r[keys[b]]]));
      slot = { key, splits: {}, floorParts: [], devFloorParts: [], audit: null };
      slots.set(id, slot);
      const list = out.get(run) ?? [];
      list.push(slot);
      out.set(run, list);
    }
    return slot;
  };
  const sums = Object.fromEntries(SUM_COLUMNS.map((s) => [s, op.sum(s)]));
  for (const r of t.groupby(...group, 'split').rollup(sums).objects() as Row[]) {
    slotOf(r).splits[SPLITS[r.split]] = {
      rows: r.rows,
      weight: r.weight,
      weightSq: r.weightSq,
      errors: r.errors,
      floorSum: r.floorSum,
      costSum: r.costSum,
      costWeight: r.costWeight,
    };
  }
  // floor parts of train and dev rows, per entry; an entry's n is the same in every cell (0: none)
  const parts = t
    .params({ train: TRAIN, dev: DEV })
    .filter((d: Row, $: Row) => d.split === $.train || d.split === $.dev)
    .groupby(...group, 'split', 'floorEntry')
    .rollup({ weight: op.sum('weight'), floorSum: op.sum('floorSum'), n: op.max('floorN') })
    .orderby('floorEntry')
    .objects() as Row[];
  for (const r of parts) {
    const slot = slotOf(r);
    (r.split === DEV ? slot.devFloorParts : slot.floorParts).push({ entry: r.floorEntry, weight: r.weight, floorSum: r.floorSum, n: r.n > 0 ? r.n : null });
  }
  if (cells.audit) {
    const { annotators, classes } = cells.audit;
    const fields = auditFieldCount(annotators, classes);
    const zero = auditSums(() => 0, annotators, classes);
    for (const list of out.values()) for (const slot of list) slot.audit = zero;
    // only cells that hold audited rows carry audit sums: the wide roll-up runs over those alone
    const audited = t.filter((d: Row) => d.a0 > 0);
    if (audited.numRows() > 0) {
      const aSums = Object.fromEntries(Array.from({ length: fields }, (_, f) => [auditColumn(f), op.sum(auditColumn(f))]));
      for (const r of audited.groupby(...group).rollup(aSums).objects() as Row[]) {
        slotOf(r).audit = auditSums((f) => r[auditColumn(f)], annotators, classes);
      }
    }
  }
  return out;
}

/**
 * Rolls cells up into slices keyed by the `by` columns (`by` = [] gives the overall slice), from the
 * cells that serve that grouping, of one run when `run` is given.
 * @example
 * rollupSlices(cells, ['station']); // => [{ key: { station: 'S1' }, splits: { train: {...}, dev: {...} }, ... }, ...]
 */
export function rollupSlices(cells: CellTable, by: readonly string[], run: string | null = null): SliceStats[] {
  if (by.some((b) => !cells.columns.includes(b))) return [];
  const t = servingCells(cells, by, run);
  if (!t) return [];
  return rollup(cells, t, by, false).get(-1) ?? [];
}

/**
 * The same slices in every run, from one roll-up with the run in the key: run name → slices.
 * @example
 * rollupByRun(cells, ['lighting']).get('r4'); // => the lighting slices of run r4
 */
export function rollupByRun(cells: CellTable, by: readonly string[]): Map<string, SliceStats[]> {
  const result = new Map<string, SliceStats[]>();
  if (by.some((b) => !cells.columns.includes(b))) return result;
  const t = servingCells(cells, by);
  if (!t) return result;
  for (const [code, slices] of rollup(cells, t, by, true)) if (code >= 0) result.set(cells.runs[code], slices);
  return result;
}
