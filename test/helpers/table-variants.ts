/**
 * Builds the binary and misnamed variants of the text table fixtures in `test/fixtures/tables/` into a
 * temporary folder at test time, so that they never drift from the text: gzip with Node's zlib, Parquet
 * with DuckDB's `COPY … (FORMAT parquet)` from the CSV read as text.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import type { Duck } from '../../src/sql/duck.js';

/** Folder of the hand-written table fixtures. */
export const TABLES = fileURLToPath(new URL('../fixtures/tables/', import.meta.url));

/** A fresh temporary folder; remove it with `removeTempDir`. */
export function makeTempDir(prefix = 'floorgap-test-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

export function removeTempDir(dir: string): void {
  rmSync(dir, { recursive: true, force: true });
}

/** Writes `text` gzip-compressed to `path`. */
export function writeGzip(path: string, text: string | Buffer): void {
  writeFileSync(path, gzipSync(typeof text === 'string' ? Buffer.from(text, 'utf8') : text));
}

/** Writes a Parquet file whose columns are all VARCHAR, holding the rows of a CSV file exactly as text. */
export async function csvToParquet(duck: Duck, csvPath: string, parquetPath: string): Promise<void> {
  const q = (s: string) => `'${s.replace(/'/g, "''")}'`;
  await duck.run(
    `COPY (SELECT * FROM read_csv(${q(csvPath)}, header = true, all_varchar = true)) TO ${q(parquetPath)} (FORMAT parquet)`,
  );
}

/** Paths of every variant of `preds.*` that `makeTableVariants` writes. */
export interface TableVariants {
  readonly dir: string;
  readonly csv: string;
  readonly tsv: string;
  readonly jsonl: string;
  readonly csvGz: string;
  readonly tsvGz: string;
  readonly jsonlGz: string;
  readonly parquet: string;
  /** CSV / TSV / JSON Lines text under a `.txt` name */
  readonly csvTxt: string;
  readonly tsvTxt: string;
  readonly jsonlTxt: string;
  /** gzip-compressed CSV under a plain `.csv` name, and under an unknown `.dat` name */
  readonly gzNamedCsv: string;
  readonly gzNamedDat: string;
  /** gzip-compressed JSON Lines under an unknown `.dat` name */
  readonly jsonlGzNamedDat: string;
  /** CSV text named `.parquet`, and Parquet named `.csv` (contradictions) */
  readonly csvNamedParquet: string;
  readonly parquetNamedCsv: string;
}

/** Writes every variant of the `preds` fixture into a new temporary folder. */
export async function makeTableVariants(duck: Duck): Promise<TableVariants> {
  const dir = makeTempDir('floorgap-tables-');
  const src = (name: string) => readFileSync(join(TABLES, name));
  const csvText = src('preds.csv');
  const tsvText = src('preds.tsv');
  const jsonlText = src('preds.jsonl');
  const at = (name: string) => join(dir, name);
  const v: TableVariants = {
    dir,
    csv: join(TABLES, 'preds.csv'),
    tsv: join(TABLES, 'preds.tsv'),
    jsonl: join(TABLES, 'preds.jsonl'),
    csvGz: at('preds.csv.gz'),
    tsvGz: at('preds.tsv.gz'),
    jsonlGz: at('preds.jsonl.gz'),
    parquet: at('preds.parquet'),
    csvTxt: at('preds-csv.txt'),
    tsvTxt: at('preds-tsv.txt'),
    jsonlTxt: at('preds-jsonl.txt'),
    gzNamedCsv: at('compressed.csv'),
    gzNamedDat: at('compressed.dat'),
    jsonlGzNamedDat: at('compressed-jsonl.dat'),
    csvNamedParquet: at('text.parquet'),
    parquetNamedCsv: at('binary.csv'),
  };
  writeGzip(v.csvGz, csvText);
  writeGzip(v.tsvGz, tsvText);
  writeGzip(v.jsonlGz, jsonlText);
  writeGzip(v.gzNamedCsv, csvText);
  writeGzip(v.gzNamedDat, csvText);
  writeGzip(v.jsonlGzNamedDat, jsonlText);
  writeFileSync(v.csvTxt, csvText);
  writeFileSync(v.tsvTxt, tsvText);
  writeFileSync(v.jsonlTxt, jsonlText);
  writeFileSync(v.csvNamedParquet, csvText);
  await csvToParquet(duck, v.csv, v.parquet);
  writeFileSync(v.parquetNamedCsv, readFileSync(v.parquet));
  return v;
}
