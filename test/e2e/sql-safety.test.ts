/**
 * The engine runs only floorgap's own SQL, through the built CLI: a hostile --where writes no file and
 * reads no other file; the query `floorgap sql` prints stays one statement whatever the column names,
 * --table or --slice-cols hold; and literals carry the exact values (a floor-table key with control
 * characters still matches its rows in the warehouse). Cases as a tester reproduced them.
 */
import { DuckDBInstance } from '@duckdb/node-api';
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';

let dir: string;
const path = (name: string) => join(dir, name);

/** 40 train and 40 dev rows, a slice column `col` with values A/B, one error in four rows. */
function table(col: string, values: (i: number) => string = (i) => (i % 2 ? 'A' : 'B')): string {
  const q = (s: string) => `"${s.replace(/"/g, '""')}"`;
  const lines = [['id', 'split', 'label', 'pred', q(col)].join(',')];
  for (const split of ['train', 'dev']) {
    for (let i = 0; i < 40; i++) lines.push([`${split}-${i}`, split, 'good', i % 4 === 0 ? 'void' : 'good', q(values(i))].join(','));
  }
  return lines.join('\n') + '\n';
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-sql-safety-'));
  writeFileSync(path('valid.csv'), table('station'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Runs `sql` in a fresh DuckDB that holds `victim` and the table `preds` read from `csv`. */
async function runInWarehouse(sql: string, csv: string): Promise<{ statements: number; rows: Record<string, unknown>[]; victim: number }> {
  const instance = await DuckDBInstance.create(':memory:');
  const c = await instance.connect();
  try {
    await c.run('CREATE TABLE victim AS SELECT 7 AS x');
    await c.run(`CREATE TABLE preds AS SELECT * FROM read_csv('${csv}', all_varchar = true)`);
    const statements = (await c.extractStatements(sql)).count;
    const reader = await c.runAndReadAll(sql);
    const names = reader.columnNames();
    const rows = reader.getRows().map((r) => Object.fromEntries(names.map((n, i) => [n, typeof r[i] === 'bigint' ? Number(r[i]) : r[i]])));
    const victim = Number((await c.runAndReadAll('SELECT count(*) FROM victim')).getRows()[0][0]);
    return { statements, rows, victim };
  } finally {
    c.closeSync();
    instance.closeSync();
  }
}

describe.concurrent('--where: one checked condition, run in a locked engine', () => {
  it('a second statement that would write a file: exit 2, no file written', async () => {
    const cwd = mkdtempSync(join(dir, 'cwd-'));
    const r = await runCli([path('valid.csv'), '--where', "true); COPY (SELECT 42) TO 'x.csv'; SELECT (1", '--format', 'json'], { cwd });
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^floorgap: --where "true\); COPY .*": not accepted: it holds more than one statement/);
    expect(readdirSync(cwd)).toEqual([]);
  });

  it('a subquery that reads /etc/passwd: exit 2, and no line of the file in the message', async () => {
    const r = await runCli(['report', path('valid.csv'), '--where', "(SELECT column0 FROM read_csv('/etc/passwd', header=false, sep='|') LIMIT 1)=1"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/not accepted: it holds a subquery/);
    expect(r.stderr).not.toMatch(/root:|\/bin\/(ba)?sh/);
  });

  it('a bare text value is not a condition (and the table is not blamed)', async () => {
    const r = await runCli(['report', path('valid.csv'), '--where', "'abc'"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(
      `floorgap: --where "'abc'": expected a condition that is true or false for each row (e.g. station <> 'S5'), got a value of type VARCHAR; columns are text: compare them, e.g. col = 'yes'`,
    );
  });

  it('a valid condition filters as before: 20 of the 40 dev rows are station A', async () => {
    const r = await runCli(['report', path('valid.csv'), '--where', "station = 'A'", '--format', 'json', '--no-cache']);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(r.stdout);
    expect(report.overall.rows.dev).toBe(20); // table(): odd i are A
    expect(report.source.where).toBe("station = 'A'");
  });

  it('export and check run their --where in the locked engine too', async () => {
    const out = path('rows-a.csv');
    const e = await runCli(['export', path('valid.csv'), '--where', "station = 'A'", '--top', '1', '--out', out, '--no-cache']);
    expect(e.code, e.stderr).toBe(0);
    expect(existsSync(out)).toBe(true);
    const c = await runCli(['check', path('valid.csv'), '--where', "getenv('HOME') <> ''", '--max-dev-error', '0.5']);
    expect(c.code).toBe(2);
    expect(c.stderr).toMatch(/calls getenv\(\), which a condition may not/);
  });
});

describe.concurrent('floorgap sql: the printed query is one statement', () => {
  it('a column name with line breaks and a DROP: one statement, the other table untouched, the cells right', async () => {
    const hostile = 'x\nDROP TABLE victim;\n--';
    const csv = path('hostile-name.csv');
    writeFileSync(csv, table(hostile));
    const r = await runCli(['sql', csv, '--table', 'preds', '--dialect', 'duckdb', '--floor', '0.02']);
    expect(r.code, r.stderr).toBe(0);
    // the comment line names the column with its line breaks escaped
    expect(r.stdout).toContain('-- slice columns: x\\nDROP TABLE victim;\\n--');
    const { statements, rows, victim } = await runInWarehouse(r.stdout, csv);
    expect(statements).toBe(1);
    expect(victim).toBe(1);
    // the cells: 2 splits × 2 values; 20 rows each (table(): A and B alternate)
    expect(rows).toHaveLength(4);
    expect(rows.every((row) => row.fg_rows === 20)).toBe(true);
    expect(rows.map((row) => row[hostile]).sort()).toEqual(['A', 'A', 'B', 'B']);
  });

  it('--slice-cols with a line break and a DROP, without a sample: one statement', async () => {
    const hostile = 'y\nDROP TABLE victim;\n--';
    const r = await runCli(['sql', '--table', 'preds', '--dialect', 'ansi', '--slice-cols', hostile]);
    expect(r.code, r.stderr).toBe(0);
    const instance = await DuckDBInstance.create(':memory:');
    const c = await instance.connect();
    expect((await c.extractStatements(r.stdout)).count).toBe(1);
    c.closeSync();
    instance.closeSync();
  });

  it('--table with a line break or a second statement is refused', async () => {
    for (const t of ['preds\nDROP TABLE victim;\n--', 'preds; DROP TABLE victim']) {
      const r = await runCli(['sql', '--table', t, '--slice-cols', 'station']);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toMatch(/^floorgap: --table ".*": .*expected a table name such as lake\.ml\.preds/);
    }
  });

  it('a --where for another engine that would end the statement is refused', async () => {
    const r = await runCli(['sql', '--table', 'preds', '--dialect', 'trino', '--slice-cols', 'station', '--where', "1 = 1); DROP TABLE victim; SELECT (1"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/not accepted in a printed query/);
  });

  it('a floor-table key with control characters: the printed literal matches the same rows as sql --out', async () => {
    const csv = path('control-key.csv');
    writeFileSync(csv, table('station', (i) => (i % 2 ? 'S\x1b[2J5' : 'S\t6')));
    const floors = path('control-floors.csv');
    writeFileSync(floors, 'station,floor\n"S\x1b[2J5",0.1\n"S\t6",0.05\n');
    const printed = await runCli(['sql', csv, '--table', 'preds', '--dialect', 'duckdb', '--floor-table', floors]);
    expect(printed.code, printed.stderr).toBe(0);
    // no raw control character reaches the terminal: ESC and TAB are chr() calls in the literals
    expect(printed.stdout).not.toMatch(/[\x00-\x08\x0b-\x1f\x7f]/);
    expect(printed.stdout).toContain(`('S' || chr(27) || '[2J5')`);
    expect(printed.stdout).toContain(`('S' || chr(9) || '6')`);
    const { rows } = await runInWarehouse(printed.stdout, csv);
    // each of the 4 cells holds 20 rows, all of which took their station's entry: floor sum = 20 × floor
    const floorSum = (v: string, split: string) => rows.find((r) => r.station === v && r.fg_split === split)?.fg_floor_sum;
    expect(floorSum('S\x1b[2J5', 'train')).toBeCloseTo(2, 12); // 20 × 0.1
    expect(floorSum('S\t6', 'dev')).toBeCloseTo(1, 12); // 20 × 0.05
    // the same cells as the local run writes
    const out = path('control-cells.csv');
    const local = await runCli(['sql', csv, '--floor-table', floors, '--out', out]);
    expect(local.code, local.stderr).toBe(0);
    expect(local.stdout).toMatch(/^wrote 4 cells to /);
  });

  it('the other dialects write control characters as their own escapes', async () => {
    const csv = path('control-key.csv');
    const floors = path('control-floors.csv');
    const ansi = await runCli(['sql', csv, '--table', 'preds', '--dialect', 'ansi', '--floor-table', floors]);
    // SQL:2003 Unicode escape literal (ISO/IEC 9075-2, <Unicode character string literal>)
    expect(ansi.stdout).toContain(`U&'S\\001B[2J5'`);
    const spark = await runCli(['sql', csv, '--table', 'preds', '--dialect', 'spark', '--floor-table', floors]);
    // Spark SQL string literals read \t and \uXXXX
    expect(spark.stdout).toContain(`'S\\u001B[2J5'`);
    expect(spark.stdout).toContain(`'S\\t6'`);
    for (const r of [ansi, spark]) expect(r.stdout).not.toMatch(/[\x00-\x08\x0b-\x1f\x7f]/);
  });
});
