/**
 * `floorgap sql`: the cell query for a warehouse table, with or without a local sample, in each
 * dialect; and the errors of bad usage. Expected strings follow each engine's documented syntax
 * (quoting, string escapes, constant tables) as noted beside them.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseBinEdges } from '../../src/cli/commands/sql.js';
import { writeDemo } from '../../src/demo/write-demo.js';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { literal } from '../../src/sql/quote.js';
import { expectSameReport } from '../helpers/report-compare.js';
import { runMain } from '../helpers/run-main.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

let dir: string;
let table: string;
let duck: Duck;

beforeAll(async () => {
  dir = makeTempDir();
  table = (await writeDemo(dir, { rows: 3000, seed: 4 })).table;
  duck = await openDuck({ threads: 1 });
  await duck.run(`CREATE TABLE preds AS SELECT * FROM read_csv(${literal(table)}, header = true)`);
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

const sql = (argv: string[]) => runMain(['sql', ...argv], { XDG_CACHE_HOME: join(dir, 'cache') });

describe('without a sample file', () => {
  it('prints the query for the named slice columns; run in DuckDB, its cells give the rows\' report by those columns', async () => {
    const r = await sql(['--table', 'preds', '--dialect', 'duckdb', '--slice-cols', 'station,lighting,package']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^-- floorgap .*: the cells of preds \(duckdb SQL\)/);
    const out = join(dir, 'nofile.parquet');
    await duck.run(`COPY (${r.stdout.replace(/;\s*$/, '')}) TO ${literal(out)} (FORMAT parquet)`);
    const fromCells = await runMain(['report', '--cells', out, '--by', 'station,lighting', '--format', 'json']);
    const fromRows = await runMain(['report', table, '--by', 'station,lighting', '--format', 'json', '--no-cache']);
    expect(fromCells.code).toBe(0);
    expectSameReport(fromCells.stdout, fromRows.stdout);
  });

  it('a numeric column without edges: prints the query that gives them, in the dialect', async () => {
    const duckdb = await sql(['--table', 'preds', '--dialect', 'duckdb', '--slice-cols', 'station', '--bin-edges', 'sharpness']);
    expect(duckdb.code).toBe(0);
    expect(duckdb.stdout).toContain('quantile_cont(fg_x, [0.2, 0.4, 0.6, 0.8])');
    expect(duckdb.stderr).toMatch(/run the query above on the table/);
    // the query runs in DuckDB and gives four interior edges
    const [row] = await duck.all(duckdb.stdout.split('\n').filter((l) => !l.startsWith('--')).join('\n').replace(/;\s*$/, ''));
    expect((row.edges as { items: unknown[] }).items ?? row.edges).toHaveLength(4);
    // BigQuery: APPROX_QUANTILES(x, 5) gives min, 4 quantiles, max (BigQuery docs, approximate aggregate functions)
    expect((await sql(['--table', 'p', '--dialect', 'bigquery', '--slice-cols', 'station', '--bin-edges', 'sharpness'])).stdout).toContain('APPROX_QUANTILES(fg_x, 5)');
    // Trino: approx_percentile(x, ARRAY[...]) (Trino docs, approximate aggregate functions)
    expect((await sql(['--table', 'p', '--dialect', 'trino', '--slice-cols', 'station', '--bin-edges', 'sharpness'])).stdout).toContain('approx_percentile(fg_x, ARRAY[0.2, 0.4, 0.6, 0.8])');
  });

  it('annotators without --classes: prints the query for the classes', async () => {
    const r = await sql(['--table', 'preds', '--slice-cols', 'station', '--annotators', 'insp_a,insp_b']);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('-- classes for agreement: pass them as --classes a,b,c');
    expect(r.stdout).toContain('LIMIT 50');
  });

  it('needs the slice columns', async () => {
    const r = await sql(['--table', 'preds']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^floorgap: floorgap sql without a sample file needs the slice columns: --slice-cols a,b,c/);
  });
});

describe('dialects', () => {
  const floors = () => {
    const path = join(dir, 'quote-floors.csv');
    writeFileSync(path, "station,floor,n\nS1,0.05,100\nO'Neil,0.1,\n");
    return path;
  };

  it('Spark: backquoted names, backslash-escaped strings, a VALUES table with an alias', async () => {
    const r = await sql(['--table', 'lake.preds', '--dialect', 'spark', '--slice-cols', 'station', '--floor-table', floors()]);
    expect(r.code).toBe(0);
    // Spark SQL reference: identifiers in backquotes; string literals escape ' as \'
    expect(r.stdout).toContain('`station` AS fg_r0');
    expect(r.stdout).toContain("'O\\'Neil'");
    expect(r.stdout).toContain('VALUES (CAST(-1 AS BIGINT), CAST(0.0 AS DOUBLE), CAST(CAST(NULL AS DOUBLE) AS DOUBLE))');
    expect(r.stdout).toContain('FROM lake.preds');
  });

  it('BigQuery: the floor table as UNNEST of an array of structs, FLOAT64, SAFE_CAST', async () => {
    const r = await sql(['--table', 'proj.ds.preds', '--dialect', 'bigquery', '--slice-cols', 'station', '--floor-table', floors(), '--score', 'score']);
    expect(r.code).toBe(0);
    // BigQuery reference: no VALUES table; UNNEST([STRUCT(...)]); SAFE_CAST returns NULL on failure
    expect(r.stdout).toContain('LEFT JOIN UNNEST([STRUCT(CAST(-1 AS INT64) AS `fg_entry`');
    expect(r.stdout).toContain('SAFE_CAST(CAST(`score` AS STRING) AS FLOAT64)');
  });

  it('ANSI and Trino: double-quoted names, doubled quotes in strings', async () => {
    for (const dialect of ['ansi', 'trino']) {
      const r = await sql(['--table', 'preds', '--dialect', dialect, '--slice-cols', 'station', '--floor-table', floors()]);
      expect(r.code).toBe(0);
      // SQL standard: "identifier", 'it''s'
      expect(r.stdout).toContain('"station" AS fg_r0');
      expect(r.stdout).toContain("'O''Neil'");
    }
  });
});

describe('usage errors', () => {
  it('no --table and no --out', async () => {
    const r = await sql([table]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('floorgap: floorgap sql needs --table NAME (the warehouse table the query reads), or --out F to run it here over the files\n');
  });

  it('--out without files', async () => {
    const r = await sql(['--out', join(dir, 'x.parquet'), '--slice-cols', 'a']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^floorgap: --out runs the query here, over prediction tables; give the files/);
  });

  it('a slice column whose name starts with fg_', async () => {
    const r = await sql(['--table', 'preds', '--slice-cols', 'fg_station']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/column "fg_station" starts with fg_, which cells files keep for statistics/);
  });

  it('bad --bin-edges values', async () => {
    const r = await sql(['--table', 'preds', '--slice-cols', 'station', '--bin-edges', 'sharpness=0.5,high']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('floorgap: --bin-edges sharpness: "high" is not a number; expected COLUMN=e1,e2,…\n');
  });
});

describe('parseBinEdges', () => {
  it('rounds to 3 significant digits as local bins are, sorts, drops repeats', () => {
    // hand arithmetic: 0.58341 → 0.583, 0.7 stays, 0.7004 → 0.7 (a repeat)
    expect(parseBinEdges(['sharpness=0.7,0.58341,0.7004'])).toEqual(new Map([['sharpness', [0.583, 0.7]]]));
    expect(parseBinEdges('a=1;b')).toEqual(new Map([['a', [1]], ['b', []]]));
  });
});
