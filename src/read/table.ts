import { open, stat } from 'node:fs/promises';
import { gunzipSync } from 'node:zlib';
import type { Duck } from '../sql/duck.js';
import { literal } from '../sql/quote.js';
import type { Split } from '../core/split.js';
import { error } from '../core/errors.js';
import { badJsonLine, readError } from './read-errors.js';

export { readError };

/** File formats floorgap reads. CSV, TSV and JSON Lines may be gzip-compressed. */
export type TableFormat = 'csv' | 'tsv' | 'jsonl' | 'parquet';

/** An input file after detection: where it is, what it holds, and which split it is when given per split. */
export interface TableInput {
  readonly path: string;
  readonly format: TableFormat;
  readonly gzip: boolean;
  readonly bytes: number;
  readonly modified: string;
  /** set when the file was given as `--train F`, `--dev F`, …: every row belongs to that split */
  readonly split?: Split;
  /**
   * the header of a CSV or TSV file when its first line is plain (no quotes, no empty, padded or
   * repeated names), read from the first bytes; the engine then need not sniff the file
   */
  readonly header?: readonly string[];
  /** set when the (decompressed) text starts with a UTF-8 byte order mark */
  readonly bom?: true;
}

/** The names in a plain header line, or null when DuckDB should read the header itself. */
function plainHeader(buf: Buffer, format: TableFormat): string[] | null {
  let text = buf.toString('utf8');
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const end = text.indexOf('\n');
  if (end < 0) return null;
  const line = text.slice(0, end).replace(/\r$/, '');
  if (line.includes('"') || line.includes('\ufffd') || line.includes('\r')) return null;
  const names = line.split(format === 'csv' ? ',' : '\t');
  if (names.some((n) => n === '' || n.trim() !== n || /[\x00-\x1f]/.test(n))) return null;
  if (new Set(names).size !== names.length) return null;
  return names;
}

const EXTENSIONS: Record<string, TableFormat> = {
  csv: 'csv',
  tsv: 'tsv',
  tab: 'tsv',
  jsonl: 'jsonl',
  ndjson: 'jsonl',
  json: 'jsonl',
  parquet: 'parquet',
  pq: 'parquet',
};

function fromExtension(path: string): { format: TableFormat | null; gzip: boolean } {
  const lower = path.toLowerCase();
  const gzip = lower.endsWith('.gz') || lower.endsWith('.gzip');
  const stem = gzip ? lower.replace(/\.(gz|gzip)$/, '') : lower;
  const ext = stem.includes('.') ? stem.slice(stem.lastIndexOf('.') + 1) : '';
  return { format: EXTENSIONS[ext] ?? null, gzip };
}

function sniffText(head: string): TableFormat | null {
  const text = head.replace(/^\uFEFF/, '').trimStart();
  if (text.length === 0) return null;
  if (text.startsWith('{')) return 'jsonl';
  const firstLine = text.split(/\r?\n/, 1)[0];
  const tabs = firstLine.split('\t').length - 1;
  const commas = firstLine.split(',').length - 1;
  if (tabs > 0 && tabs >= commas) return 'tsv';
  if (commas > 0) return 'csv';
  return null;
}

/**
 * Recognises a table file by its extension and its first bytes (gzip magic, Parquet's `PAR1`, a JSON
 * object, or a header line with tabs or commas). The content wins when the extension is unknown; a
 * contradiction (e.g. `.parquet` that is not Parquet) is an error.
 * @param path the file
 * @param split the split every row belongs to, when the file was given per split
 * @example
 * await detectTable('preds.csv.gz'); // => { path: 'preds.csv.gz', format: 'csv', gzip: true, ... }
 */
export async function detectTable(path: string, split?: Split): Promise<TableInput> {
  const info = await stat(path).catch((e: NodeJS.ErrnoException) => {
    if (e.code === 'ENOENT') throw error(`${path}: no such file`);
    throw error(`${path}: cannot read (${e.code ?? e.message})`, e);
  });
  if (!info.isFile()) throw error(`${path}: not a file`);
  if (info.size === 0) throw error(`${path}: the file is empty; expected a table with a header line`);
  const handle = await open(path, 'r');
  const buf = Buffer.alloc(Math.min(65536, info.size));
  try {
    await handle.read(buf, 0, buf.length, 0);
  } finally {
    await handle.close();
  }
  if (info.size <= buf.length && buf.toString('latin1').trim() === '') {
    throw error(`${path}: the file holds only blank lines; expected a table with a header line`);
  }
  const byExt = fromExtension(path);
  const gzipMagic = buf.length >= 2 && buf[0] === 0x1f && buf[1] === 0x8b;
  const parquetMagic = buf.length >= 4 && buf.subarray(0, 4).toString('latin1') === 'PAR1';
  let format: TableFormat | null = null;
  let head = '';
  if (parquetMagic) format = 'parquet';
  else if (gzipMagic) {
    try {
      head = gunzipSync(buf, { finishFlush: 2 /* Z_SYNC_FLUSH */ }).subarray(0, 8192).toString('utf8');
    } catch {
      head = '';
    }
    format = sniffText(head);
  } else {
    head = buf.toString('utf8');
    format = sniffText(head);
  }

  if (byExt.format === 'parquet' && !parquetMagic) {
    throw error(`${path}: the name says Parquet but the file does not start with PAR1; expected a Parquet file`);
  }
  if (parquetMagic && byExt.format && byExt.format !== 'parquet') {
    throw error(`${path}: the file is Parquet but its name says ${byExt.format}; rename it to .parquet`);
  }
  // A known text extension decides between csv/tsv/jsonl; the content decides when the extension is unknown.
  const chosen = byExt.format && byExt.format !== 'parquet' && !parquetMagic ? byExt.format : format;
  if (!chosen) {
    throw error(
      `${path}: unknown format; expected CSV, TSV, JSON Lines or Parquet (optionally .gz), by extension or content`,
    );
  }
  const header = (chosen === 'csv' || chosen === 'tsv') && !gzipMagic ? plainHeader(buf, chosen) : null;
  return {
    path,
    format: chosen,
    gzip: gzipMagic,
    bytes: info.size,
    modified: info.mtime.toISOString(),
    ...(split ? { split } : {}),
    ...(header ? { header } : {}),
    ...(head.charCodeAt(0) === 0xfeff ? { bom: true as const } : {}),
  };
}

/**
 * The engine reads a JSON Lines file that starts with a byte order mark with one thread only: its
 * parallel JSON reader rejects the mark ("byte order mark (BOM) is not supported", DuckDB 1.5) where
 * the single-threaded one skips it.
 */
function needsOneThread(inputs: readonly TableInput[]): boolean {
  return inputs.some((i) => i.format === 'jsonl' && i.bom === true);
}

/**
 * {@link needsOneThread} for the files a command will read, before its engine opens (a locked engine
 * cannot change its threads later). A file that cannot be read counts as not needing it: its error
 * comes when it is read.
 * @example
 * await needsOneThreadFor(['preds.jsonl']); // => true when preds.jsonl starts with a byte order mark
 */
export async function needsOneThreadFor(paths: readonly string[]): Promise<boolean> {
  for (const path of paths) {
    const input = await detectTable(path).catch(() => null);
    if (input && needsOneThread([input])) return true;
  }
  return false;
}

/**
 * The SQL table expression that reads one input with every column as text (VARCHAR), so that values
 * such as `1` are never rewritten as `1.0` by type sniffing. Numbers are cast later, with our own errors.
 */
export async function tableSql(duck: Duck, input: TableInput): Promise<string> {
  const path = literal(input.path);
  const compression = input.gzip ? `'gzip'` : `'uncompressed'`; // read_json rejects 'none'
  switch (input.format) {
    case 'csv':
    case 'tsv':
      return csvSql(input, true);
    case 'jsonl': {
      const base = `read_json(${path}, format = 'newline_delimited', compression = ${compression}`;
      const cols = await describeColumns(duck, `${base})`, input.path);
      const nul = cols.find((c) => c.includes('\0'));
      if (nul !== undefined) throw error(`${input.path}: the key ${JSON.stringify(nul)} holds a NUL character; expected key names of text`);
      if (cols.length === 1 && cols[0] === 'json') {
        // the engine's one column "json": some line holds no object (an array document, a bare value)
        const why = await badJsonLine(input);
        if (why) throw error(`${input.path}: ${why}`);
      }
      const spec = cols.map((c) => `${literal(c)}: 'VARCHAR'`).join(', ');
      return `${base}, columns = {${spec}})`;
    }
    case 'parquet':
      return `(SELECT COLUMNS(*)::VARCHAR FROM read_parquet(${path}))`;
  }
}

/**
 * The CSV or TSV table expression with its columns named (every one VARCHAR) and detection off: DuckDB
 * then reads the file without sniffing it again, which a large file would otherwise cost on every query.
 * @param columns the columns as the detecting read found them
 */
export function pinnedCsvSql(input: TableInput, columns: readonly string[]): string {
  const delim = input.format === 'csv' ? `','` : `'\t'`;
  const compression = input.gzip ? `'gzip'` : `'uncompressed'`;
  const spec = columns.map((c) => `${literal(c)}: 'VARCHAR'`).join(', ');
  return `read_csv(${literal(input.path)}, header = true, auto_detect = false, columns = {${spec}}, delim = ${delim}, quote = '"', escape = '"', compression = ${compression})`;
}

function csvSql(input: TableInput, header: boolean): string {
  const delim = input.format === 'csv' ? `','` : `'\t'`;
  const compression = input.gzip ? `'gzip'` : `'uncompressed'`;
  return `read_csv(${literal(input.path)}, header = ${header}, all_varchar = true, delim = ${delim}, quote = '"', escape = '"', compression = ${compression})`;
}

/**
 * The header of a CSV or TSV input as written (null for other formats). DuckDB renames a repeated
 * column name (`label`, `label_1`), so a repeated name can only be seen here.
 */
export async function headerNames(duck: Duck, input: TableInput): Promise<string[] | null> {
  if (input.format !== 'csv' && input.format !== 'tsv') return null;
  try {
    const rows = await duck.all(`SELECT * FROM ${csvSql(input, false)} LIMIT 1`);
    return rows.length > 0 ? Object.values(rows[0]).map((v) => (v === null ? '' : String(v))) : null;
  } catch (e) {
    throw readError(input.path, e);
  }
}

/**
 * Checks the column names of one input: no two may be the same once surrounding spaces are trimmed
 * (the engine would rename the second one, `station_1`). Names empty after trimming are allowed
 * here; the caller decides what an unnamed column means.
 * @param names the names as written in the file (CSV/TSV header), or as the engine read them
 * @param header true when `names` is a header line (line 1 of the file)
 * @returns the positions (1-based) of the names that are empty after trimming
 * @throws FloorgapError naming the two positions and the name
 * @example
 * checkColumnNames('p.csv', ['id', '', 'station']); // => [2]
 * checkColumnNames('p.csv', ['id', 'station', 'station ']); // throws 'p.csv: columns 2 and 3 are both named "station" (after trimming spaces); …'
 */
export function checkColumnNames(path: string, names: readonly string[], header = true): number[] {
  const seen = new Map<string, number>();
  const unnamed: number[] = [];
  names.forEach((raw, i) => {
    // the engine's SQL ends a string at a NUL: such a name cannot be quoted in a query
    if (raw.includes('\0')) throw error(`${path}: ${header ? 'line 1: ' : ''}the name of column ${i + 1}, ${JSON.stringify(raw)}, holds a NUL byte; expected names of text`);
    const name = raw.trim();
    if (name === '') {
      unnamed.push(i + 1);
      return;
    }
    const first = seen.get(name);
    if (first !== undefined) {
      const trimmed = names[first] !== raw ? ' (after trimming spaces)' : '';
      throw error(`${path}: columns ${first + 1} and ${i + 1} are both named ${JSON.stringify(name)}${trimmed}; column names must be unique`);
    }
    seen.set(name, i);
  });
  return unnamed;
}

/** Column names of a table expression, in order. */
export async function describeColumns(duck: Duck, tableExpr: string, path: string): Promise<string[]> {
  try {
    const rows = await duck.all(`DESCRIBE SELECT * FROM ${tableExpr}`);
    return rows.map((r) => String(r.column_name));
  } catch (e) {
    throw readError(path, e);
  }
}
