/**
 * Readers on tiny fixtures of every format. Expected values are hand-counted from the fixture
 * (test/fixtures/tables/preds.*, or the few lines a test writes itself); binary and misnamed variants are
 * generated from the text fixtures at test time (test/helpers/table-variants.ts).
 */
import { copyFileSync, mkdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { describeColumns, detectTable, tableSql, type TableFormat } from '../../src/read/table.js';
import { FloorgapError } from '../../src/core/errors.js';
import { makeTableVariants, makeTempDir, removeTempDir, writeGzip, type TableVariants } from '../helpers/table-variants.js';
import { failure } from '../helpers/failure.js';

// Expected content of test/fixtures/tables/preds.{csv,tsv,jsonl}: hand-copied from the fixture files.
// Every value is text exactly as written; empty fields (and JSON null) are missing (null).
const COLUMNS = ['id', 'split', 'label', 'pred', 'code', 'score', 'note'];
const ROWS = [
  { id: '1', split: 'train', label: 'cat', pred: 'cat', code: '007', score: '1', note: 'plain' },
  { id: '2', split: 'train', label: ' dog', pred: 'dog ', code: '010', score: '0.50', note: 'has, comma' },
  { id: '3', split: 'dev', label: 'cat', pred: 'dog', code: null, score: '1.0', note: null },
  { id: '4', split: 'val', label: 'dog', pred: 'dog', code: '1e3', score: '0.25', note: 'x;y' },
  { id: '5', split: 'test', label: 'cat', pred: 'cat', code: '0', score: '-0', note: 'last' },
];

let duck: Duck;
let v: TableVariants;
let scratch: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 1 });
  v = await makeTableVariants(duck);
  scratch = makeTempDir();
});

afterAll(() => {
  duck?.close();
  if (v) removeTempDir(v.dir);
  if (scratch) removeTempDir(scratch);
});

async function readAll(path: string): Promise<Record<string, unknown>[]> {
  const input = await detectTable(path);
  return duck.all(`SELECT * FROM ${await tableSql(duck, input)}`);
}


describe('detectTable: format by extension and by content', () => {
  // expected format and gzip flag: hand-derived from how each variant is written (test/helpers/table-variants.ts)
  const cases: [string, (v: TableVariants) => string, TableFormat, boolean][] = [
    ['CSV', (v) => v.csv, 'csv', false],
    ['TSV', (v) => v.tsv, 'tsv', false],
    ['JSON Lines', (v) => v.jsonl, 'jsonl', false],
    ['Parquet', (v) => v.parquet, 'parquet', false],
    ['CSV .gz', (v) => v.csvGz, 'csv', true],
    ['TSV .gz', (v) => v.tsvGz, 'tsv', true],
    ['JSON Lines .gz', (v) => v.jsonlGz, 'jsonl', true],
    ['CSV named .txt (content)', (v) => v.csvTxt, 'csv', false],
    ['TSV named .txt (content)', (v) => v.tsvTxt, 'tsv', false],
    ['JSON Lines named .txt (content)', (v) => v.jsonlTxt, 'jsonl', false],
    ['gzip CSV named .csv without .gz (magic bytes)', (v) => v.gzNamedCsv, 'csv', true],
    ['gzip CSV named .dat (magic bytes, then content)', (v) => v.gzNamedDat, 'csv', true],
    ['gzip JSON Lines named .dat (magic bytes, then content)', (v) => v.jsonlGzNamedDat, 'jsonl', true],
  ];
  for (const [name, pick, format, gzip] of cases) {
    it(`${name} → ${format}${gzip ? ' (gzip)' : ''}`, async () => {
      const path = pick(v);
      const input = await detectTable(path);
      expect(input.format).toBe(format);
      expect(input.gzip).toBe(gzip);
      expect(input.path).toBe(path);
      // bytes and modified: from the file system (statSync), compared as-is
      expect(input.bytes).toBe(statSync(path).size);
      expect(input.modified).toBe(statSync(path).mtime.toISOString());
      expect(input.split).toBeUndefined();
    });
  }

  it('keeps the split of a per-split file', async () => {
    expect((await detectTable(v.csv, 'train_dev')).split).toBe('train_dev');
  });

  it('treats .ndjson, .tab and .pq by extension', async () => {
    const nd = join(scratch, 'x.ndjson');
    writeFileSync(nd, '{"a":"1"}\n');
    const tab = join(scratch, 'x.tab');
    // a tab file whose first line also has commas: the extension decides
    writeFileSync(tab, 'a,b\tc\n1,2\t3\n');
    const pq = join(scratch, 'x.pq');
    copyFileSync(v.parquet, pq);
    expect((await detectTable(nd)).format).toBe('jsonl');
    expect((await detectTable(tab)).format).toBe('tsv');
    expect((await detectTable(pq)).format).toBe('parquet');
  });
});

describe('detectTable: errors', () => {
  it('a missing file names the path', async () => {
    const path = join(scratch, 'nope', 'preds.csv');
    const e = await failure(detectTable(path));
    expect(e.message).toBe(`${path}: no such file`);
    expect(e.exitCode).toBe(2);
  });

  it('an empty file', async () => {
    const path = join(scratch, 'empty.csv');
    writeFileSync(path, '');
    const e = await failure(detectTable(path));
    expect(e.message).toBe(`${path}: the file is empty; expected a table with a header line`);
  });

  it('a folder', async () => {
    const path = join(scratch, 'folder.csv');
    mkdirSync(path);
    const e = await failure(detectTable(path));
    expect(e.message).toBe(`${path}: not a file`);
  });

  it('a .parquet name on CSV text', async () => {
    const e = await failure(detectTable(v.csvNamedParquet));
    expect(e.message).toBe(`${v.csvNamedParquet}: the name says Parquet but the file does not start with PAR1; expected a Parquet file`);
  });

  it('a .csv name on a Parquet file', async () => {
    const e = await failure(detectTable(v.parquetNamedCsv));
    expect(e.message).toBe(`${v.parquetNamedCsv}: the file is Parquet but its name says csv; rename it to .parquet`);
  });

  it('unknown extension and content', async () => {
    const path = join(scratch, 'words.bin');
    writeFileSync(path, 'just some words\nand more\n');
    const e = await failure(detectTable(path));
    expect(e.message).toBe(
      `${path}: unknown format; expected CSV, TSV, JSON Lines or Parquet (optionally .gz), by extension or content`,
    );
  });

  it('a gzip file of unknown content under an unknown name', async () => {
    const path = join(scratch, 'words.dat');
    writeGzip(path, 'just some words\n');
    const e = await failure(detectTable(path));
    expect(e.message).toMatch(/: unknown format; expected CSV, TSV, JSON Lines or Parquet/);
  });
});

describe('tableSql: every format reads the same text values', () => {
  const formats: [string, (v: TableVariants) => string][] = [
    ['CSV', (v) => v.csv],
    ['TSV', (v) => v.tsv],
    ['JSON Lines', (v) => v.jsonl],
    ['Parquet', (v) => v.parquet],
    ['CSV .gz', (v) => v.csvGz],
    ['TSV .gz', (v) => v.tsvGz],
    ['JSON Lines .gz', (v) => v.jsonlGz],
    ['CSV named .txt', (v) => v.csvTxt],
    ['TSV named .txt', (v) => v.tsvTxt],
    ['JSON Lines named .txt', (v) => v.jsonlTxt],
    ['gzip CSV named .csv', (v) => v.gzNamedCsv],
    ['gzip CSV named .dat', (v) => v.gzNamedDat],
    ['gzip JSON Lines named .dat', (v) => v.jsonlGzNamedDat],
  ];
  for (const [name, pick] of formats) {
    it(name, async () => {
      const rows = await readAll(pick(v));
      // expected: ROWS, hand-copied from the fixture (top of this file)
      expect(rows).toEqual(ROWS);
      expect(Object.keys(rows[0])).toEqual(COLUMNS);
      expect(await describeColumns(duck, await tableSql(duck, await detectTable(pick(v))), pick(v))).toEqual(COLUMNS);
    });
  }

  it('CSV with CRLF line ends', async () => {
    const path = join(scratch, 'crlf.csv');
    writeFileSync(path, 'a,b\r\n007,1.0\r\n,x\r\n');
    // expected: hand-written from the text above (no stray \r in the last column)
    expect(await readAll(path)).toEqual([
      { a: '007', b: '1.0' },
      { a: null, b: 'x' },
    ]);
  });

  it('a .csv.gz name on plain text is read as plain text', async () => {
    const path = join(scratch, 'plain.csv.gz');
    copyFileSync(v.csv, path);
    const input = await detectTable(path);
    expect([input.format, input.gzip]).toEqual(['csv', false]);
    expect(await readAll(path)).toEqual(ROWS);
  });

  it('JSON Lines: numbers keep their integer or decimal form, other values become their text', async () => {
    const path = join(scratch, 'numbers.jsonl');
    writeFileSync(path, '{"i":1,"d":1.0,"z":"007","b":true,"o":{"k":1}}\n{"i":22,"d":0.25,"z":"010","b":false}\n');
    // expected: hand-written from the two lines above; a key absent from a line is missing (null)
    expect(await readAll(path)).toEqual([
      { i: '1', d: '1.0', z: '007', b: 'true', o: '{"k":1}' },
      { i: '22', d: '0.25', z: '010', b: 'false', o: null },
    ]);
  });

  it('Parquet with typed columns: read as text', async () => {
    const path = join(scratch, 'typed.parquet');
    await duck.run(
      `COPY (SELECT 1::INTEGER AS i, 1.0::DOUBLE AS d, 2.5::DOUBLE AS h, '007' AS z) TO '${path.replace(/'/g, "''")}' (FORMAT parquet)`,
    );
    // expected: DuckDB's text form of each typed value, hand-written (an INTEGER 1 stays "1")
    expect(await readAll(path)).toEqual([{ i: '1', d: '1.0', h: '2.5', z: '007' }]);
  });

  it('a malformed JSON Lines file: one line naming the file', async () => {
    const path = join(scratch, 'broken.jsonl');
    writeFileSync(path, '{"a":"1"}\n{"a": oops}\n');
    const e = await failure(readAll(path));
    expect(e.message.startsWith(`${path}: cannot read the table (`)).toBe(true);
    expect(e.message).not.toContain('\n');
  });
});
