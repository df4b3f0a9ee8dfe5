/**
 * The export writer: format by extension, refusal to overwrite, the SHA-256 of inputs, and atomicity
 * (no file left behind and earlier files untouched when a step fails). Queries are DuckDB `range()`
 * tables, so every expected count is the range's length.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { checkOutput, exportFormatFor, fingerprint, manifestPathFor, sha256File, writeExport } from '../../src/output/export-file.js';
import { failure } from '../helpers/failure.js';

let duck: Duck;
let dir: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 1 });
  dir = mkdtempSync(join(tmpdir(), 'fg-export-io-'));
});

afterAll(() => {
  duck.close();
  rmSync(dir, { recursive: true, force: true });
});

function fresh(name: string): string {
  const sub = mkdtempSync(join(dir, `${name}-`));
  return join(sub, name);
}

const SQL = `SELECT i::VARCHAR AS i, 'x' || i::VARCHAR AS s FROM range(1000) t(i)`;

describe('exportFormatFor', () => {
  it('by extension, CSV otherwise; .json and compressed names are refused', () => {
    expect(exportFormatFor('a.csv')).toBe('csv');
    expect(exportFormatFor('a.CSV')).toBe('csv');
    expect(exportFormatFor('a.jsonl')).toBe('jsonl');
    expect(exportFormatFor('a.ndjson')).toBe('jsonl');
    expect(exportFormatFor('a.parquet')).toBe('parquet');
    expect(exportFormatFor('rows')).toBe('csv');
    expect(() => exportFormatFor('a.json')).toThrow(/\.jsonl/);
    expect(() => exportFormatFor('a.csv.gz')).toThrow(/does not compress/);
  });
});

describe('checkOutput', () => {
  it('a missing folder, an existing file or manifest are errors; --force allows replacing', async () => {
    const missing = await failure(checkOutput(join(dir, 'nope', 'rows.csv'), false));
    expect(missing.exitCode).toBe(2);
    expect(missing.message).toMatch(/folder .*nope does not exist/);
    const path = fresh('rows.csv');
    await checkOutput(path, false);
    writeFileSync(manifestPathFor(path), '{}');
    expect((await failure(checkOutput(path, false))).message).toMatch(/rows\.csv\.manifest\.json: file exists; pass --force/);
    writeFileSync(path, 'old');
    expect((await failure(checkOutput(path, false))).message).toMatch(/rows\.csv: file exists; pass --force/);
    await checkOutput(path, true);
    expect((await failure(checkOutput(dir, true))).message).toMatch(/is a folder/);
  });
});

describe('sha256File and fingerprint', () => {
  it('equal the digest node:crypto computes over the whole file (computed independently in this test)', async () => {
    const path = fresh('blob.bin');
    const bytes = Buffer.alloc(3 * 1024 * 1024 + 17, 7); // more than one stream chunk
    bytes.write('floorgap', 1000);
    writeFileSync(path, bytes);
    const want = createHash('sha256').update(readFileSync(path)).digest('hex');
    expect(await sha256File(path)).toBe(want);
    const f = await fingerprint(path);
    expect(f).toEqual({ path, bytes: bytes.length, modified: statSync(path).mtime.toISOString(), sha256: want });
  });
});

describe('writeExport', () => {
  const leftovers = (path: string) => readdirSync(join(path, '..')).filter((f) => f.includes('.tmp-'));

  it('writes the rows and the manifest and leaves no temporary file', async () => {
    const path = fresh('rows.csv');
    const out = await writeExport(duck, { path, format: 'csv', sql: SQL, force: false, manifest: () => ({ schema: 'test' }) });
    expect(out).toEqual({ data: path, manifest: `${path}.manifest.json` });
    const lines = readFileSync(path, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('i,s');
    expect(lines).toHaveLength(1001); // header + range(1000)
    expect(JSON.parse(readFileSync(`${path}.manifest.json`, 'utf8'))).toEqual({ schema: 'test' });
    expect(leftovers(path)).toEqual([]);
  });

  it('refuses to replace an existing file without force, and replaces it with force', async () => {
    const path = fresh('rows.csv');
    writeFileSync(path, 'old');
    const e = await failure(writeExport(duck, { path, format: 'csv', sql: SQL, force: false, manifest: () => ({}) }));
    expect(e.message).toMatch(/file exists; pass --force/);
    expect(readFileSync(path, 'utf8')).toBe('old');
    await writeExport(duck, { path, format: 'csv', sql: SQL, force: true, manifest: () => ({}) });
    expect(readFileSync(path, 'utf8').startsWith('i,s')).toBe(true);
  });

  it('a failure after the rows are partly written leaves no file and the previous one untouched', async () => {
    const path = fresh('rows.csv');
    writeFileSync(path, 'previous rows');
    writeFileSync(manifestPathFor(path), 'previous manifest');
    let seen = 0;
    const e = await writeExport(duck, {
      path,
      format: 'csv',
      sql: SQL,
      force: true,
      manifest: () => ({}),
      hooks: {
        afterData: (tmp) => {
          seen = statSync(tmp).size; // the rows are on disk, in the temporary file
          throw new Error('disk pulled out');
        },
      },
    }).then(
      () => null,
      (err: unknown) => err as Error,
    );
    expect(e?.message).toBe('disk pulled out');
    expect(seen).toBeGreaterThan(0);
    expect(readFileSync(path, 'utf8')).toBe('previous rows');
    expect(readFileSync(manifestPathFor(path), 'utf8')).toBe('previous manifest');
    expect(leftovers(path)).toEqual([]);
  });

  it('a query that fails mid-stream leaves nothing behind', async () => {
    const path = fresh('rows.parquet');
    // DuckDB's error() raises on row 150,000 of 300,000, after earlier row groups are written
    const sql = `SELECT i, CASE WHEN i = 150000 THEN error('boom at row 150000') ELSE 'ok' END AS s FROM range(300000) t(i)`;
    const e = await failure(writeExport(duck, { path, format: 'parquet', sql, force: false, manifest: () => ({}) }));
    expect(e.message).toMatch(/cannot write the rows: .*boom at row 150000.*; the file there before, if any, is unchanged$/);
    expect(existsSync(path)).toBe(false);
    expect(existsSync(manifestPathFor(path))).toBe(false);
    expect(readdirSync(join(path, '..'))).toEqual([]);
  });

  it('a failing manifest or a failure just before the renames removes both temporaries', async () => {
    const path = fresh('rows.jsonl');
    const rejected = (p: Promise<unknown>) => p.then(() => null, (err: unknown) => err as Error);
    const bad = await rejected(
      writeExport(duck, {
        path,
        format: 'jsonl',
        sql: SQL,
        force: false,
        manifest: () => {
          throw new Error('no manifest');
        },
      }),
    );
    expect(bad?.message).toBe('no manifest');
    expect(readdirSync(join(path, '..'))).toEqual([]);
    let temps: string[] = [];
    const e = await writeExport(duck, {
      path,
      format: 'jsonl',
      sql: SQL,
      force: false,
      manifest: () => ({ ok: true }),
      hooks: {
        beforeRename: (data, manifest) => {
          temps = [data, manifest];
          throw new Error('power cut');
        },
      },
    }).then(
      () => null,
      (err: unknown) => err as Error,
    );
    expect(e?.message).toBe('power cut');
    expect(temps.every((t) => !existsSync(t))).toBe(true);
    expect(temps).toHaveLength(2);
    expect(readdirSync(join(path, '..'))).toEqual([]);
  });
});

