import type { Duck } from './duck.js';
import { ident, literal } from './sql.js';
import type { Split } from './types.js';
import { describeColumns, detectTable, headerNames, readError, tableSql, type TableInput } from '../io/read-table.js';
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
}

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
  for (const input of inputs) {
    const expr = await tableSql(duck, input);
    const cols = await describeColumns(duck, expr, input.path);
    checkHeader(input.path, cols, (await headerNames(duck, input)) ?? cols);
    for (const c of cols) if (!allColumns.includes(c)) allColumns.push(c);
    parts.push(
      input.split
        ? `SELECT *, ${literal(input.split)} AS ${ident(PER_SPLIT_COLUMN)} FROM ${expr}`
        : `SELECT * FROM ${expr}`,
    );
  }
  const where = inputs.map((i) => i.path).join(', ');
  try {
    await duck.run(`CREATE OR REPLACE VIEW ${ROWS_VIEW} AS ${parts.join(' UNION ALL BY NAME ')}`);
  } catch (e) {
    throw readError(where, e);
  }
  return { inputs, columns: allColumns, splitColumn: perSplit.length > 0 ? PER_SPLIT_COLUMN : null, where };
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

/** Checks a `--where` expression against the source's columns before the scan. */
export async function checkWhere(duck: Duck, where: string | null): Promise<void> {
  if (!where) return;
  try {
    await duck.all(`SELECT count(*) AS n FROM (SELECT * FROM ${ROWS_VIEW} LIMIT 0) WHERE (${where})`);
  } catch (e) {
    const msg = e instanceof Error ? e.message.split('\n')[0] : String(e);
    throw error(`--where "${where}": not a valid DuckDB SQL condition on the columns (${msg}); columns are text, so compare numbers with TRY_CAST(col AS DOUBLE)`, e);
  }
}

/** The row filter as an SQL condition. */
export function whereSql(where: string | null): string {
  return where ? `(${where})` : 'TRUE';
}
