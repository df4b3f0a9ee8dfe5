/**
 * Ready-made cells as input (`--cells F …`): the result of the cell query run elsewhere (a warehouse,
 * `floorgap sql --out`), in CSV, TSV, JSON Lines or Parquet. Several files are shards of one result and
 * are summed. The cells enter the flow where the scan's cells would: the result is a `Loaded`.
 * Format: docs/formats.md, "Cells".
 */
import { AUDIT_COLUMNS, WEIGHT_EXPECTED } from './cell-query.js';
import type { CellPlan, Grouping } from './cells.js';
import { unknownSplitError } from './cells.js';
import type { Duck } from './duck.js';
import { checkSplitWeights, splitTotals, withCells, type Loaded } from './load.js';
import { readCells } from './read-cells.js';
import { runsOf } from './slices.js';
import { ident } from './sql.js';
import { SPLITS, type SliceColumn, type Split } from './types.js';
import { describeColumns, detectTable, readError, tableSql, type TableInput } from '../io/read-table.js';
import { error } from '../util/error.js';

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
export function cellsLayout(path: string, columns: readonly string[]): CellsLayout {
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

function sameColumns(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && [...a].sort().join('\u0000') === [...b].sort().join('\u0000');
}

/** The first row of an input where `predicate` holds, as "file: line N, " (row N for Parquet). */
async function locate(duck: Duck, input: TableInput, expr: string, predicate: string, column: string): Promise<{ at: string; value: string } | null> {
  const rows = await duck.all(
    `SELECT fg_rn, CAST(${ident(column)} AS VARCHAR) AS v FROM (SELECT row_number() OVER () AS fg_rn, * FROM ${expr}) WHERE ${predicate} ORDER BY fg_rn LIMIT 1`,
  );
  if (rows.length === 0) return null;
  const rn = Number(rows[0].fg_rn);
  const at = input.format === 'parquet' ? `row ${rn}` : input.format === 'jsonl' ? `line ${rn}` : `line ${rn + 1}`;
  return { at: `${input.path}: ${at}, `, value: rows[0].v === null ? '' : String(rows[0].v) };
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
    // every statistic must be a number
    for (const c of [...NUMERIC, ...mine.auditColumns]) {
      if (!cols.includes(c)) continue;
      const bad = `${ident(c)} IS NOT NULL AND trim(CAST(${ident(c)} AS VARCHAR)) <> '' AND TRY_CAST(${ident(c)} AS DOUBLE) IS NULL`;
      const found = await locate(duck, input, expr, bad, c);
      if (found) throw error(`${found.at}column "${c}": expected a number, got "${found.value}"`);
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
  try {
    read = await readCells(duck, merged, lay.keys, {
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
  }
  const { table, other } = read;
  const warnings: string[] = [];
  const unknown = new Map<string, number>();
  for (const [raw, n] of other) {
    if (raw === '!unlabelled') warnings.push(`${n} rows with an empty label or prediction were left out`);
    else if (raw === '!weight') throw error(`${where}: ${n} rows have a bad weight (fg_split "!weight"), expected ${WEIGHT_EXPECTED}; fix them in the table the cells came from`);
    else if (raw === '!score') throw error(`${where}: ${n} rows have a score that is not a number (fg_split "!score"); fix them in the table the cells came from`);
    else if (raw === '!error') throw error(`${where}: ${n} rows have an error value that is not 0 or 1 (fg_split "!error"); fix them in the table the cells came from`);
    else unknown.set(raw, n);
  }
  if (unknown.size > 0) throw unknownSplitError(where, 'fg_split', unknown);
  // grouping: the full cross when no cell leaves a column out; else the sets the cells hold
  let grouping: Grouping = { kind: 'cross' };
  const sets = new Map<string, string[]>();
  for (let i = 0; i < table.size; i++) {
    const set = table.columns.filter((_, c) => table.codes[c][i] >= 0);
    if (set.length < table.columns.length) grouping = { kind: 'sets', sets: [] };
    sets.set(set.join('\u0000'), set);
  }
  if (grouping.kind === 'sets') grouping = { kind: 'sets', sets: [...sets.values()] };
  const totals = splitTotals(table);
  const counts = totals.rows;
  const leftOut = other.get('!unlabelled') ?? 0;
  if (leftOut > 0 && SPLITS.every((s) => counts[s] === 0)) {
    throw error(`${where}: every row was left out: ${leftOut} rows have an empty label or prediction (fg_split "!unlabelled"); expected class labels in both columns`);
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
  const floorUsed = table.floorEntry.some((e) => e >= 0);
  const floorless = !floorUsed && table.floorSum.every((v) => v === 0);
  if (floorless && lay.annotators.length === 0) {
    // the rows' wording: the fix is the same options, given to floorgap sql
    warnings.push('no floor given (--floor or --floor-table): avoidable bias is measured against perfection (floor 0)');
  }
  if (lay.annotators.length > 0 && !(table.audit?.fields[0].some((v) => v > 0) ?? false)) {
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
  return withCells({
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
  });
}
