import type { Duck } from './duck.js';
import { ident, literal } from './sql.js';
import type { ColumnKind } from './cell-query.js';
import type { Split } from './types.js';
import { describeColumns, detectTable, headerNames, pinnedCsvSql, tableSql, type TableInput } from '../io/read-table.js';
import { withReadErrors } from '../io/read-errors.js';
import { error } from '../util/error.js';

/** Where the rows come from: one or more tables with a split column, or one file per split. */
export interface SourceSpec {
  readonly files: readonly string[];
  readonly perSplit: Partial<Record<Split, string>>;
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
}

/** Name of the view of the rows with their own column types (see {@link Source.native}). */
export const NATIVE_VIEW = 'fg_rows_native';

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

  const parts: string[] = [];
  const allColumns: string[] = [];
  const where = inputs.map((i) => i.path).join(', ');
  await withReadErrors(inputs, where, async () => {
    for (const input of inputs) {
      let cols: string[];
      let expr: string;
      if (input.header) {
        // a plain header read from the first bytes: no sniffing of the file
        cols = [...input.header];
        checkHeader(input.path, cols, cols);
        expr = pinnedCsvSql(input, cols);
      } else {
        const detected = await tableSql(duck, input);
        cols = await describeColumns(duck, detected, input.path);
        checkHeader(input.path, cols, (await headerNames(duck, input)) ?? cols);
        expr = input.format === 'csv' || input.format === 'tsv' ? pinnedCsvSql(input, cols) : detected;
      }
      for (const c of cols) if (!allColumns.includes(c)) allColumns.push(c);
      parts.push(
        input.split
          ? `SELECT *, ${literal(input.split)} AS ${ident(PER_SPLIT_COLUMN)} FROM ${expr}`
          : `SELECT * FROM ${expr}`,
      );
    }
    await duck.run(`CREATE OR REPLACE VIEW ${ROWS_VIEW} AS ${parts.join(' UNION ALL BY NAME ')}`);
  });
  const native = inputs.every((i) => i.format === 'parquet') ? await withReadErrors(inputs, where, () => nativeView(duck, inputs)) : null;
  return { inputs, columns: allColumns, splitColumn: perSplit.length > 0 ? PER_SPLIT_COLUMN : null, where, native };
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

/** `written`: the header as written in the file (CSV/TSV), where repeated names are still visible. */
function checkHeader(path: string, cols: readonly string[], written: readonly string[]): void {
  for (const c of cols) {
    if (c === PER_SPLIT_COLUMN) throw error(`${path}: column name "${c}" is reserved by floorgap; rename it`);
  }
  const seen = new Set<string>();
  for (const c of written) {
    if (seen.has(c)) throw error(`${path}: column "${c}" appears twice in the header; column names must be unique`);
    seen.add(c);
  }
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
