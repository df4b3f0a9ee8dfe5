/**
 * A locked engine (openDuck with access, as every command opens it through app/analysis.ts openEngine)
 * reads and writes only the files it was given and can no longer be reconfigured. The refusals are
 * DuckDB's own (@duckdb/node-api 1.5.6-r.1, messages as it printed them here).
 */
import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { analysisReads, openEngine, withDuck } from '../../src/app/analysis.js';
import { analysisRequest, type AnalysisArgs } from '../../src/cli/options.js';

let dir: string;
let duck: Duck;
let allowed: string;
let other: string;
let out: string;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-lock-'));
  allowed = join(dir, 'preds.csv');
  other = join(dir, 'secret.csv');
  out = join(dir, '.cells.parquet.tmp-1');
  writeFileSync(allowed, 'a,b\n1,2\n3,4\n');
  writeFileSync(other, 'secret\nhunter2\n');
  mkdirSync(join(dir, 'spill'));
  duck = await openDuck({ threads: 1, memoryLimit: '100MB' }, { read: [allowed], write: [out], spill: join(dir, 'spill') });
});
afterAll(() => {
  duck.close();
  rmSync(dir, { recursive: true, force: true });
});

const refused = async (sql: string) =>
  duck.all(sql).then(
    () => '',
    (e: unknown) => (e instanceof Error ? e.message.split('\n')[0] : String(e)),
  );

describe('a locked engine', () => {
  it('reads the files it was given (a relative spelling too)', async () => {
    expect(await duck.all(`SELECT count(*) AS n FROM read_csv('${allowed}')`)).toEqual([{ n: 2 }]);
    const relative = join(dir, 'spill', '..', 'preds.csv');
    expect(await duck.all(`SELECT count(*) AS n FROM read_csv('${relative}')`)).toEqual([{ n: 2 }]);
  });

  it('refuses any other file, a folder listing and /etc/passwd', async () => {
    expect(await refused(`SELECT * FROM read_csv('${other}')`)).toMatch(/Permission Error: Cannot access file .*secret\.csv.* file system operations are disabled by configuration/);
    expect(await refused(`SELECT * FROM read_csv('/etc/passwd')`)).toMatch(/Permission Error/);
    expect(await refused(`SELECT * FROM glob('${dir}/*')`)).toMatch(/Permission Error/);
  });

  it('writes only the temporary output it was given', async () => {
    expect(await refused(`COPY (SELECT 1 AS x) TO '${out}' (FORMAT parquet)`)).toBe('');
    expect(existsSync(out)).toBe(true);
    expect(await refused(`COPY (SELECT 42) TO '${join(dir, 'x.csv')}'`)).toMatch(/Permission Error/);
    expect(existsSync(join(dir, 'x.csv'))).toBe(false);
  });

  it('has no environment, attachments, extensions or settings to change', async () => {
    expect(await refused(`SELECT getenv('HOME')`)).toMatch(/getenv does not exist/);
    expect(await refused(`ATTACH '${join(dir, 'db.duckdb')}'`)).toMatch(/Permission Error/);
    expect(await refused(`SET enable_external_access = true`)).toMatch(/the configuration has been locked/);
    expect(await refused(`SET threads = 1`)).toMatch(/the configuration has been locked/);
    expect(await refused(`SET allowed_paths = ['/etc/passwd']`)).toMatch(/the configuration has been locked/);
  });

  it('spills to its own folder: a GROUP BY of 1,000,000 groups runs under a 100 MB memory limit', async () => {
    const rows = await duck.all(`SELECT count(*) AS n FROM (SELECT i::VARCHAR || 'padding-padding' AS k, count(*) AS c FROM range(1000000) t(i) GROUP BY 1)`);
    expect(rows).toEqual([{ n: 1_000_000 }]);
  });
});

describe('the engine a command opens', () => {
  const args = { threads: 1, memoryLimit: '200MB' };
  const io = { env: {}, cwd: dir };

  it('reads the inputs, floor and cost tables and cells files named, nothing else', () => {
    const a = { files: ['a.csv'], 'floor-table': 'f.csv', 'cost-table': 'c.csv', train: 't.csv' } as AnalysisArgs;
    expect(analysisReads(analysisRequest(a, io))).toEqual(['a.csv', 't.csv', 'f.csv', 'c.csv']);
    expect(analysisReads(analysisRequest({ cells: ['x.parquet', 'y.parquet'] } as AnalysisArgs, io))).toEqual(['x.parquet', 'y.parquet']);
  });

  it('is locked, and its spill folder is gone once it is closed', async () => {
    const before = new Set(readdirSync(tmpdir()).filter((n) => n.startsWith('floorgap-spill-')));
    const message = await withDuck(args, { read: [allowed], write: [] }, async (d) => {
      const spills = readdirSync(tmpdir()).filter((n) => n.startsWith('floorgap-spill-') && !before.has(n));
      expect(spills).toHaveLength(1);
      expect(await d.all(`SELECT count(*) AS n FROM read_csv('${allowed}')`)).toEqual([{ n: 2 }]);
      return d.all(`SELECT * FROM read_csv('${other}')`).then(
        () => 'read',
        (e: Error) => e.message.split('\n')[0],
      );
    });
    expect(message).toMatch(/Permission Error/);
    expect(readdirSync(tmpdir()).filter((n) => n.startsWith('floorgap-spill-') && !before.has(n))).toEqual([]);
  });

  it('openEngine gives a handle whose close removes the spill folder', async () => {
    const d = await openEngine(args, { read: [], write: [] });
    const [{ t }] = await d.all(`SELECT current_setting('temp_directory') AS t`);
    expect(String(t)).toMatch(/floorgap-spill-/);
    expect(existsSync(String(t))).toBe(true);
    d.close();
    expect(existsSync(String(t))).toBe(false);
  });
});
