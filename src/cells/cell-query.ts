/**
 * The cell query: one GROUP BY over the rows that computes every cell, written once for the local
 * engine and for a user's warehouse (see sql/dialect.ts). It runs in two levels:
 *
 * 1. per row, only what must be per row: the row's status (bad weight, bad score, bad error value,
 *    unlabelled), its error, its weight, the bin of each numeric slice column; grouped by the raw
 *    values of the split, run and slice columns (no trimming per row);
 * 2. per group of the first level (few): trimmed values, `(missing)`, split spellings, floor- and
 *    cost-table entries (from the keys), then grouped again.
 *
 * Both levels only add, so the result is exactly what trimming every row first would give.
 */
import { MISSING, type CellPlan, type Grouping } from './plan.js';
import { dialect as dialectOf, type Dialect } from '../sql/dialect.js';
import { binLabel } from './profile.js';
import { ROWS_VIEW, type ColumnKind } from '../read/source.js';
import type { SliceColumn, Split } from '../core/cell.js';
import type { FloorEntry } from '../read/keyed-table.js';

/** Pseudo-split values that mark rows the scan could not use; never valid split spellings. */
export const STATUS_SPLITS = { 2: '!unlabelled', 3: '!score', 4: '!weight', 5: '!error' } as const;

/**
 * The domain of a row's weight: 0, or a finite number from `min` to `max`. Over up to 1e12 rows every
 * sum stays finite (Σw ≤ 1e112, Σw² ≤ 1e212, (Σw)² ≤ 1e224) and every non-zero sum stays a normal number
 * (w² ≥ 1e-200); docs/method.md, "Weights".
 */
export const WEIGHT_RANGE = { min: 1e-100, max: 1e100 } as const;

/** What a valid weight is, in words, for messages. */
export const WEIGHT_EXPECTED = 'a weight of 0 or between 1e-100 and 1e100';

/**
 * SQL condition true when `w` (a double; NULL for a value that is not a number) is not a valid weight
 * ({@link WEIGHT_RANGE}). The one definition of a valid weight: the cell query's row status and the
 * query that locates the first bad row (load.ts) both use it.
 * @example
 * badWeightSql(dialect('duckdb'), 'w'); // => "(w IS NULL OR NOT (isfinite(w)) OR w < 0 OR w > 1e+100 OR (w > 0 AND w < 1e-100))"
 */
export function badWeightSql(d: Dialect, w: string): string {
  return `(${w} IS NULL OR NOT (${d.isFinite(w)}) OR ${w} < 0 OR ${w} > ${d.num(WEIGHT_RANGE.max)} OR (${w} > 0 AND ${w} < ${d.num(WEIGHT_RANGE.min)}))`;
}

const TRUE_WORDS = ['1', '1.0', 'true', 't', 'yes', 'y'];
const FALSE_WORDS = ['0', '0.0', 'false', 'f', 'no', 'n'];
/** Split spellings (trimmed, lower case) and the split each names. */
export const SPLIT_SPELLINGS: readonly (readonly [string, Split])[] = [
  ['train', 'train'],
  ['train_dev', 'train_dev'],
  ['train-dev', 'train_dev'],
  ['traindev', 'train_dev'],
  ['dev', 'dev'],
  ['val', 'dev'],
  ['valid', 'dev'],
  ['validation', 'dev'],
  ['test', 'test'],
];

/** How the query is written. */
export interface CellQueryOptions {
  /** SQL dialect (default DuckDB) */
  readonly dialect?: Dialect;
  /** the FROM item holding the rows (default the local view fg_rows) */
  readonly table?: string;
  /**
   * true when every column is text already (the local view reads every column as VARCHAR); false for a
   * warehouse table, whose columns are cast to text where text is compared
   */
  readonly textColumns?: boolean;
  /**
   * the type of each column of `table` when it keeps its own types (local Parquet): 'text' columns are
   * used as they are, 'number' columns (DOUBLE and integers, which convert to a double exactly as their
   * text does) without a detour through text, 'other' columns are cast to text
   */
  readonly columnTypes?: ReadonlyMap<string, ColumnKind>;
  /**
   * 'local': keys named k0, k1, … and audit sums by annotator index, for floorgap's own reading;
   * 'cells': the cells file format (docs/formats.md), keys and audit sums named after their columns
   */
  readonly names?: 'local' | 'cells';
}

/** Names of the output columns of the cell query. */
export interface CellColumnNames {
  readonly keys: readonly string[];
  /** per annotator j: rows labelled, labels that differ from the label */
  readonly annRows: readonly string[];
  readonly annErrors: readonly string[];
  /** per annotator j, per class k (last: any other class) */
  readonly classCounts: readonly (readonly string[])[];
}

/** The audit columns of a cell (per-annotator columns follow). */
export const AUDIT_COLUMNS = ['fg_audited', 'fg_panel_rows', 'fg_panel_errors', 'fg_agree_sum'] as const;

/** The output column names for a plan (see {@link CellQueryOptions.names}). */
export function cellColumnNames(plan: CellPlan, names: 'local' | 'cells'): CellColumnNames {
  const anns = plan.annotators ?? [];
  const classes = plan.classes ?? [];
  if (names === 'local') {
    return {
      keys: plan.columns.map((_, i) => `k${i}`),
      annRows: anns.map((_, j) => `fg_ann_rows_${j}`),
      annErrors: anns.map((_, j) => `fg_ann_errors_${j}`),
      classCounts: anns.map((_, j) => Array.from({ length: classes.length + 1 }, (_, k) => `fg_ann_cls_${j}_${k}`)),
    };
  }
  return {
    keys: plan.columns.map((c) => c.name),
    annRows: anns.map((a) => `fg_ann_rows__${a}`),
    annErrors: anns.map((a) => `fg_ann_errors__${a}`),
    classCounts: anns.map((a) => [...classes.map((c) => `fg_class__${a}__${c}`), `fg_class_other__${a}`]),
  };
}

function isBinned(c: SliceColumn): boolean {
  return c.kind === 'binned' && (c.edges?.length ?? 0) > 0;
}

/**
 * Writes the cell query for a plan and a grouping.
 * @example
 * cellQuery(plan, { kind: 'cross' }, { dialect: dialect('trino'), table: 'lake.preds', textColumns: false, names: 'cells' });
 */
export function cellQuery(plan: CellPlan, grouping: Grouping, options: CellQueryOptions = {}): string {
  const d = options.dialect ?? dialectOf('duckdb');
  const table = options.table ?? ROWS_VIEW;
  const textColumns = options.textColumns ?? true;
  const names = cellColumnNames(plan, options.names ?? 'local');
  const T = d.types;
  const id = d.ident;
  const kindOf = (col: string): ColumnKind => options.columnTypes?.get(col) ?? (textColumns ? 'text' : 'other');
  // a column's value as text, and as a number (NULL when it is not one)
  const raw = (col: string) => (kindOf(col) === 'text' ? id(col) : `CAST(${id(col)} AS ${T.text})`);
  const num = (col: string) => (kindOf(col) === 'number' ? `CAST(${id(col)} AS ${T.double})` : d.toNumber(raw(col)));
  const trimmed = (expr: string) => `NULLIF(TRIM(${expr}), '')`;
  const { roles } = plan;

  // ---- level 1: per row ----
  const row: string[] = [];
  const groupKeys: string[] = []; // aliases of level-1 values the first GROUP BY groups by
  row.push(`${id(plan.splitColumn)} AS fg_rs`);
  groupKeys.push('fg_rs');
  if (plan.runColumn) {
    row.push(`${id(plan.runColumn)} AS fg_rr`);
    groupKeys.push('fg_rr');
  }
  plan.columns.forEach((c, i) => {
    if (isBinned(c)) {
      const x = num(c.name);
      const whens = c.edges!.map((e, b) => `WHEN ${x} < ${d.num(e)} THEN ${b + 1}`);
      row.push(`CASE WHEN ${x} IS NULL OR ${d.isNan(x)} THEN 0 ${whens.join(' ')} ELSE ${c.edges!.length + 1} END AS fg_r${i}`);
    } else {
      row.push(`${id(c.name)} AS fg_r${i}`);
    }
  });
  // status: 0 usable, 2 unlabelled, 3 bad score, 4 bad weight, 5 bad error value
  const status: string[] = [];
  const weighted = roles.weight !== null;
  if (weighted) {
    const w = num(roles.weight!);
    status.push(`WHEN ${badWeightSql(d, w)} THEN 4`);
    row.push(`${w} AS fg_w`);
  }
  // blank: empty after trimming; DuckDB first tests whether the value starts below '!' (cheap), so the
  // trim runs on almost no rows
  const blank = (x: string) => (d.name === 'duckdb' ? `(${x} < '!' AND TRIM(${x}) = '')` : `TRIM(${x}) = ''`);
  if (roles.score) {
    // a score is a finite number, or blank
    const s = raw(roles.score);
    status.push(
      kindOf(roles.score) === 'number'
        ? `WHEN NOT (${d.isFinite(num(roles.score))}) THEN 3`
        : `WHEN NOT COALESCE(${d.isFinite(d.toNumber(s))}, ${s} IS NULL OR ${blank(s)}) THEN 3`,
    );
  }
  let errorExpr: string;
  if (roles.error) {
    const e = `LOWER(${trimmed(raw(roles.error))})`;
    const one = roles.errorIsCorrect ? FALSE_WORDS : TRUE_WORDS;
    status.push(`WHEN ${e} IS NOT NULL AND ${e} NOT IN (${[...TRUE_WORDS, ...FALSE_WORDS].map(d.str).join(', ')}) THEN 5`);
    status.push(`WHEN ${e} IS NULL THEN 2`);
    errorExpr = `CASE WHEN ${e} IN (${one.map(d.str).join(', ')}) THEN 1 ELSE 0 END`;
  } else {
    const l = raw(roles.label!);
    const p = raw(roles.pred!);
    status.push(`WHEN ${l} IS NULL OR ${p} IS NULL OR ${blank(l)} OR ${blank(p)} THEN 2`);
    // trimmed comparison only where the raw values differ; two numbers compare as numbers (1 = 1.0),
    // except in ANSI SQL, which has no cast that returns NULL for text that is not a number
    const sameNumber = d.name === 'ansi' ? '' : `WHEN ${d.toNumber(`TRIM(${l})`)} = ${d.toNumber(`TRIM(${p})`)} THEN 0 `;
    errorExpr = `CASE WHEN ${l} = ${p} THEN 0 WHEN TRIM(${l}) = TRIM(${p}) THEN 0 ${sameNumber}ELSE 1 END`;
  }
  row.push(`CASE ${status.join(' ')} ELSE 0 END AS fg_st`);
  groupKeys.push('fg_st');
  row.push(`${errorExpr} AS fg_e`);

  // floor- and cost-table entries: from the keys after the first GROUP BY when every key column is a
  // category column of a full cross; per row otherwise
  const keyIndex = (col: string) => plan.columns.findIndex((c) => c.name === col);
  const entriesLate = (entries: readonly FloorEntry[]) =>
    grouping.kind === 'cross' && entries.every((e) => Object.keys(e.keys).every((k) => keyIndex(k) >= 0 && !isBinned(plan.columns[keyIndex(k)])));
  const floorEntries = plan.floorEntries;
  const costEntries = plan.costEntries ?? [];
  const floorLate = entriesLate(floorEntries);
  const costLate = entriesLate(costEntries);
  const entryCase = (entries: readonly FloorEntry[], value: (col: string) => string) => {
    if (entries.length === 0) return '-1';
    const order = entries.map((e, i) => ({ e, i })).sort((a, b) => Object.keys(b.e.keys).length - Object.keys(a.e.keys).length || a.i - b.i);
    const whens = order.map(({ e, i }) => {
      const conds = Object.entries(e.keys).map(([col, v]) => (v === MISSING ? `${value(col)} IS NULL` : `${value(col)} = ${d.str(v)}`));
      return `WHEN ${conds.length ? conds.join(' AND ') : '1 = 1'} THEN ${i}`;
    });
    return `CASE ${whens.join(' ')} ELSE -1 END`;
  };
  const rowValue = (col: string) => trimmed(raw(col));
  if (!floorLate) {
    row.push(`${entryCase(floorEntries, rowValue)} AS fg_fe`);
    groupKeys.push('fg_fe');
  }
  if (costEntries.length > 0 && !costLate) {
    row.push(`${entryCase(costEntries, rowValue)} AS fg_ce`);
    groupKeys.push('fg_ce');
  }

  // annotator audit, per row (unweighted)
  const anns = plan.annotators ?? [];
  const classes = plan.classes ?? [];
  const audit = anns.length > 0 ? auditParts(d, anns, classes, trimmed(raw(roles.label!)), (c) => trimmed(raw(c))) : null;
  if (audit) row.push(...audit.level1);

  // ---- level 1 → first GROUP BY ----
  const keyAliases = plan.columns.map((_, i) => `fg_r${i}`);
  const sums = ['COUNT(*) AS fg_n'];
  if (weighted) sums.push('SUM(fg_w) AS fg_sw', 'SUM(fg_w * fg_w) AS fg_sww', 'SUM(fg_w * fg_e) AS fg_swe');
  else sums.push('SUM(fg_e) AS fg_se');
  if (audit) sums.push(...audit.sums);
  let groupBy: string;
  const bits: string[] = [];
  if (grouping.kind === 'cross') {
    groupBy = [...groupKeys, ...keyAliases].join(', ');
  } else {
    const sets = grouping.sets.map((set) => {
      const idx = set.map((name) => {
        const i = keyIndex(name);
        if (i < 0) throw new Error(`grouping set names unknown column ${name}`);
        return `fg_r${i}`;
      });
      return `(${[...groupKeys, ...idx].join(', ')})`;
    });
    groupBy = `GROUPING SETS (${sets.join(', ')})`;
    // which slice columns each first-level group leaves out (a raw NULL is a missing value, not "left out")
    plan.columns.forEach((_, i) => bits.push(`GROUPING(fg_r${i}) AS fg_g${i}`));
  }
  const list = (items: readonly string[]) => items.join(',\n    ');
  const filter = plan.where ? `\n  WHERE (${plan.where})` : '';
  const ctes = [`fg_row AS (\n  SELECT\n    ${list(row)}\n  FROM ${table}${filter}\n)`];
  if (audit) ctes.push(`fg_row_audit AS (\n  SELECT\n    fg_row.*,\n    ${list(audit.level2)}\n  FROM fg_row\n)`);
  ctes.push(`fg_group AS (\n  SELECT\n    ${list([...groupKeys, ...keyAliases, ...bits, ...sums])}\n  FROM ${audit ? 'fg_row_audit' : 'fg_row'}\n  GROUP BY ${groupBy}\n)`);

  // ---- level 2: per first-level group ----
  // the first level keeps each key in its column's type; text from here on
  const text2 = (alias: string, col: string) => (kindOf(col) === 'text' ? alias : `CAST(${alias} AS ${T.text})`);
  const splitText = `TRIM(${text2('fg_rs', plan.splitColumn)})`;
  const normSplit = `CASE LOWER(${splitText}) ${SPLIT_SPELLINGS.map(([from, to]) => `WHEN ${d.str(from)} THEN ${d.str(to)}`).join(' ')} ELSE COALESCE(${splitText}, '') END`;
  const statusSplit = `CASE fg_st ${Object.entries(STATUS_SPLITS).map(([k, v]) => `WHEN ${k} THEN ${d.str(v)}`).join(' ')} ELSE ${normSplit} END`;
  const norm: string[] = [`${statusSplit} AS fg_split`];
  norm.push(plan.runColumn ? `COALESCE(${trimmed(text2('fg_rr', plan.runColumn))}, ${d.str(MISSING)}) AS fg_run` : `CAST(NULL AS ${T.text}) AS fg_run`);
  const keyValue = (i: number) => {
    const c = plan.columns[i];
    if (isBinned(c)) {
      const labels = Array.from({ length: c.edges!.length + 1 }, (_, b) => `WHEN ${b + 1} THEN ${d.str(binLabel(c.edges!, b))}`);
      return `CASE fg_r${i} ${labels.join(' ')} ELSE ${d.str(MISSING)} END`;
    }
    return `COALESCE(${trimmed(text2(`fg_r${i}`, c.name))}, ${d.str(MISSING)})`;
  };
  plan.columns.forEach((_, i) => {
    const v = keyValue(i);
    norm.push(`${grouping.kind === 'sets' ? `CASE WHEN fg_g${i} = 1 THEN NULL ELSE ${v} END` : v} AS ${id(names.keys[i])}`);
  });
  // entries from the trimmed keys: a missing value is `(missing)` there
  const lateValue = (col: string) => keyValue(keyIndex(col));
  const lateCase = (entries: readonly FloorEntry[]) => {
    if (entries.length === 0) return '-1';
    // a missing value is `(missing)` among the trimmed keys, so an entry for it compares equal
    const order = entries
      .map((e, i) => ({ e, i }))
      .sort((a, b) => Object.keys(b.e.keys).length - Object.keys(a.e.keys).length || a.i - b.i);
    const whens = order.map(({ e, i }) => {
      const conds = Object.entries(e.keys).map(([col, v]) => `${lateValue(col)} = ${d.str(v)}`);
      return `WHEN ${conds.length ? conds.join(' AND ') : '1 = 1'} THEN ${i}`;
    });
    return `CASE ${whens.join(' ')} ELSE -1 END`;
  };
  norm.push(`${floorLate ? lateCase(floorEntries) : 'fg_fe'} AS fg_floor_entry`);
  if (costEntries.length > 0) norm.push(`${costLate ? lateCase(costEntries) : 'fg_ce'} AS fg_cost_entry`);
  const w1 = weighted ? 'fg_sw' : `CAST(fg_n AS ${T.double})`;
  norm.push('fg_n', `${w1} AS fg_w1`);
  if (weighted) norm.push('fg_sww', 'fg_swe');
  else norm.push('fg_se');
  if (audit) norm.push(...audit.sumNames);
  ctes.push(`fg_key AS (\n  SELECT\n    ${list(norm)}\n  FROM fg_group\n)`);

  // ---- final GROUP BY over the trimmed keys, with the floor and cost tables ----
  const floorRows = [['-1', d.num(plan.defaultFloor), 'NULL'], ...floorEntries.map((e, i) => [String(i), d.num(e.floor), e.n === null ? 'NULL' : d.num(e.n)])];
  const floorTable = d.values(
    'f',
    [
      { name: 'fg_entry', type: 'int' },
      { name: 'fg_floor', type: 'double' },
      { name: 'fg_floor_n', type: 'double' },
    ],
    floorRows,
  );
  const costTable =
    costEntries.length > 0
      ? d.values(
          'k',
          [
            { name: 'fg_entry', type: 'int' },
            { name: 'fg_cost', type: 'double' },
          ],
          costEntries.map((e, i) => [String(i), d.num(e.floor)]),
        )
      : null;
  const outKeys = [`c.fg_split`, `c.fg_run`, ...names.keys.map((k) => `c.${id(k)}`)];
  const out = [
    'c.fg_split AS fg_split',
    'c.fg_run AS fg_run',
    ...names.keys.map((k) => `c.${id(k)} AS ${id(k)}`),
    'c.fg_floor_entry AS fg_floor_entry',
    'f.fg_floor AS fg_floor',
    'f.fg_floor_n AS fg_floor_n',
    `CAST(SUM(c.fg_n) AS ${T.double}) AS fg_rows`,
    `SUM(c.fg_w1) AS fg_weight`,
    weighted ? 'SUM(c.fg_sww) AS fg_weight_sq' : `SUM(c.fg_w1) AS fg_weight_sq`,
    weighted ? 'SUM(c.fg_swe) AS fg_errors' : `CAST(SUM(c.fg_se) AS ${T.double}) AS fg_errors`,
    'SUM(c.fg_w1 * f.fg_floor) AS fg_floor_sum',
    costTable ? 'COALESCE(SUM(c.fg_w1 * k.fg_cost), 0) AS fg_cost_sum' : `CAST(0 AS ${T.double}) AS fg_cost_sum`,
    costTable ? 'COALESCE(SUM(CASE WHEN k.fg_cost IS NULL THEN 0 ELSE c.fg_w1 END), 0) AS fg_cost_weight' : `CAST(0 AS ${T.double}) AS fg_cost_weight`,
  ];
  if (audit) {
    const outNames = [...AUDIT_COLUMNS, ...anns.flatMap((_, j) => [names.annRows[j], names.annErrors[j], ...names.classCounts[j]])];
    audit.sumNames.forEach((s, k) => out.push(`CAST(SUM(c.${s}) AS ${T.double}) AS ${id(outNames[k])}`));
  }
  const joins = [`LEFT JOIN ${floorTable} ON c.fg_floor_entry = f.fg_entry`];
  if (costTable) joins.push(`LEFT JOIN ${costTable} ON c.fg_cost_entry = k.fg_entry`);
  return `WITH
${ctes.join(',\n')}
SELECT
  ${out.join(',\n  ')}
FROM fg_key AS c
${joins.join('\n')}
GROUP BY ${[...outKeys, 'c.fg_floor_entry', 'f.fg_floor', 'f.fg_floor_n'].join(', ')}`;
}

/** Per-row SQL for the annotator audit: labels a_j, agreement counts c_j, the row's panel error and sums. */
function auditParts(
  d: Dialect,
  anns: readonly string[],
  classes: readonly string[],
  label: string,
  value: (col: string) => string,
): { level1: string[]; level2: string[]; sums: string[]; sumNames: string[] } {
  const a = anns.map((_, j) => `fg_a${j}`);
  const dbl = d.types.double;
  // a row without a true class (possible with an error column) cannot be scored: its labels are left out
  const level1 = [...anns.map((col, j) => `CASE WHEN ${label} IS NULL THEN NULL ELSE ${value(col)} END AS fg_a${j}`), `${label} AS fg_lab`];
  const level2 = [
    ...a.map((aj, j) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE ${a.map((ai) => `CASE WHEN ${ai} = ${aj} THEN 1 ELSE 0 END`).join(' + ')} END AS fg_c${j}`),
    `${a.map((aj) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE 1 END`).join(' + ')} AS fg_nlab`,
  ];
  const c = a.map((_, j) => `fg_c${j}`);
  const m = d.greatest(c);
  const top = (j: number) => `(${c[j]} = ${m} AND ${a[j]} IS NOT NULL)`;
  const topWrong = a.map((aj, j) => `CASE WHEN ${top(j)} AND ${aj} <> fg_lab THEN 1 ELSE 0 END`).join(' + ');
  const topAll = a.map((_, j) => `CASE WHEN ${top(j)} THEN 1 ELSE 0 END`).join(' + ');
  const panel = 'fg_nlab >= 2';
  const sums: string[] = [];
  const sumNames: string[] = [];
  const add = (expr: string, name: string) => {
    sums.push(`${expr} AS ${name}`);
    sumNames.push(name);
  };
  add(`SUM(CASE WHEN fg_nlab >= 1 THEN 1 ELSE 0 END)`, 'fg_x_audited');
  add(`SUM(CASE WHEN ${panel} THEN 1 ELSE 0 END)`, 'fg_x_panel_rows');
  // majority vote: among the k labels tied for most votes, the share that is wrong
  add(`COALESCE(SUM(CASE WHEN ${panel} THEN CAST(${topWrong} AS ${dbl}) / (${topAll}) END), 0)`, 'fg_x_panel_errors');
  // pairwise agreement of the row: Σ_j (c_j − 1) / (n (n − 1)) = Σ_c n_c (n_c − 1) / (n (n − 1))
  add(
    `COALESCE(SUM(CASE WHEN ${panel} THEN CAST(${a.map((aj, j) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE ${c[j]} - 1 END`).join(' + ')} AS ${dbl}) / (fg_nlab * (fg_nlab - 1)) END), 0)`,
    'fg_x_agree_sum',
  );
  a.forEach((aj, j) => {
    add(`SUM(CASE WHEN ${aj} IS NULL THEN 0 ELSE 1 END)`, `fg_x_r${j}`);
    add(`SUM(CASE WHEN ${aj} IS NOT NULL AND ${aj} IS DISTINCT FROM fg_lab THEN 1 ELSE 0 END)`, `fg_x_e${j}`);
    classes.forEach((cls, k) => add(`SUM(CASE WHEN ${panel} AND ${aj} = ${d.str(cls)} THEN 1 ELSE 0 END)`, `fg_x_c${j}_${k}`));
    add(
      `SUM(CASE WHEN ${panel} AND ${aj} IS NOT NULL${classes.length ? ` AND ${aj} NOT IN (${classes.map(d.str).join(', ')})` : ''} THEN 1 ELSE 0 END)`,
      `fg_x_c${j}_${classes.length}`,
    );
  });
  return { level1, level2, sums, sumNames };
}
