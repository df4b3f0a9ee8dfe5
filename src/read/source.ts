import { stat } from 'node:fs/promises';
import type { Duck } from '../sql/duck.js';
import { ident, literal } from '../sql/quote.js';
import type { Split } from '../core/split.js';
import { checkColumnNames, describeColumns, detectTable, headerNames, pinnedCsvSql, tableSql, type TableInput } from './table.js';
import { withReadErrors } from './read-errors.js';
import { error } from '../core/errors.js';

/** Where the rows come from: one or more tables with a split column, or one file per split. */
export interface SourceSpec {
  readonly files: readonly string[];
  readonly perSplit: Partial<Record<Split, string>>;
  /**
   * true (`--union`): inputs with different columns are read as one table, a column an input lacks
   * missing there; otherwise every input must have the same columns
   */
  readonly union?: boolean;
}

/** The opened source: a DuckDB view `fg_rows` with every column as text. */
export interface Source {
  readonly inputs: readonly TableInput[];
  readonly columns: readonly string[];
  /** the column that carries the split when files were given per split */
  readonly splitColumn: string | null;
  /** a label for messages: the file, or "a.csv, b.csv" */
  readonly where: string;
  /**
   * when every input is Parquet: a second view of the rows with the columns' own types, which the cell
   * scan reads (converting every value to text first would cost more than the scan itself)
   */
  readonly native?: { readonly view: string; readonly kinds: ReadonlyMap<string, ColumnKind> } | null;
  /**
   * columns whose header name is empty (a CSV or TSV header field with nothing in it, as pandas
   * writes for its index): left out of the rows view; `column` is the 1-based position in that file
   */
  readonly unnamed?: readonly { readonly path: string; readonly column: number }[];
}

/**
 * How the cell query treats a column of its table: 'text' columns are used as they are, 'number'
 * columns (DOUBLE and integers, which convert to a double exactly as their text does) without a
 * detour through text, 'other' columns are cast to text.
 */
export type ColumnKind = 'text' | 'number' | 'other';

/** Name of the view of the rows with their own column types (see {@link Source.native}). */
const NATIVE_VIEW = 'fg_rows_native';

/** Types that convert to a double exactly as their text does. */
const NUMBER_TYPES = new Set(['DOUBLE', 'BIGINT', 'INTEGER', 'SMALLINT', 'TINYINT', 'UBIGINT', 'UINTEGER', 'USMALLINT', 'UTINYINT']);

/** Name of the view holding every input row (all columns VARCHAR). */
export const ROWS_VIEW = 'fg_rows';
/** Column added to rows read from per-split files. */
export const PER_SPLIT_COLUMN = '__fg_split';

/**
 * Detects each input's format and creates the view `fg_rows` over all of them (UNION ALL BY NAME).
 * Rows of per-split files get their split in the added column `__fg_split`.
 */
export async function openSource(duck: Duck, spec: SourceSpec): Promise<Source> {
  const perSplit = Object.entries(spec.perSplit).filter(([, f]) => f) as [Split, string][];
  if (spec.files.length > 0 && perSplit.length > 0) {
    throw error('give either table files with a split column or --train/--train-dev/--dev/--test files, not both');
  }
  if (spec.files.length === 0 && perSplit.length === 0) {
    throw error('no input: give a prediction table (e.g. floorgap report preds.csv) or --train F --dev F');
  }
  const inputs: TableInput[] = [];
  for (const f of spec.files) inputs.push(await detectTable(f));
  for (const [split, f] of perSplit) inputs.push(await detectTable(f, split));
  await checkDistinctFiles(inputs);

  const parts: string[] = [];
  const allColumns: string[] = [];
  const unnamed: { path: string; column: number }[] = [];
  const where = inputs.map((i) => i.path).join(', ');
  let firstColumns: { readonly path: string; readonly columns: readonly string[] } | null = null;
  await withReadErrors(inputs, where, async () => {
    for (const input of inputs) {
      let cols: string[];
      let expr: string;
      // the engine's names of columns whose header field is empty (it calls them column0, column1, …)
      let dropped: string[] = [];
      if (input.header) {
        // a plain header read from the first bytes: no sniffing of the file
        cols = [...input.header];
        checkHeader(input.path, cols, cols);
        expr = pinnedCsvSql(input, cols);
      } else {
        const detected = await tableSql(duck, input);
        cols = await describeColumns(duck, detected, input.path);
        const header = await headerNames(duck, input);
        const written = header ?? cols;
        const empty = checkHeader(input.path, cols, written, header !== null);
        if (written.length === cols.length) {
          dropped = empty.map((i) => cols[i - 1]);
          for (const column of empty) unnamed.push({ path: input.path, column });
        }
        expr = input.format === 'csv' || input.format === 'tsv' ? pinnedCsvSql(input, cols) : detected;
        cols = cols.filter((c) => !dropped.includes(c));
      }
      if (!firstColumns) firstColumns = { path: input.path, columns: cols };
      else if (!spec.union) checkSameColumns(firstColumns, { path: input.path, columns: cols });
      for (const c of cols) if (!allColumns.includes(c)) allColumns.push(c);
      const all = dropped.length > 0 ? `* EXCLUDE (${dropped.map(ident).join(', ')})` : '*';
      parts.push(
        input.split
          ? `SELECT ${all}, ${literal(input.split)} AS ${ident(PER_SPLIT_COLUMN)} FROM ${expr}`
          : `SELECT ${all} FROM ${expr}`,
      );
    }
    await duck.run(`CREATE OR REPLACE VIEW ${ROWS_VIEW} AS ${parts.join(' UNION ALL BY NAME ')}`);
  });
  const native = inputs.every((i) => i.format === 'parquet') ? await withReadErrors(inputs, where, () => nativeView(duck, inputs)) : null;
  return { inputs, columns: allColumns, splitColumn: perSplit.length > 0 ? PER_SPLIT_COLUMN : null, where, native, unnamed };
}

async function nativeView(duck: Duck, inputs: readonly TableInput[]): Promise<Source['native']> {
  const parts = inputs.map((input) =>
    input.split
      ? `SELECT *, ${literal(input.split)} AS ${ident(PER_SPLIT_COLUMN)} FROM read_parquet(${literal(input.path)})`
      : `SELECT * FROM read_parquet(${literal(input.path)})`,
  );
  try {
    await duck.run(`CREATE OR REPLACE VIEW ${NATIVE_VIEW} AS ${parts.join(' UNION ALL BY NAME ')}`);
    const rows = await duck.all(`DESCRIBE ${NATIVE_VIEW}`);
    const kinds = new Map<string, ColumnKind>(
      rows.map((r) => {
        const type = String(r.column_type);
        return [String(r.column_name), type === 'VARCHAR' ? 'text' : NUMBER_TYPES.has(type) ? 'number' : 'other'];
      }),
    );
    return { view: NATIVE_VIEW, kinds };
  } catch {
    // the text view still serves the scan
    return null;
  }
}

/**
 * Refuses an input named twice: the same path, another spelling of it (`./a.csv`, `a.csv`), a symlink
 * or a hard link to it (the same device and inode). Its rows would be counted twice.
 */
async function checkDistinctFiles(inputs: readonly TableInput[]): Promise<void> {
  const seen = new Map<string, string>();
  for (const input of inputs) {
    const info = await stat(input.path);
    const id = `${info.dev}:${info.ino}`;
    const first = seen.get(id);
    if (first !== undefined) throw error(`${input.path}: the same file as ${first}, given twice; give each file once`);
    seen.set(id, input.path);
  }
}

/** Names for a message: at most five, quoted, then how many more. */
function someNames(names: readonly string[]): string {
  const shown = names.slice(0, 5).map((c) => JSON.stringify(c)).join(', ');
  return names.length > 5 ? `${shown} and ${names.length - 5} more` : shown;
}

/** Inputs read as one table must have the same columns (in any order) unless `--union` is given. */
function checkSameColumns(
  first: { readonly path: string; readonly columns: readonly string[] },
  other: { readonly path: string; readonly columns: readonly string[] },
): void {
  const lacks = first.columns.filter((c) => !other.columns.includes(c));
  const extra = other.columns.filter((c) => !first.columns.includes(c));
  if (lacks.length === 0 && extra.length === 0) return;
  const parts = [
    ...(lacks.length > 0 ? [`${other.path} lacks ${someNames(lacks)}`] : []),
    ...(extra.length > 0 ? [`${lacks.length > 0 ? '' : `${other.path} `}has ${someNames(extra)} that ${first.path} lacks`] : []),
  ];
  throw error(
    `${other.path}: its columns differ from ${first.path}'s (${parts.join('; ')}); give files with the same columns, or --union to read them as one table with missing values`,
  );
}

/**
 * `written`: the header as written in the file (CSV/TSV), where repeated, padded and empty names are
 * still visible (the engine trims them, renames a repeated one `x_1` and an empty one `column2`).
 * @returns the 1-based positions of unnamed columns
 */
function checkHeader(path: string, cols: readonly string[], written: readonly string[], header = true): number[] {
  for (const c of cols) {
    if (c === PER_SPLIT_COLUMN) throw error(`${path}: column name "${c}" is reserved by floorgap; rename it`);
  }
  return checkColumnNames(path, written, header);
}

/**
 * Checks a `--where` condition (already made safe by safeWhere) against the source's columns before the
 * scan: every column it names exists, and it is true or false for a row (not, say, a bare text value).
 * @param given the condition as the user wrote it, for messages
 */
export async function checkWhere(duck: Duck, where: string | null, given: string | null = where): Promise<void> {
  if (!where) return;
  let type: string;
  try {
    const rows = await duck.all(`DESCRIBE SELECT (${where}) AS fg_keep FROM ${ROWS_VIEW}`);
    type = String(rows[0]?.column_type ?? '');
  } catch (e) {
    const msg = (e instanceof Error ? e.message.split('\n')[0] : String(e)).replace(/^(Binder|Parser|Conversion|Catalog) Error: /, '');
    throw error(`--where "${given}": not a valid DuckDB SQL condition on the columns (${msg}); columns are text, so compare numbers with TRY_CAST(col AS DOUBLE)`, e);
  }
  if (type !== 'BOOLEAN' && type !== '"NULL"') {
    throw error(`--where "${given}": expected a condition that is true or false for each row (e.g. station <> 'S5'), got a value of type ${type}; columns are text: compare them, e.g. col = 'yes'`);
  }
}

/** The row filter as an SQL condition. */
export function whereSql(where: string | null): string {
  return where ? `(${where})` : 'TRUE';
}
