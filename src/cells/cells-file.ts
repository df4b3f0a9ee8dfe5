/**
 * Ready-made cells as input (`--cells F …`): the result of the cell query run elsewhere (a warehouse,
 * `floorgap sql --out`), in CSV, TSV, JSON Lines or Parquet. Several files are shards of one result and
 * are summed. The cells enter the flow where the scan's cells would: the result is a `Loaded`.
 * Format: docs/formats.md, "Cells".
 */
import { AUDIT_COLUMNS } from './cell-query.js';
import { ERROR_WORDS_EXPECTED, problemOfSplit, STATUS_SPLITS, WEIGHT_EXPECTED, WEIGHT_RANGE } from './row-status.js';
import type { CellPlan, Grouping } from './plan.js';
import { unknownSplitError } from './scan.js';
import type { Duck } from '../sql/duck.js';
import { type Loaded } from './load.js';
import { checkSplitWeights } from './scan-checks.js';
import { readCells } from './read-cells.js';
import { hasAudit, runsOf, splitTotals, total, usedFloorEntries } from './cell-table.js';
import { ident } from '../sql/quote.js';
import type { SliceColumn } from '../core/cell.js';
import { SPLITS, type Split } from '../core/split.js';
import { describeColumns, detectTable, readError, tableSql, type TableInput } from '../read/table.js';
import { COST_RANGE } from '../read/keyed-table.js';
import { error } from '../core/errors.js';

/** Columns every cells file has. */
const REQUIRED = ['fg_split', 'fg_rows', 'fg_weight', 'fg_weight_sq', 'fg_errors', 'fg_floor_sum'] as const;
/** Columns a cells file may have (zero, -1 or null when absent). */
const OPTIONAL = ['fg_run', 'fg_floor_entry', 'fg_floor', 'fg_floor_n', 'fg_cost_sum', 'fg_cost_weight', ...AUDIT_COLUMNS] as const;
const NUMERIC = ['fg_rows', 'fg_weight', 'fg_weight_sq', 'fg_errors', 'fg_floor_sum', 'fg_floor_entry', 'fg_floor', 'fg_floor_n', 'fg_cost_sum', 'fg_cost_weight'];

/** What the columns of a cells file say. */
export interface CellsLayout {
  /** key (slice) columns, in file order */
  readonly keys: readonly string[];
  readonly run: boolean;
  readonly present: ReadonlySet<string>;
  /** annotators (from fg_ann_rows__NAME), in file order */
  readonly annotators: readonly string[];
  /** classes counted for agreement (from fg_class__FIRST__CLASS), in file order */
  readonly classes: readonly string[];
  /** audit columns in AuditColumns order, when there are annotators */
  readonly auditColumns: readonly string[];
}

/**
 * Reads what a cells file's header says: its key columns, annotators and classes.
 * @throws FloorgapError for a missing required column, an unknown `fg_` column, or annotators whose
 * class columns differ
 */
function cellsLayout(path: string, columns: readonly string[]): CellsLayout {
  for (const r of REQUIRED) {
    if (!columns.includes(r)) {
      throw error(`${path}: no column "${r}"; a cells file has ${REQUIRED.join(', ')} and one column per slice column (see docs/formats.md); was it written by floorgap sql?`);
    }
  }
  const known = new Set<string>([...REQUIRED, ...OPTIONAL]);
  const annotators = columns.filter((c) => c.startsWith('fg_ann_rows__')).map((c) => c.slice('fg_ann_rows__'.length));
  const first = annotators[0];
  const classes = first === undefined ? [] : columns.filter((c) => c.startsWith(`fg_class__${first}__`)).map((c) => c.slice(`fg_class__${first}__`.length));
  const auditColumns: string[] = [];
  if (annotators.length > 0) {
    auditColumns.push(...AUDIT_COLUMNS);
    for (const a of annotators) {
      const mine = [`fg_ann_rows__${a}`, `fg_ann_errors__${a}`, ...classes.map((c) => `fg_class__${a}__${c}`), `fg_class_other__${a}`];
      for (const m of mine) {
        if (!columns.includes(m)) throw error(`${path}: annotator "${a}" has no column "${m}"; every annotator needs the same class columns`);
      }
      auditColumns.push(...mine);
    }
    for (const a of AUDIT_COLUMNS) if (!columns.includes(a)) throw error(`${path}: no column "${a}"; cells with annotator columns also need ${AUDIT_COLUMNS.join(', ')}`);
  }
  for (const c of auditColumns) known.add(c);
  for (const c of columns) {
    if (c.startsWith('fg_') && !known.has(c)) {
      throw error(`${path}: unknown column "${c}"; columns starting with fg_ are cell statistics (see docs/formats.md)`);
    }
  }
  const keys = columns.filter((c) => !c.startsWith('fg_'));
  return { keys, run: columns.includes('fg_run'), present: new Set(columns), annotators, classes, auditColumns };
}

/** Most rows one cell may count: 2^53, the largest whole number a double holds exactly. */
const MAX_CELL_ROWS = 2 ** 53;
/** Relative slack of comparisons between sums: their floating-point rounding. */
const SLACK = 1e-9;
/** Value of an optional statistic left empty or absent (as the sums read them). */
const DEFAULTS: Readonly<Record<string, string>> = { fg_floor_entry: '-1', fg_floor: 'NULL', fg_floor_n: 'NULL' };

/**
 * A rule every cell of a cells file obeys (docs/formats.md, "Cells"). `bad` is SQL true when a cell
 * breaks it, over the statistics as doubles (`v`) or as trimmed text (`t`); `says` is the message after
 * `column "…": `, from the values as written (`x`).
 */
interface CellRule {
  readonly column: string;
  readonly bad: (v: (c: string) => string, t: (c: string) => string) => string;
  readonly says: (x: (c: string) => string) => string;
  /** a rule over the text (not a number, an empty required value): only for files, not for summed cells */
  readonly text?: boolean;
  /** also for the rows the query set aside (fg_split "!…"), whose other sums may be anything */
  readonly setAside?: boolean;
}

/**
 * The rules of the cells of a layout, in the order they are checked on each cell: every statistic is
 * a number (the required ones not empty), and finite; then what sums of rows with valid weights, floors,
 * costs and audit labels can be.
 */
function cellRules(lay: CellsLayout): CellRule[] {
  const required = new Set<string>(REQUIRED);
  const stats = [...NUMERIC, ...lay.auditColumns].filter((c) => lay.present.has(c));
  const rules: CellRule[] = [];
  for (const c of stats) {
    rules.push({
      column: c,
      text: true,
      setAside: true,
      bad: (_, t) => (required.has(c) ? `${t(c)} IS NULL OR ${t(c)} = '' OR TRY_CAST(${t(c)} AS DOUBLE) IS NULL` : `${t(c)} <> '' AND TRY_CAST(${t(c)} AS DOUBLE) IS NULL`),
      says: (x) => `expected a number, got "${x(c)}"`,
    });
  }
  for (const c of stats) {
    rules.push({ column: c, setAside: c === 'fg_rows', bad: (v) => `NOT isfinite(${v(c)})`, says: (x) => `expected a finite number, got "${x(c)}"` });
  }
  const le = (a: string, b: string) => `${a} > ${b} * ${1 + SLACK}`;
  const whole = (e: string) => `${e} <> floor(${e})`;
  const add = (column: string, bad: CellRule['bad'], says: CellRule['says']) => {
    if (lay.present.has(column)) rules.push({ column, bad, says });
  };
  rules.push({
    column: 'fg_rows',
    setAside: true,
    bad: (v) => `${v('fg_rows')} < 0 OR ${whole(v('fg_rows'))} OR ${v('fg_rows')} > ${MAX_CELL_ROWS}`,
    says: (x) => `expected a whole number of rows from 0 to 2^53, got "${x('fg_rows')}"`,
  });
  add('fg_weight', (v) => `${v('fg_weight')} < 0`, (x) => `expected a weight sum ≥ 0, got "${x('fg_weight')}"`);
  add(
    'fg_weight',
    (v) => `(${v('fg_weight')} > 0 AND ${v('fg_weight')} < ${WEIGHT_RANGE.min}) OR ${v('fg_weight')} > ${v('fg_rows')} * ${WEIGHT_RANGE.max}`,
    (x) => `weight ${x('fg_weight')} in a cell of ${x('fg_rows')} rows; expected fg_weight = 0 or 1e-100 ≤ fg_weight ≤ fg_rows × 1e100 (each row weighs 0 or 1e-100 to 1e100)`,
  );
  add('fg_weight_sq', (v) => `${v('fg_weight_sq')} < 0`, (x) => `expected a sum of squared weights ≥ 0, got "${x('fg_weight_sq')}"`);
  add(
    'fg_weight_sq',
    (v) => le(v('fg_weight_sq'), `${v('fg_weight')} * ${v('fg_weight')}`),
    (x) => `Σw² ${x('fg_weight_sq')} above the squared weight ${x('fg_weight')}²; expected fg_weight_sq ≤ fg_weight²`,
  );
  add(
    'fg_weight_sq',
    (v) => le(`${v('fg_weight')} * ${v('fg_weight')}`, `${v('fg_rows')} * ${v('fg_weight_sq')}`),
    (x) => `weight ${x('fg_weight')} with Σw² ${x('fg_weight_sq')} over ${x('fg_rows')} rows; expected fg_weight² ≤ fg_rows × fg_weight_sq (Cauchy–Schwarz)`,
  );
  add(
    'fg_errors',
    (v) => `${v('fg_errors')} < 0 OR ${le(v('fg_errors'), v('fg_weight'))}`,
    (x) => `${x('fg_errors')} errors in a cell of weight ${x('fg_weight')}; expected 0 ≤ fg_errors ≤ fg_weight`,
  );
  add(
    'fg_floor_sum',
    (v) => `${v('fg_floor_sum')} < 0 OR ${le(v('fg_floor_sum'), v('fg_weight'))}`,
    (x) => `floor sum ${x('fg_floor_sum')} in a cell of weight ${x('fg_weight')}; expected 0 ≤ fg_floor_sum ≤ fg_weight`,
  );
  add('fg_floor', (v) => `${v('fg_floor')} < 0 OR ${v('fg_floor')} > 1`, (x) => `expected a floor in [0, 1] (or empty), got "${x('fg_floor')}"`);
  add('fg_floor_n', (v) => `${v('fg_floor_n')} <= 0`, (x) => `expected a floor n > 0 (or empty), got "${x('fg_floor_n')}"`);
  add(
    'fg_floor_entry',
    (v) => `${v('fg_floor_entry')} < -1 OR ${whole(v('fg_floor_entry'))} OR ${v('fg_floor_entry')} > 2147483647`,
    (x) => `expected a whole number ≥ -1 (the floor-table entry; -1 for the default floor), got "${x('fg_floor_entry')}"`,
  );
  add(
    'fg_cost_weight',
    (v) => `${v('fg_cost_weight')} < 0 OR ${le(v('fg_cost_weight'), v('fg_weight'))}`,
    (x) => `cost weight ${x('fg_cost_weight')} in a cell of weight ${x('fg_weight')}; expected 0 ≤ fg_cost_weight ≤ fg_weight`,
  );
  add(
    'fg_cost_sum',
    (v) => `${v('fg_cost_sum')} < ${v('fg_cost_weight')} * ${COST_RANGE.min * (1 - SLACK)} OR ${le(v('fg_cost_sum'), `${v('fg_cost_weight')} * ${COST_RANGE.max}`)}`,
    (x) =>
      `cost sum ${x('fg_cost_sum')} over a cost weight of ${x('fg_cost_weight')}; expected 1e-12 × fg_cost_weight ≤ fg_cost_sum ≤ 1e12 × fg_cost_weight (costs from 1e-12 to 1e12)`,
  );
  if (lay.annotators.length === 0) return rules;
  // audit counts (unweighted): whole numbers, each within the rows it counts among
  const counts = lay.auditColumns.filter((c) => c !== 'fg_panel_errors' && c !== 'fg_agree_sum');
  for (const c of counts) add(c, (v) => `${v(c)} < 0 OR ${whole(v(c))}`, (x) => `expected a whole number ≥ 0, got "${x(c)}"`);
  add('fg_audited', (v) => `${v('fg_audited')} > ${v('fg_rows')}`, (x) => `${x('fg_audited')} audited rows in a cell of ${x('fg_rows')} rows; expected fg_audited ≤ fg_rows`);
  add(
    'fg_panel_rows',
    (v) => `${v('fg_panel_rows')} > ${v('fg_audited')}`,
    (x) => `${x('fg_panel_rows')} panel rows of ${x('fg_audited')} audited rows; expected fg_panel_rows ≤ fg_audited`,
  );
  add(
    'fg_panel_errors',
    (v) => `${v('fg_panel_errors')} < 0 OR ${le(v('fg_panel_errors'), v('fg_panel_rows'))}`,
    (x) => `${x('fg_panel_errors')} panel errors in ${x('fg_panel_rows')} panel rows; expected 0 ≤ fg_panel_errors ≤ fg_panel_rows`,
  );
  add(
    'fg_agree_sum',
    (v) => `${v('fg_agree_sum')} < 0 OR ${le(v('fg_agree_sum'), v('fg_panel_rows'))}`,
    (x) => `agreement sum ${x('fg_agree_sum')} over ${x('fg_panel_rows')} panel rows; expected 0 ≤ fg_agree_sum ≤ fg_panel_rows`,
  );
  for (const a of lay.annotators) {
    const rowsCol = `fg_ann_rows__${a}`;
    const errorsCol = `fg_ann_errors__${a}`;
    const q = JSON.stringify;
    add(rowsCol, (v) => `${v(rowsCol)} > ${v('fg_audited')}`, (x) => `${x(rowsCol)} labelled rows of ${x('fg_audited')} audited rows; expected ${q(rowsCol)} ≤ fg_audited`);
    add(errorsCol, (v) => `${v(errorsCol)} > ${v(rowsCol)}`, (x) => `${x(errorsCol)} labels that differ from the label, of ${x(rowsCol)} given; expected ${q(errorsCol)} ≤ ${q(rowsCol)}`);
    for (const c of [...lay.classes.map((k) => `fg_class__${a}__${k}`), `fg_class_other__${a}`]) {
      add(c, (v) => `${v(c)} > ${v('fg_panel_rows')}`, (x) => `${x(c)} labels on ${x('fg_panel_rows')} panel rows; expected ${q(c)} ≤ fg_panel_rows`);
    }
  }
  return rules;
}

/** A statistic's value when a cells file leaves it empty or lacks its column. */
function defaultOf(c: string): string {
  return DEFAULTS[c] ?? '0';
}

/**
 * The first cell of `from` (in its order) that breaks a rule, and the rule: one scan.
 * @param value SQL of statistic `c` as text, or null when the relation lacks it
 * @param asText true for a file read as text (every rule applies); false for summed cells (doubles)
 */
async function firstBrokenRule(
  duck: Duck,
  from: string,
  rules: readonly CellRule[],
  value: (c: string) => string | null,
  asText: boolean,
  extra: readonly string[],
): Promise<{ rule: CellRule; x: (c: string) => string; row: Record<string, unknown> } | null> {
  const t = (c: string) => {
    const sql = value(c);
    return sql === null ? 'NULL' : `trim(CAST(${sql} AS VARCHAR))`;
  };
  const v = (c: string) => {
    const sql = value(c);
    if (sql === null) return defaultOf(c);
    return `COALESCE(${asText ? `TRY_CAST(${t(c)} AS DOUBLE)` : `CAST(${sql} AS DOUBLE)`}, ${defaultOf(c)})`;
  };
  const used = rules.filter((r) => (asText || !r.text) && value(r.column) !== null);
  if (used.length === 0) return null;
  const aside = `COALESCE(starts_with(trim(CAST(fg_split AS VARCHAR)), '!'), false)`;
  const whens = used.map((r, i) => `WHEN ${r.setAside ? '' : `NOT ${aside} AND `}(${r.bad(v, t)}) THEN ${i}`);
  // the values a message may show: every statistic the relation holds (each has a finiteness rule)
  const stats = [...new Set(used.map((r) => r.column))];
  const shown = stats.map((c, i) => `${asText ? t(c) : `CAST(${value(c)} AS DOUBLE)`} AS fg_x${i}`);
  const rows = await duck.all(
    `SELECT * FROM (SELECT fg_rn, CASE ${whens.join(' ')} END AS fg_rule, ${[...shown, ...extra].join(', ')} FROM (SELECT row_number() OVER () AS fg_rn, * FROM ${from})) WHERE fg_rule IS NOT NULL ORDER BY fg_rn LIMIT 1`,
  );
  if (rows.length === 0) return null;
  const row = rows[0];
  const x = (c: string) => {
    const i = stats.indexOf(c);
    const raw = i < 0 ? null : row[`fg_x${i}`];
    return raw === null || raw === undefined ? '' : asText ? String(raw) : String(Number(raw));
  };
  return { rule: used[Number(row.fg_rule)], x, row };
}

function sameColumns(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && [...a].sort().join('\u0000') === [...b].sort().join('\u0000');
}

let summedCounter = 0;

/**
 * The rules again on the cells summed over the shards (and over lines that repeat a cell): a sum of
 * possible cells is possible, but for rounding, overflow and the 2^53 rows a double counts exactly.
 */
async function checkSummed(duck: Duck, table: string, lay: CellsLayout, where: string): Promise<void> {
  const inSum = new Set(['fg_rows', 'fg_weight', 'fg_weight_sq', 'fg_errors', 'fg_floor_sum', 'fg_cost_sum', 'fg_cost_weight', 'fg_floor_entry', 'fg_floor_n']);
  const value = (c: string) => {
    const audit = lay.auditColumns.indexOf(c);
    if (audit >= 0) return `fg_a${audit}`;
    return inSum.has(c) ? c : null;
  };
  const keys = [...(lay.run ? ['fg_run'] : []), ...lay.keys];
  const extra = ['fg_split', ...keys].map((k, i) => `CAST(${ident(k)} AS VARCHAR) AS fg_k${i}`);
  const broken = await firstBrokenRule(duck, table, cellRules(lay), value, false, extra);
  if (!broken) return;
  const cell = ['fg_split', ...keys]
    .map((k, i) => [k, broken.row[`fg_k${i}`]] as const)
    .filter(([, v]) => v !== null && v !== undefined)
    .map(([k, v]) => `${k} ${JSON.stringify(String(v))}`)
    .join(', ');
  throw error(`${where}: the cell ${cell}, summed over the files: column "${broken.rule.column}": ${broken.rule.says(broken.x)}`);
}

/**
 * Loads ready-made cells from one or more files (shards are summed).
 * @param by the `--by` columns, which must be key columns of the cells
 * @param limit most cells (after summing shards) read into memory; more fail with advice
 */
export async function loadCellFiles(duck: Duck, paths: readonly string[], by: readonly string[] | null, limit = Infinity): Promise<Loaded> {
  if (paths.length === 0) throw error('--cells: expected one or more cells files');
  const inputs: TableInput[] = [];
  const exprs: string[] = [];
  let layout: CellsLayout | null = null;
  let columns: string[] = [];
  for (const path of paths) {
    const input = await detectTable(path);
    const expr = await tableSql(duck, input);
    const cols = await describeColumns(duck, expr, path);
    const mine = cellsLayout(path, cols);
    if (layout === null) {
      layout = mine;
      columns = cols;
    } else if (!sameColumns(cols, columns)) {
      throw error(`${path}: its columns differ from ${paths[0]}'s; shards of one cells result have the same columns`);
    }
    // every statistic a finite number, and every cell a possible sum of rows (before the shards are summed)
    const broken = await firstBrokenRule(duck, expr, cellRules(mine), (c) => (cols.includes(c) ? ident(c) : null), true, []);
    if (broken) {
      const rn = Number(broken.row.fg_rn);
      const at = input.format === 'parquet' ? `row ${rn}` : input.format === 'jsonl' ? `line ${rn}` : `line ${rn + 1}`;
      throw error(`${path}: ${at}, column "${broken.rule.column}": ${broken.rule.says(broken.x)}`);
    }
    inputs.push(input);
    exprs.push(expr);
  }
  const lay = layout!;
  const where = paths.join(', ');
  // shards: the same cell may sit in several files; sum them
  const num = (c: string, fallback: string) => (lay.present.has(c) ? `TRY_CAST(${ident(c)} AS DOUBLE)` : fallback);
  const union = exprs.map((e) => `SELECT * FROM ${e}`).join(' UNION ALL BY NAME ');
  const keyCols = lay.keys.map((k) => `NULLIF(CAST(${ident(k)} AS VARCHAR), '') AS ${ident(k)}`);
  const inner = [
    `trim(CAST(fg_split AS VARCHAR)) AS fg_split`,
    lay.run ? `NULLIF(trim(CAST(fg_run AS VARCHAR)), '') AS fg_run` : `CAST(NULL AS VARCHAR) AS fg_run`,
    ...keyCols,
    `CAST(${num('fg_floor_entry', '-1')} AS INTEGER) AS fg_floor_entry`,
    `${num('fg_floor_n', 'NULL::DOUBLE')} AS fg_floor_n`,
    ...['fg_rows', 'fg_weight', 'fg_weight_sq', 'fg_errors', 'fg_floor_sum'].map((c) => `${num(c, '0')} AS ${c}`),
    `${num('fg_cost_sum', '0')} AS fg_cost_sum`,
    `${num('fg_cost_weight', '0')} AS fg_cost_weight`,
    ...lay.auditColumns.map((c, i) => `TRY_CAST(${ident(c)} AS DOUBLE) AS fg_a${i}`),
  ];
  const groupBy = ['fg_split', 'fg_run', ...lay.keys.map(ident), 'fg_floor_entry'];
  const merged = `(SELECT ${groupBy.join(', ')}, max(fg_floor_n) AS fg_floor_n, ${[
    ...['fg_rows', 'fg_weight', 'fg_weight_sq', 'fg_errors', 'fg_floor_sum', 'fg_cost_sum', 'fg_cost_weight'].map((c) => `sum(${c}) AS ${c}`),
    ...lay.auditColumns.map((_, i) => `sum(fg_a${i}) AS fg_a${i}`),
  ].join(', ')} FROM (SELECT ${inner.join(', ')} FROM (${union})) GROUP BY ${groupBy.join(', ')}) AS fg_in`;
  let read;
  const summed = `fg_cells_in_${process.pid}_${summedCounter++}`;
  try {
    await duck.run(`CREATE TEMP TABLE ${summed} AS SELECT * FROM ${merged}`);
    await checkSummed(duck, summed, lay, where);
    read = await readCells(duck, summed, lay.keys, {
      limit,
      keys: lay.keys,
      split: 'fg_split',
      run: lay.run ? 'fg_run' : null,
      stats: ['fg_rows', 'fg_weight', 'fg_weight_sq', 'fg_errors', 'fg_floor_sum', 'fg_floor_entry', 'fg_floor_n', 'fg_cost_sum', 'fg_cost_weight'],
      audit: lay.annotators.length > 0 ? { columns: lay.auditColumns.map((_, i) => `fg_a${i}`), annotators: lay.annotators.length, classes: lay.classes.length + 1 } : null,
    });
  } catch (e) {
    if (e instanceof Error && e.name === 'FloorgapError') throw e;
    throw readError(where, e);
  } finally {
    await duck.run(`DROP TABLE IF EXISTS ${summed}`);
  }
  const { table, other } = read;
  const warnings: string[] = [];
  const unknown = new Map<string, number>();
  for (const [raw, n] of other) {
    const problem = problemOfSplit(raw);
    if (problem === 'unlabelled') warnings.push(`${n} rows with an empty label or prediction were left out`);
    else if (problem === 'badWeight') throw error(`${where}: ${n} rows have a bad weight (fg_split "${raw}"), expected ${WEIGHT_EXPECTED}; fix them in the table the cells came from`);
    else if (problem === 'badScore') throw error(`${where}: ${n} rows have a score that is not a number (fg_split "${raw}"); fix them in the table the cells came from`);
    else if (problem === 'badError') throw error(`${where}: ${n} rows have an error value that is not ${ERROR_WORDS_EXPECTED} (fg_split "${raw}"); fix them in the table the cells came from`);
    else unknown.set(raw, n);
  }
  if (unknown.size > 0) throw unknownSplitError(where, 'fg_split', unknown);
  // grouping: the full cross when no cell leaves a column out; else the sets the cells hold
  const grouping: Grouping = table.cross ? { kind: 'cross' } : { kind: 'sets', sets: table.sets.map((set) => set.map((c) => table.columns[c])) };
  const totals = splitTotals(table);
  const counts = totals.rows;
  const leftOut = other.get(STATUS_SPLITS.unlabelled) ?? 0;
  if (leftOut > 0 && SPLITS.every((s) => counts[s] === 0)) {
    throw error(`${where}: every row was left out: ${leftOut} rows have an empty label or prediction (fg_split "${STATUS_SPLITS.unlabelled}"); expected class labels in both columns`);
  }
  for (const required of ['train', 'dev'] as const) {
    if (counts[required] === 0) {
      const present = (Object.keys(counts) as Split[]).filter((s) => counts[s] > 0);
      throw error(`${where}: no cells with split ${required}${present.length ? ` (found ${present.join(', ')})` : ''}; train and dev are required`);
    }
  }
  checkSplitWeights(where, totals);
  const resolvedBy = by
    ? by.map((b) => {
        if (!lay.keys.includes(b)) {
          throw error(`--by names "${b}", which is not a key column of the cells ${where}; the key columns are ${lay.keys.map((k) => JSON.stringify(k)).join(', ')}`);
        }
        return b;
      })
    : null;
  if (resolvedBy && resolvedBy.length > 1 && grouping.kind === 'sets') {
    const want = [...resolvedBy].sort().join('\u0000');
    if (!grouping.sets.some((s) => [...s].sort().join('\u0000') === want)) {
      throw error(
        `--by ${resolvedBy.join(',')}: the cells ${where} hold grouping sets without this grouping; make cells for it with floorgap sql --by ${resolvedBy.join(',')}`,
      );
    }
  }
  const floorUsed = [...usedFloorEntries(table)].some((e) => e >= 0);
  const floorless = !floorUsed && total(table, 'floorSum') === 0;
  if (floorless && lay.annotators.length === 0) {
    // the rows' wording: the fix is the same options, given to floorgap sql
    warnings.push('no floor given (--floor or --floor-table): avoidable bias is measured against perfection (floor 0)');
  }
  if (lay.annotators.length > 0 && !hasAudit(table)) {
    warnings.push(`no row has a label in the annotator columns ${lay.annotators.join(', ')}: floors fall back to --floor`);
  }
  const sliceColumns: SliceColumn[] = lay.keys.map((name) => ({ name, kind: 'category' }));
  const roles = { label: null, pred: null, error: null, errorIsCorrect: false, split: null, id: null, score: null, weight: null, run: null };
  const plan: CellPlan = {
    roles,
    splitColumn: 'fg_split',
    columns: sliceColumns,
    floorEntries: [],
    defaultFloor: 0,
    where: null,
    runColumn: null,
    annotators: lay.annotators,
    classes: lay.classes,
    costEntries: [],
  };
  return {
    origin: 'cells',
    source: { inputs, columns, splitColumn: null, where },
    roles,
    columns: sliceColumns,
    overviewColumns: lay.keys,
    by: resolvedBy,
    table,
    grouping,
    floorTable: null,
    costTable: null,
    warnings,
    profile: { sampleRows: 0, complete: true, columns: [] },
    annotators: lay.annotators,
    classes: lay.classes,
    runs: runsOf(table),
    plan,
  };
}
