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
import { badScoreSql, badWeightSql, entrySql, errorRule, ROW_STATUS, splitSql, statusSql, STATUS_SPLITS, trimmedSql, type RowProblem } from './row-status.js';
import { dialect as dialectOf, type Dialect } from '../sql/dialect.js';
import { binLabel } from './profile.js';
import { ROWS_VIEW, type ColumnKind } from '../read/source.js';
import type { SliceColumn } from '../core/cell.js';
import type { FloorEntry } from '../read/keyed-table.js';
import { auditParts, type AuditParts } from './audit-sql.js';

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

/** What every phase of the query needs: the plan, the dialect and how a column is read. */
interface QueryContext {
  readonly plan: CellPlan;
  readonly grouping: Grouping;
  readonly d: Dialect;
  readonly names: CellColumnNames;
  readonly weighted: boolean;
  readonly kindOf: (col: string) => ColumnKind;
  /** a column's value as text */
  readonly raw: (col: string) => string;
  /** a column's value as a number (NULL when it is not one) */
  readonly num: (col: string) => string;
  readonly keyIndex: (col: string) => number;
  readonly floorEntries: readonly FloorEntry[];
  readonly costEntries: readonly FloorEntry[];
}

/** The per-row level: its SELECT list, the aliases the first GROUP BY groups by, and where entries are found. */
interface RowLevel {
  readonly row: readonly string[];
  readonly groupKeys: readonly string[];
  /** floor- (cost-) table entries found from the keys after the first GROUP BY rather than per row */
  readonly floorLate: boolean;
  readonly costLate: boolean;
  readonly audit: AuditParts | null;
}

/**
 * Writes the cell query for a plan and a grouping.
 * @example
 * cellQuery(plan, { kind: 'cross' }, { dialect: dialect('trino'), table: 'lake.preds', textColumns: false, names: 'cells' });
 */
export function cellQuery(plan: CellPlan, grouping: Grouping, options: CellQueryOptions = {}): string {
  const ctx = queryContext(plan, grouping, options);
  const level = rowLevel(ctx);
  const ctes = [...firstLevelCtes(ctx, level, options.table ?? ROWS_VIEW), keyLevelCte(ctx, level)];
  return `WITH
${ctes.join(',\n')}
${finalSelect(ctx, level)}`;
}

function queryContext(plan: CellPlan, grouping: Grouping, options: CellQueryOptions): QueryContext {
  const d = options.dialect ?? dialectOf('duckdb');
  const textColumns = options.textColumns ?? true;
  const kindOf = (col: string): ColumnKind => options.columnTypes?.get(col) ?? (textColumns ? 'text' : 'other');
  const raw = (col: string) => (kindOf(col) === 'text' ? d.ident(col) : `CAST(${d.ident(col)} AS ${d.types.text})`);
  const num = (col: string) => (kindOf(col) === 'number' ? `CAST(${d.ident(col)} AS ${d.types.double})` : d.toNumber(raw(col)));
  return {
    plan,
    grouping,
    d,
    names: cellColumnNames(plan, options.names ?? 'local'),
    weighted: plan.roles.weight !== null,
    kindOf,
    raw,
    num,
    keyIndex: (col) => plan.columns.findIndex((c) => c.name === col),
    floorEntries: plan.floorEntries,
    costEntries: plan.costEntries ?? [],
  };
}

const list = (items: readonly string[]) => items.join(',\n    ');

/** Level 1, per row: only what must be per row (status, error, weight, bins, entries that need raw values). */
function rowLevel(ctx: QueryContext): RowLevel {
  const { plan, grouping, d, raw, num, kindOf, keyIndex, weighted, floorEntries, costEntries } = ctx;
  const { roles } = plan;
  const id = d.ident;
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
  // the row's status (row-status.ts: the one definition of a usable row) and its error
  if (weighted) row.push(`${num(roles.weight!)} AS fg_w`);
  const rule = errorRule(d, roles, raw);
  const status = statusSql({
    badWeight: weighted ? badWeightSql(d, num(roles.weight!)) : undefined,
    badScore: roles.score ? badScoreSql(d, raw(roles.score), kindOf(roles.score) === 'number' ? num(roles.score) : null) : undefined,
    badError: rule.badError,
    unlabelled: rule.unlabelled,
  });
  row.push(`${status} AS fg_st`);
  groupKeys.push('fg_st');
  row.push(`${rule.error} AS fg_e`);

  // floor- and cost-table entries: from the keys after the first GROUP BY when every key column is a
  // category column of a full cross; per row otherwise
  const entriesLate = (entries: readonly FloorEntry[]) =>
    grouping.kind === 'cross' && entries.every((e) => Object.keys(e.keys).every((k) => keyIndex(k) >= 0 && !isBinned(plan.columns[keyIndex(k)])));
  const floorLate = entriesLate(floorEntries);
  const costLate = entriesLate(costEntries);
  const rowValue = (col: string) => trimmedSql(raw(col));
  const rowEntry = (entries: readonly FloorEntry[]) => entrySql(d, entries, rowValue, (col) => `${rowValue(col)} IS NULL`);
  if (!floorLate) {
    row.push(`${rowEntry(floorEntries)} AS fg_fe`);
    groupKeys.push('fg_fe');
  }
  if (costEntries.length > 0 && !costLate) {
    row.push(`${rowEntry(costEntries)} AS fg_ce`);
    groupKeys.push('fg_ce');
  }

  // annotator audit, per row (unweighted)
  const anns = plan.annotators ?? [];
  const audit = anns.length > 0 ? auditParts(d, anns, plan.classes ?? [], trimmedSql(raw(roles.label!)), (c) => trimmedSql(raw(c))) : null;
  if (audit) row.push(...audit.level1);
  return { row, groupKeys, floorLate, costLate, audit };
}

/** The per-row CTE (and the audit's second per-row step), then the first GROUP BY over raw values. */
function firstLevelCtes(ctx: QueryContext, level: RowLevel, table: string): string[] {
  const { plan, grouping, weighted, keyIndex } = ctx;
  const { groupKeys, audit } = level;
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
  const filter = plan.where ? `\n  WHERE (${plan.where})` : '';
  const ctes = [`fg_row AS (\n  SELECT\n    ${list(level.row)}\n  FROM ${table}${filter}\n)`];
  if (audit) ctes.push(`fg_row_audit AS (\n  SELECT\n    fg_row.*,\n    ${list(audit.level2)}\n  FROM fg_row\n)`);
  ctes.push(`fg_group AS (\n  SELECT\n    ${list([...groupKeys, ...keyAliases, ...bits, ...sums])}\n  FROM ${audit ? 'fg_row_audit' : 'fg_row'}\n  GROUP BY ${groupBy}\n)`);
  return ctes;
}

/** Level 2, per first-level group (few): trimmed keys, `(missing)`, split spellings, late entries. */
function keyLevelCte(ctx: QueryContext, level: RowLevel): string {
  const { plan, grouping, d, kindOf, keyIndex, names, weighted, floorEntries, costEntries } = ctx;
  const T = d.types;
  // the first level keeps each key in its column's type; text from here on
  const text2 = (alias: string, col: string) => (kindOf(col) === 'text' ? alias : `CAST(${alias} AS ${T.text})`);
  // the split by its canonical name; rows left out carry their status as a pseudo-split, and a value
  // that is no split is kept as written (for the error that lists them)
  const splitText = text2('fg_rs', plan.splitColumn);
  const normSplit = splitSql(d, splitText, `COALESCE(TRIM(${splitText}), '')`);
  const problems = Object.entries(STATUS_SPLITS) as [RowProblem, string][];
  const statusSplit = `CASE fg_st ${problems.map(([p, v]) => `WHEN ${ROW_STATUS[p]} THEN ${d.str(v)}`).join(' ')} ELSE ${normSplit} END`;
  const norm: string[] = [`${statusSplit} AS fg_split`];
  norm.push(plan.runColumn ? `COALESCE(${trimmedSql(text2('fg_rr', plan.runColumn))}, ${d.str(MISSING)}) AS fg_run` : `CAST(NULL AS ${T.text}) AS fg_run`);
  const keyValue = (i: number) => {
    const c = plan.columns[i];
    if (isBinned(c)) {
      const labels = Array.from({ length: c.edges!.length + 1 }, (_, b) => `WHEN ${b + 1} THEN ${d.str(binLabel(c.edges!, b))}`);
      return `CASE fg_r${i} ${labels.join(' ')} ELSE ${d.str(MISSING)} END`;
    }
    return `COALESCE(${trimmedSql(text2(`fg_r${i}`, c.name))}, ${d.str(MISSING)})`;
  };
  plan.columns.forEach((_, i) => {
    const v = keyValue(i);
    norm.push(`${grouping.kind === 'sets' ? `CASE WHEN fg_g${i} = 1 THEN NULL ELSE ${v} END` : v} AS ${d.ident(names.keys[i])}`);
  });
  // entries from the trimmed keys: a missing value is `(missing)` there, so an entry for it compares equal
  const lateValue = (col: string) => keyValue(keyIndex(col));
  const lateCase = (entries: readonly FloorEntry[]) => entrySql(d, entries, lateValue, (col) => `${lateValue(col)} = ${d.str(MISSING)}`);
  norm.push(`${level.floorLate ? lateCase(floorEntries) : 'fg_fe'} AS fg_floor_entry`);
  if (costEntries.length > 0) norm.push(`${level.costLate ? lateCase(costEntries) : 'fg_ce'} AS fg_cost_entry`);
  const w1 = weighted ? 'fg_sw' : `CAST(fg_n AS ${T.double})`;
  norm.push('fg_n', `${w1} AS fg_w1`);
  if (weighted) norm.push('fg_sww', 'fg_swe');
  else norm.push('fg_se');
  if (level.audit) norm.push(...level.audit.sumNames);
  return `fg_key AS (\n  SELECT\n    ${list(norm)}\n  FROM fg_group\n)`;
}

/** The final GROUP BY over the trimmed keys, joined with the floor and cost tables. */
function finalSelect(ctx: QueryContext, level: RowLevel): string {
  const { plan, d, names, weighted, floorEntries, costEntries } = ctx;
  const T = d.types;
  const id = d.ident;
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
  if (level.audit) {
    const anns = plan.annotators ?? [];
    const outNames = [...AUDIT_COLUMNS, ...anns.flatMap((_, j) => [names.annRows[j], names.annErrors[j], ...names.classCounts[j]])];
    level.audit.sumNames.forEach((s, k) => out.push(`CAST(SUM(c.${s}) AS ${T.double}) AS ${id(outNames[k])}`));
  }
  const joins = [`LEFT JOIN ${floorTable} ON c.fg_floor_entry = f.fg_entry`];
  if (costTable) joins.push(`LEFT JOIN ${costTable} ON c.fg_cost_entry = k.fg_entry`);
  return `SELECT
  ${out.join(',\n  ')}
FROM fg_key AS c
${joins.join('\n')}
GROUP BY ${[...outKeys, 'c.fg_floor_entry', 'f.fg_floor', 'f.fg_floor_n'].join(', ')}`;
}

