import type { Duck } from './duck.js';
import { binLabel, textSql } from './profile.js';
import type { Roles } from './roles.js';
import { normalizeSplit, SPLIT_HELP } from './roles.js';
import { ROWS_VIEW, whereSql } from './source.js';
import { ident, literal } from './sql.js';
import { addAudit, type AuditSums, type Cell, type SliceColumn, type Split } from './types.js';
import type { FloorEntry } from '../io/read-floor-table.js';
import { error } from '../util/error.js';

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
}

/** How rows are grouped into cells: the full cross of all slice columns, or grouping sets. */
export type Grouping = { readonly kind: 'cross' } | { readonly kind: 'sets'; readonly sets: readonly (readonly string[])[] };

/** Value shown for a missing slice value. */
export const MISSING = '(missing)';

/** Pseudo-split values that mark rows the scan could not use; never valid split spellings. */
const BAD = {
  weight: '!weight',
  score: '!score',
  error: '!error',
  unlabelled: '!unlabelled',
} as const;

/** SQL for a slice column's cell key: trimmed text, or the bin label for numeric columns. */
export function keySql(col: SliceColumn): string {
  if (col.kind === 'category' || !col.edges || col.edges.length === 0) {
    return `COALESCE(${textSql(col.name)}, ${literal(MISSING)})`;
  }
  const x = `TRY_CAST(${textSql(col.name)} AS DOUBLE)`;
  const edges = col.edges;
  const whens = edges.map((e, i) => `WHEN ${x} < ${e} THEN ${literal(binLabel(edges, i))}`);
  return `CASE WHEN ${x} IS NULL OR isnan(${x}) THEN ${literal(MISSING)} ${whens.join(' ')} ELSE ${literal(binLabel(edges, edges.length))} END`;
}

const TRUE_WORDS = ['1', '1.0', 'true', 't', 'yes', 'y'];
const FALSE_WORDS = ['0', '0.0', 'false', 'f', 'no', 'n'];

function inList(words: readonly string[]): string {
  return `(${words.map(literal).join(', ')})`;
}

/**
 * SQL for a row's error (1 or 0): label ≠ pred as trimmed strings, or the 0/1 error column (or the
 * `correct` column inverted); with conditions for a value that is not 0/1 and for an unlabelled row.
 */
export function errorSql(roles: Pick<Roles, 'label' | 'pred' | 'error' | 'errorIsCorrect'>): { error: string; badError: string; unlabelled: string } {
  if (roles.error) {
    const e = `lower(${textSql(roles.error)})`;
    const one = roles.errorIsCorrect ? FALSE_WORDS : TRUE_WORDS;
    return {
      error: `CASE WHEN ${e} IN ${inList(one)} THEN 1 ELSE 0 END`,
      badError: `(${e} IS NOT NULL AND ${e} NOT IN ${inList([...TRUE_WORDS, ...FALSE_WORDS])})`,
      unlabelled: `(${e} IS NULL)`,
    };
  }
  const label = textSql(roles.label!);
  const pred = textSql(roles.pred!);
  return {
    error: `CASE WHEN ${label} = ${pred} THEN 0 ELSE 1 END`,
    badError: 'FALSE',
    unlabelled: `(${label} IS NULL OR ${pred} IS NULL)`,
  };
}

/** SQL pieces that compute a row's weight, error, validity and floor entry. */
export function rowSql(plan: CellPlan): {
  weight: string;
  error: string;
  status: string;
  floorEntry: string;
} {
  const { roles } = plan;
  const weight = roles.weight ? `TRY_CAST(${textSql(roles.weight)} AS DOUBLE)` : '1';
  const badWeight = roles.weight ? `(${weight} IS NULL OR ${weight} < 0 OR isnan(${weight}) OR isinf(${weight}))` : 'FALSE';
  const scoreNum = roles.score ? `TRY_CAST(${textSql(roles.score)} AS DOUBLE)` : null;
  const badScore = roles.score ? `(${textSql(roles.score)} IS NOT NULL AND (${scoreNum} IS NULL OR isnan(${scoreNum}) OR isinf(${scoreNum})))` : 'FALSE';
  const { error, badError, unlabelled } = errorSql(roles);
  const status = `CASE WHEN ${badWeight} THEN ${literal(BAD.weight)} WHEN ${badScore} THEN ${literal(BAD.score)} WHEN ${badError} THEN ${literal(BAD.error)} WHEN ${unlabelled} THEN ${literal(BAD.unlabelled)} ELSE COALESCE(${textSql(plan.splitColumn)}, '') END`;
  return { weight, error, status, floorEntry: floorEntrySql(plan.floorEntries) };
}

/**
 * The floor-table entry a row takes: the most specific matching entry (most key columns), earlier
 * lines first among equally specific ones; -1 (the default floor) when none matches.
 */
export function floorEntrySql(entries: readonly FloorEntry[]): string {
  if (entries.length === 0) return '-1';
  const order = entries
    .map((e, i) => ({ e, i }))
    .sort((a, b) => Object.keys(b.e.keys).length - Object.keys(a.e.keys).length || a.i - b.i);
  const whens = order.map(({ e, i }) => {
    const conds = Object.entries(e.keys).map(([col, v]) =>
      v === MISSING ? `${textSql(col)} IS NULL` : `${textSql(col)} = ${literal(v)}`,
    );
    return `WHEN ${conds.length ? conds.join(' AND ') : 'TRUE'} THEN ${i}`;
  });
  return `CASE ${whens.join(' ')} ELSE -1 END`;
}

function listSql(values: readonly (number | null)[]): string {
  return `[${values.map((v) => (v === null ? 'NULL' : String(v))).join(', ')}]::DOUBLE[]`;
}

/** Per-row SQL for the annotator audit: the labels a_j, their agreement counts and the row's panel error. */
function auditSql(plan: CellPlan): { level1: string[]; level2: string[]; sums: string[] } {
  const anns = plan.annotators ?? [];
  if (anns.length === 0) return { level1: [], level2: [], sums: [] };
  const label = textSql(plan.roles.label!);
  const a = anns.map((_, j) => `fg_a${j}`);
  // a row without a true class (possible with an error column) cannot be scored: its labels are left out
  const level1 = [...anns.map((col, j) => `CASE WHEN ${label} IS NULL THEN NULL ELSE ${textSql(col)} END AS fg_a${j}`), `${label} AS fg_lab`];
  // c_j: how many annotators gave the same label as annotator j (j included); 0 when j gave none
  const level2 = [
    ...a.map((aj, j) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE ${a.map((ai) => `CASE WHEN ${ai} = ${aj} THEN 1 ELSE 0 END`).join(' + ')} END AS fg_c${j}`),
    `${a.map((aj) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE 1 END`).join(' + ')} AS fg_nlab`,
  ];
  const c = a.map((_, j) => `fg_c${j}`);
  const m = c.length === 1 ? c[0] : `greatest(${c.join(', ')})`;
  const top = (j: number) => `(${c[j]} = ${m} AND ${a[j]} IS NOT NULL)`;
  const topWrong = a.map((aj, j) => `CASE WHEN ${top(j)} AND ${aj} <> fg_lab THEN 1 ELSE 0 END`).join(' + ');
  const topAll = a.map((_, j) => `CASE WHEN ${top(j)} THEN 1 ELSE 0 END`).join(' + ');
  const panel = 'fg_nlab >= 2';
  const classes = plan.classes ?? [];
  const sums = [
    `sum(CASE WHEN fg_nlab >= 1 THEN 1 ELSE 0 END) AS fg_audited`,
    `sum(CASE WHEN ${panel} THEN 1 ELSE 0 END) AS fg_panel_rows`,
    // majority vote: among the k labels tied for most votes, the share that is wrong
    `coalesce(sum(CASE WHEN ${panel} THEN (${topWrong})::DOUBLE / (${topAll}) END), 0) AS fg_panel_errors`,
    // pairwise agreement of the row: Σ_j (c_j − 1) / (n (n − 1)) = Σ_c n_c (n_c − 1) / (n (n − 1))
    `coalesce(sum(CASE WHEN ${panel} THEN (${a.map((aj, j) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE ${c[j]} - 1 END`).join(' + ')})::DOUBLE / (fg_nlab * (fg_nlab - 1)) END), 0) AS fg_agree_sum`,
    ...a.flatMap((aj, j) => [
      `sum(CASE WHEN ${aj} IS NULL THEN 0 ELSE 1 END) AS fg_ann_rows_${j}`,
      `sum(CASE WHEN ${aj} IS NOT NULL AND ${aj} IS DISTINCT FROM fg_lab THEN 1 ELSE 0 END) AS fg_ann_errors_${j}`,
      ...classes.map((cls, k) => `sum(CASE WHEN ${panel} AND ${aj} = ${literal(cls)} THEN 1 ELSE 0 END) AS fg_ann_cls_${j}_${k}`),
      `sum(CASE WHEN ${panel} AND ${aj} IS NOT NULL${classes.length ? ` AND ${aj} NOT IN (${classes.map(literal).join(', ')})` : ''} THEN 1 ELSE 0 END) AS fg_ann_cls_${j}_${classes.length}`,
    ]),
  ];
  return { level1, level2, sums };
}

/**
 * The one-scan GROUP BY that computes cells. Keys are aliased k0, k1, … in column order.
 * Output columns: fg_split (as written, trimmed), fg_run, k0…, fg_floor_entry, fg_floor_n, fg_rows,
 * fg_weight, fg_weight_sq, fg_errors, fg_floor_sum, fg_cost_sum, fg_cost_weight, and with annotators fg_audited,
 * fg_panel_rows, fg_panel_errors, fg_agree_sum, fg_ann_rows_j, fg_ann_errors_j, fg_ann_cls_j_k.
 */
export function cellSql(plan: CellPlan, grouping: Grouping, table = ROWS_VIEW): string {
  const r = rowSql(plan);
  const keys = plan.columns.map((c, i) => `${keySql(c)} AS k${i}`);
  const floors = listSql([plan.defaultFloor, ...plan.floorEntries.map((e) => e.floor)]);
  const ns = listSql([null, ...plan.floorEntries.map((e) => e.n)]);
  const costEntries = plan.costEntries ?? [];
  // the cost of rows a cost-table entry matches; other rows take --label-cost at triage
  const cost = costEntries.length
    ? `list_extract(${listSql([null, ...costEntries.map((e) => e.floor)])}, ${floorEntrySql(costEntries)} + 2)`
    : 'NULL::DOUBLE';
  const run = plan.runColumn ? `COALESCE(${textSql(plan.runColumn)}, ${literal(MISSING)})` : 'NULL::VARCHAR';
  const audit = auditSql(plan);
  const inner = [
    `${r.status} AS fg_split`,
    `${run} AS fg_run`,
    ...keys,
    `${r.weight} AS fg_w`,
    `${r.error} AS fg_e`,
    `${r.floorEntry} AS fg_floor_entry`,
    `${cost} AS fg_cost`,
    ...audit.level1,
  ].join(',\n    ');
  const weighted = plan.roles.weight !== null;
  const sums = [
    'count(*) AS fg_rows',
    weighted ? 'sum(fg_w) AS fg_weight' : 'count(*)::DOUBLE AS fg_weight',
    weighted ? 'sum(fg_w * fg_w) AS fg_weight_sq' : 'count(*)::DOUBLE AS fg_weight_sq',
    weighted ? 'sum(fg_w * fg_e) AS fg_errors' : 'sum(fg_e)::DOUBLE AS fg_errors',
    `sum(fg_w * list_extract(${floors}, fg_floor_entry + 2)) AS fg_floor_sum`,
    'coalesce(sum(fg_w * fg_cost), 0) AS fg_cost_sum',
    'coalesce(sum(CASE WHEN fg_cost IS NULL THEN 0 ELSE fg_w END), 0) AS fg_cost_weight',
    ...audit.sums,
  ];
  const keyNames = plan.columns.map((_, i) => `k${i}`);
  // fg_floor_n follows from fg_floor_entry, so grouping by the entry is enough
  const always = ['fg_split', 'fg_run', 'fg_floor_entry'];
  let groupBy: string;
  if (grouping.kind === 'cross') groupBy = [...always, ...keyNames].join(', ');
  else {
    const sets = grouping.sets.map((set) => {
      const idx = set.map((name) => {
        const i = plan.columns.findIndex((c) => c.name === name);
        if (i < 0) throw new Error(`grouping set names unknown column ${name}`);
        return `k${i}`;
      });
      return `(${[...always, ...idx].join(', ')})`;
    });
    groupBy = `GROUPING SETS (${sets.join(', ')})`;
  }
  const from = `(
  SELECT
    ${inner}
  FROM ${table}
  WHERE ${whereSql(plan.where)}
)`;
  const source = audit.level2.length ? `(SELECT *, ${audit.level2.join(', ')} FROM ${from})` : from;
  return `SELECT fg_split, fg_run, ${keyNames.length ? keyNames.join(', ') + ', ' : ''}fg_floor_entry, list_extract(${ns}, fg_floor_entry + 2) AS fg_floor_n, ${sums.join(', ')}
FROM ${source}
GROUP BY ${groupBy}`;
}

function auditOf(row: Record<string, unknown>, plan: CellPlan): AuditSums | null {
  const anns = plan.annotators ?? [];
  if (anns.length === 0) return null;
  const classes = (plan.classes ?? []).length + 1;
  return {
    audited: Number(row.fg_audited),
    panelRows: Number(row.fg_panel_rows),
    panelErrors: Number(row.fg_panel_errors),
    agreeSum: Number(row.fg_agree_sum),
    annRows: anns.map((_, j) => Number(row[`fg_ann_rows_${j}`])),
    annErrors: anns.map((_, j) => Number(row[`fg_ann_errors_${j}`])),
    classCounts: anns.map((_, j) => Array.from({ length: classes }, (_, k) => Number(row[`fg_ann_cls_${j}_${k}`]))),
  };
}

/** Rows the scan set aside, by reason. */
export interface ScanIssues {
  readonly badWeight: number;
  readonly badScore: number;
  readonly badError: number;
  readonly unlabelled: number;
  readonly unknownSplits: ReadonlyMap<string, number>;
}

/**
 * Converts the scan's raw rows to cells, collecting rows set aside and unknown split values. Raw split
 * spellings that name the same split (`dev`, `val`, `Validation`) are merged into one cell.
 * @param copies how many times the scan counted each row (the number of grouping sets), so that the
 * counts of rows set aside are counts of rows
 */
export function toCells(rows: readonly Record<string, unknown>[], plan: CellPlan, copies = 1): { cells: Cell[]; issues: ScanIssues } {
  const cells: Cell[] = [];
  const byId = new Map<string, number>();
  let badWeight = 0;
  let badScore = 0;
  let badError = 0;
  let unlabelled = 0;
  const unknownSplits = new Map<string, number>();
  for (const row of rows) {
    const raw = String(row.fg_split);
    const count = Number(row.fg_rows);
    if (raw === BAD.weight) badWeight += count;
    else if (raw === BAD.score) badScore += count;
    else if (raw === BAD.error) badError += count;
    else if (raw === BAD.unlabelled) unlabelled += count;
    else {
      const split = normalizeSplit(raw);
      if (split === null) {
        unknownSplits.set(raw, (unknownSplits.get(raw) ?? 0) + count);
        continue;
      }
      const key: Record<string, string | null> = {};
      plan.columns.forEach((c, i) => {
        const v = row[`k${i}`];
        key[c.name] = v === null || v === undefined ? null : String(v);
      });
      const cell: Cell = {
        key,
        split,
        run: row.fg_run === null || row.fg_run === undefined ? null : String(row.fg_run),
        rows: count,
        weight: Number(row.fg_weight),
        weightSq: Number(row.fg_weight_sq),
        errors: Number(row.fg_errors),
        floorSum: Number(row.fg_floor_sum),
        floorEntry: Number(row.fg_floor_entry),
        floorN: row.fg_floor_n === null || row.fg_floor_n === undefined ? null : Number(row.fg_floor_n),
        costSum: Number(row.fg_cost_sum),
        costWeight: Number(row.fg_cost_weight),
        audit: auditOf(row, plan),
      };
      const id = JSON.stringify([split, cell.run, cell.floorEntry, ...plan.columns.map((c) => key[c.name])]);
      const at = byId.get(id);
      if (at === undefined) {
        byId.set(id, cells.length);
        cells.push(cell);
      } else {
        const prev = cells[at];
        cells[at] = {
          ...prev,
          rows: prev.rows + cell.rows,
          weight: prev.weight + cell.weight,
          weightSq: prev.weightSq + cell.weightSq,
          errors: prev.errors + cell.errors,
          floorSum: prev.floorSum + cell.floorSum,
          costSum: prev.costSum + cell.costSum,
          costWeight: prev.costWeight + cell.costWeight,
          audit: addAudit(prev.audit, cell.audit),
        };
      }
    }
  }
  if (copies > 1) {
    // every row is counted once per grouping set
    for (const [raw, n] of unknownSplits) unknownSplits.set(raw, n / copies);
    return {
      cells,
      issues: { badWeight: badWeight / copies, badScore: badScore / copies, badError: badError / copies, unlabelled: unlabelled / copies, unknownSplits },
    };
  }
  return { cells, issues: { badWeight, badScore, badError, unlabelled, unknownSplits } };
}

/** Runs the cell scan. */
export async function scanCells(duck: Duck, plan: CellPlan, grouping: Grouping): Promise<{ cells: Cell[]; issues: ScanIssues }> {
  const rows = await duck.all(cellSql(plan, grouping));
  return toCells(rows, plan, grouping.kind === 'sets' ? grouping.sets.length : 1);
}

/** One-line error for unknown split values. */
export function unknownSplitError(where: string, column: string, unknown: ReadonlyMap<string, number>): Error {
  const list = [...unknown.entries()]
    .sort((a, b) => b[1] - a[1])
    .slice(0, 10)
    .map(([v, n]) => `"${v === '' ? '(empty)' : v}" (${n} rows)`)
    .join(', ');
  return error(`${where}: column "${column}" has unknown split values ${list}; expected ${SPLIT_HELP}`);
}

/** Splits present in a set of cells, with their row counts. */
export function splitRows(cells: readonly Cell[]): Record<Split, number> {
  const out: Record<Split, number> = { train: 0, train_dev: 0, dev: 0, test: 0 };
  for (const c of cells) out[c.split] += c.rows;
  return out;
}
