/**
 * Cells made elsewhere give the report the rows give: the cell query that `floorgap sql` prints (ANSI
 * and DuckDB dialects) runs in DuckDB over the demo table, its result is written as a cells file,
 * and `floorgap report --cells` on it must equal `floorgap report` on the rows, field by field (every
 * field but `source`; counts exactly, weighted values to 1e-9 relative). Expected values: the rows'
 * own report, computed by floorgap's local scan (itself checked against plain loops in load.test.ts).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeDemo } from '../../src/demo/write-demo.js';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { literal } from '../../src/sql/quote.js';
import { expectSameReport } from '../helpers/report-compare.js';
import { runMain } from '../helpers/run-main.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

let dir: string;
let duck: Duck;
let table: string;
let floors: string;
let costs: string;
let weighted: string;
let runs: string;
const env = () => ({ XDG_CACHE_HOME: join(dir, 'cache') });

/** Runs the CLI and returns stdout, failing the test on a non-zero exit. */
async function cli(argv: readonly string[]): Promise<string> {
  const r = await runMain(argv, env());
  if (r.code !== 0) throw new Error(`floorgap ${argv.join(' ')} exited ${r.code}: ${r.stderr}`);
  return r.stdout;
}

/** Loads a CSV into a DuckDB table with the types DuckDB detects, as a warehouse table would have. */
async function loadTable(name: string, csv: string, where = 'TRUE'): Promise<void> {
  await duck.run(`CREATE OR REPLACE TABLE ${name} AS SELECT * FROM read_csv(${literal(csv)}, header = true) WHERE ${where}`);
}

/** Runs a printed cell query in DuckDB and writes its result to `out` (CSV or Parquet by extension). */
async function writeCells(sql: string, out: string): Promise<string> {
  const body = sql.replace(/;\s*$/, '');
  const format = out.endsWith('.parquet') ? 'parquet' : 'csv, HEADER true';
  await duck.run(`COPY (${body}) TO ${literal(out)} (FORMAT ${format})`);
  return out;
}

beforeAll(async () => {
  dir = makeTempDir();
  const demo = await writeDemo(dir, { rows: 6000, seed: 11 });
  table = demo.table;
  floors = demo.floors;
  costs = join(dir, 'costs.csv');
  writeFileSync(costs, 'station,label_cost\nS5,4\nS1,2\n');
  duck = await openDuck({ threads: 2 });
  await loadTable('preds', table);
  // the same rows with a weight column (1, 1.25, 1.5 or 1.75 by id)
  weighted = join(dir, 'weighted.csv');
  await duck.run(
    `COPY (SELECT *, CAST(1 + (CAST(substr(id, 2) AS INTEGER) % 4) * 0.25 AS VARCHAR) AS weight FROM read_csv(${literal(table)}, header = true, all_varchar = true)) TO ${literal(weighted)} (FORMAT csv, HEADER true)`,
  );
  await loadTable('weighted_preds', weighted);
  const withRuns = await writeDemo(join(dir, 'runs'), { rows: 3000, seed: 5, runs: 3 });
  runs = withRuns.table;
  await loadTable('run_preds', runs);
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

const AUDIT = ['--floor-table', '', '--annotators', 'insp_a,insp_b,insp_c', '--cost-table', ''];
const audit = () => AUDIT.map((a, i) => (i === 1 ? floors : i === 5 ? costs : a));

describe('cells from the printed query equal the rows', () => {
  for (const [dialect, ext] of [
    ['ansi', 'parquet'],
    ['duckdb', 'csv'],
  ] as const) {
    it(`${dialect} query → ${ext} cells: the overview report equals the rows' (annotators, floor table with n, cost table)`, async () => {
      const sql = await cli(['sql', table, '--table', 'preds', '--dialect', dialect, ...audit()]);
      const cells = await writeCells(sql, join(dir, `cells-${dialect}.${ext}`));
      const fromCells = await cli(['report', '--cells', cells, '--format', 'json']);
      const fromRows = await cli(['report', table, ...audit(), '--format', 'json', '--no-cache']);
      expectSameReport(fromCells, fromRows);
    });
  }

  it('a --by grouping of two columns is the same from the cells', async () => {
    const sql = await cli(['sql', table, '--table', 'preds', '--dialect', 'ansi', ...audit()]);
    const cells = await writeCells(sql, join(dir, 'cells-by.parquet'));
    const fromCells = await cli(['report', '--cells', cells, '--by', 'station,lighting', '--format', 'json']);
    const fromRows = await cli(['report', table, ...audit(), '--by', 'station,lighting', '--format', 'json', '--no-cache']);
    expectSameReport(fromCells, fromRows);
  });

  it('weighted rows: Σw, Σw², Σw·error and Σw·floor come back to 1e-9', async () => {
    const sql = await cli(['sql', weighted, '--table', 'weighted_preds', '--dialect', 'duckdb', '--floor-table', floors]);
    const cells = await writeCells(sql, join(dir, 'cells-weighted.parquet'));
    const fromCells = await cli(['report', '--cells', cells, '--format', 'json']);
    const fromRows = await cli(['report', weighted, '--floor-table', floors, '--format', 'json', '--no-cache']);
    expectSameReport(fromCells, fromRows);
  });

  it('several runs: each cell keeps its run, so learning curves and the reported run match', async () => {
    const sql = await cli(['sql', runs, '--table', 'run_preds', '--dialect', 'ansi', '--floor-table', floors]);
    expect(sql).toContain('fg_run');
    const cells = await writeCells(sql, join(dir, 'cells-runs.parquet'));
    const fromCells = await cli(['report', '--cells', cells, '--format', 'json']);
    const fromRows = await cli(['report', runs, '--floor-table', floors, '--format', 'json', '--no-cache']);
    expectSameReport(fromCells, fromRows);
    expect(JSON.parse(fromCells).runs).toEqual(['r1', 'r2', 'r3']);
  });

  it('grouping sets: cells of every column and pair serve the overview and a pair', async () => {
    const sql = await cli(['sql', table, '--table', 'preds', '--dialect', 'duckdb', '--grouping', 'sets', '--floor-table', floors]);
    expect(sql).toContain('GROUPING SETS');
    const cells = await writeCells(sql, join(dir, 'cells-sets.parquet'));
    for (const by of [[], ['--by', 'package,shift']]) {
      const fromCells = await cli(['report', '--cells', cells, ...by, '--format', 'json']);
      const fromRows = await cli(['report', table, '--floor-table', floors, '--max-cells', '1', ...by, '--format', 'json', '--no-cache']);
      expectSameReport(fromCells, fromRows);
    }
  });
});

describe('shards', () => {
  it('two shards of the table, summed, equal the whole', async () => {
    await loadTable('shard_a', table, `CAST(substr(id, 2) AS INTEGER) % 2 = 0`);
    await loadTable('shard_b', table, `CAST(substr(id, 2) AS INTEGER) % 2 = 1`);
    // one plan (made from the whole table's sample) for both shards, as a warehouse would run it per partition
    const sql = await cli(['sql', table, '--table', 'shard_a', '--dialect', 'ansi', ...audit()]);
    const a = await writeCells(sql, join(dir, 'shard-a.parquet'));
    const b = await writeCells(sql.replace(/FROM shard_a/g, 'FROM shard_b'), join(dir, 'shard-b.csv'));
    const whole = await writeCells(sql.replace(/FROM shard_a/g, 'FROM preds'), join(dir, 'whole.parquet'));
    const fromShards = await cli(['report', '--cells', a, b, '--format', 'json']);
    const fromWhole = await cli(['report', '--cells', whole, '--format', 'json']);
    expectSameReport(fromShards, fromWhole);
    const fromRows = await cli(['report', table, ...audit(), '--format', 'json', '--no-cache']);
    expectSameReport(fromShards, fromRows);
  });
});

describe('floorgap sql --out', () => {
  it('runs the query here and writes cells that give the rows\' report', async () => {
    const out = join(dir, 'local-cells.parquet');
    const said = await cli(['sql', table, '--out', out, ...audit()]);
    expect(said).toMatch(/^wrote \d+ cells to /);
    const fromCells = await cli(['report', '--cells', out, '--format', 'json']);
    const fromRows = await cli(['report', table, ...audit(), '--format', 'json', '--no-cache']);
    expectSameReport(fromCells, fromRows);
  });
});

describe('Parquet read with its own column types', () => {
  it('gives the report the same rows give as CSV (numbers typed DOUBLE, keys text)', async () => {
    const parquet = join(dir, 'typed.parquet');
    await duck.run(`COPY preds TO ${literal(parquet)} (FORMAT parquet)`);
    const types = await duck.all(`SELECT column_name, column_type FROM (DESCRIBE SELECT * FROM read_parquet(${literal(parquet)})) WHERE column_name IN ('sharpness', 'score')`);
    // the premise: the numeric columns really are DOUBLE in the file
    expect(types.map((t) => t.column_type)).toEqual(['DOUBLE', 'DOUBLE']);
    const fromParquet = await cli(['report', parquet, ...audit(), '--format', 'json', '--no-cache']);
    const fromCsv = await cli(['report', table, ...audit(), '--format', 'json', '--no-cache']);
    expectSameReport(fromParquet, fromCsv);
  });
});
