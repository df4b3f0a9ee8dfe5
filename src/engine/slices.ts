import { op, table } from 'arquero';
import { addAudit, SPLITS, type AuditSums, type Cell, type Split } from './types.js';

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
  /** per floor entry, over the slice's train rows */
  readonly floorParts: readonly FloorPart[];
  /** per floor entry, over the slice's dev rows (for the floor's source when train has none) */
  readonly devFloorParts: readonly FloorPart[];
  /** annotator audit sums over every split of the slice, or null without annotators */
  readonly audit: AuditSums | null;
}

/** The runs present in the cells, or [] when the input has no run column. */
export function runsOf(cells: readonly Cell[]): string[] {
  const runs = new Set<string>();
  for (const c of cells) if (c.run !== null) runs.add(c.run);
  return [...runs].sort();
}

/** Picks the cells that can serve a grouping: in grouping-sets mode, those of the set equal to `by`. */
export function cellsFor(cells: readonly Cell[], by: readonly string[]): Cell[] {
  if (cells.length === 0) return [];
  const allKeys = Object.keys(cells[0].key);
  const isCross = cells.every((c) => allKeys.every((k) => c.key[k] !== null));
  if (isCross) return cells as Cell[];
  const want = [...by].sort().join('\u0000');
  const grouped = (c: Cell) => allKeys.filter((k) => c.key[k] !== null).sort().join('\u0000');
  const exact = cells.filter((c) => grouped(c) === want);
  if (exact.length > 0 || by.length > 0) return exact;
  // the overall slice: any one-column set covers every row once
  const first = grouped(cells[0]);
  return cells.filter((c) => grouped(c) === first);
}

/**
 * Rolls cells up into slices keyed by the `by` columns (an arquero groupby/rollup over the cell table).
 * `by` = [] gives the overall slice.
 * @example
 * rollupSlices(cells, ['station']); // => [{ key: { station: 'S1' }, splits: { train: {...}, dev: {...} }, ... }, ...]
 */
export function rollupSlices(cells: readonly Cell[], by: readonly string[], run: string | null = null): SliceStats[] {
  const use = cellsFor(run === null ? cells : cells.filter((c) => c.run === run), by);
  const cols: Record<string, unknown[]> = {};
  by.forEach((b, i) => (cols[`k${i}`] = use.map((c) => c.key[b])));
  cols.split = use.map((c) => c.split);
  cols.entry = use.map((c) => c.floorEntry);
  cols.floorN = use.map((c) => c.floorN);
  cols.rows = use.map((c) => c.rows);
  cols.weight = use.map((c) => c.weight);
  cols.weightSq = use.map((c) => c.weightSq);
  cols.errors = use.map((c) => c.errors);
  cols.floorSum = use.map((c) => c.floorSum);
  cols.costSum = use.map((c) => c.costSum);
  cols.costWeight = use.map((c) => c.costWeight);
  const auditCols = flattenAudit(use, cols);
  const keyCols = by.map((_, i) => `k${i}`);
  const sums: Record<string, unknown> = {
    floorN: op.any('floorN'),
    rows: op.sum('rows'),
    weight: op.sum('weight'),
    weightSq: op.sum('weightSq'),
    errors: op.sum('errors'),
    floorSum: op.sum('floorSum'),
    costSum: op.sum('costSum'),
    costWeight: op.sum('costWeight'),
  };
  for (const name of auditCols.names) sums[name] = op.sum(name);
  const rolled = table(cols)
    .groupby(...keyCols, 'split', 'entry')
    .rollup(sums as Parameters<ReturnType<typeof table>['rollup']>[0])
    .objects() as Record<string, unknown>[];

  type Acc = { key: Record<string, string>; splits: Partial<Record<Split, SplitSums>>; floorParts: FloorPart[]; devFloorParts: FloorPart[]; audit: AuditSums | null };
  const slices = new Map<string, Acc>();
  for (const r of rolled) {
    const key: Record<string, string> = {};
    by.forEach((b, i) => (key[b] = String(r[`k${i}`])));
    const id = keyCols.map((k) => String(r[k])).join('\u0000');
    let acc = slices.get(id);
    if (!acc) {
      acc = { key, splits: {}, floorParts: [], devFloorParts: [], audit: null };
      slices.set(id, acc);
    }
    const split = r.split as Split;
    const prev = acc.splits[split];
    const rows = Number(r.rows);
    const weight = Number(r.weight);
    const weightSq = Number(r.weightSq);
    const errors = Number(r.errors);
    const floorSum = Number(r.floorSum);
    const costSum = Number(r.costSum);
    const costWeight = Number(r.costWeight);
    acc.splits[split] = prev
      ? { rows: prev.rows + rows, weight: prev.weight + weight, weightSq: prev.weightSq + weightSq, errors: prev.errors + errors, floorSum: prev.floorSum + floorSum, costSum: prev.costSum + costSum, costWeight: prev.costWeight + costWeight }
      : { rows, weight, weightSq, errors, floorSum, costSum, costWeight };
    acc.audit = addAudit(acc.audit, auditCols.read(r));
    const part = { entry: Number(r.entry), weight, floorSum, n: r.floorN === null || r.floorN === undefined ? null : Number(r.floorN) };
    if (split === 'train') acc.floorParts.push(part);
    if (split === 'dev') acc.devFloorParts.push(part);
  }
  const out = [...slices.values()];
  for (const s of out) for (const sp of SPLITS) if (!s.splits[sp]) delete s.splits[sp];
  return out;
}

/**
 * Adds the audit sums of the cells as flat numeric columns (a_audited, a_r0, a_c0_1, …) so that arquero
 * rolls them up with the rest, and returns their names and a reader that turns a rolled row back
 * into AuditSums.
 */
function flattenAudit(
  use: readonly Cell[],
  cols: Record<string, unknown[]>,
): { names: string[]; read: (r: Record<string, unknown>) => AuditSums | null } {
  const first = use.find((c) => c.audit !== null)?.audit;
  if (!first) return { names: [], read: () => null };
  const annotators = first.annRows.length;
  const classes = first.classCounts[0]?.length ?? 0;
  const get = (c: Cell) => c.audit ?? first;
  const zero = (c: Cell) => c.audit === null;
  const add = (name: string, f: (a: AuditSums) => number) => {
    cols[name] = use.map((c) => (zero(c) ? 0 : f(get(c))));
    names.push(name);
  };
  const names: string[] = [];
  add('a_audited', (a) => a.audited);
  add('a_panelRows', (a) => a.panelRows);
  add('a_panelErrors', (a) => a.panelErrors);
  add('a_agreeSum', (a) => a.agreeSum);
  for (let j = 0; j < annotators; j++) {
    add(`a_r${j}`, (a) => a.annRows[j]);
    add(`a_e${j}`, (a) => a.annErrors[j]);
    for (let k = 0; k < classes; k++) add(`a_c${j}_${k}`, (a) => a.classCounts[j][k]);
  }
  const read = (r: Record<string, unknown>): AuditSums => ({
    audited: Number(r.a_audited),
    panelRows: Number(r.a_panelRows),
    panelErrors: Number(r.a_panelErrors),
    agreeSum: Number(r.a_agreeSum),
    annRows: Array.from({ length: annotators }, (_, j) => Number(r[`a_r${j}`])),
    annErrors: Array.from({ length: annotators }, (_, j) => Number(r[`a_e${j}`])),
    classCounts: Array.from({ length: annotators }, (_, j) => Array.from({ length: classes }, (_, k) => Number(r[`a_c${j}_${k}`]))),
  });
  return { names, read };
}
