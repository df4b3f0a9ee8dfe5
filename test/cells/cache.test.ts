/**
 * The cells cache: a second report on an unchanged file reads the cached cells and prints the same
 * report; a changed file (even of the same size and modification time) never reuses stale cells.
 * Expected values: the report computed with --no-cache on the same file.
 */
import { execFileSync } from 'node:child_process';
import { lstatSync, readdirSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cacheDir, decodeEntry, encodeEntry } from '../../src/cells/cache.js';
import { openDuck } from '../../src/sql/duck.js';
import { loadCells } from '../../src/cells/load.js';
import { jsonDifferences } from '../helpers/report-compare.js';
import { runMain } from '../helpers/run-main.js';
import { csvToParquet, makeTempDir, removeTempDir } from '../helpers/table-variants.js';
import { recordsOf } from '../helpers/cell-records.js';

let dir: string;
const cacheHome = () => join(dir, 'xdg');
const entries = () => {
  try {
    return readdirSync(join(cacheHome(), 'floorgap', 'cells')).filter((n) => n.endsWith('.fgcells'));
  } catch {
    return [];
  }
};
const report = (file: string, extra: string[] = []) => runMain(['report', file, '--format', 'json', '--floor', '0.02', ...extra], { XDG_CACHE_HOME: cacheHome() });

/** A small table: label = pred on every row except those listed (1-based data rows). */
function table(path: string, wrong: readonly number[]): void {
  const lines = ['id,split,station,label,pred'];
  for (let i = 1; i <= 400; i++) {
    const split = i % 2 ? 'train' : 'dev';
    lines.push(`r${String(i).padStart(4, '0')},${split},S${i % 4},a,${wrong.includes(i) ? 'b' : 'a'}`);
  }
  writeFileSync(path, lines.join('\n') + '\n');
}

beforeAll(() => {
  dir = makeTempDir();
});

afterAll(() => {
  if (dir) removeTempDir(dir);
});

describe('cacheDir', () => {
  it('is $XDG_CACHE_HOME/floorgap/cells, else ~/.cache/floorgap/cells', () => {
    // the XDG base directory convention (freedesktop.org), our subfolder
    expect(cacheDir({ XDG_CACHE_HOME: '/tmp/c' })).toBe('/tmp/c/floorgap/cells');
    expect(cacheDir({ HOME: '/home/u' })).toBe('/home/u/.cache/floorgap/cells');
    // a relative XDG_CACHE_HOME is ignored, as the convention asks
    expect(cacheDir({ XDG_CACHE_HOME: 'rel', HOME: '/home/u' })).toBe('/home/u/.cache/floorgap/cells');
  });
});

describe('the cache across runs', () => {
  it('the second run on an unchanged file reads the cells from the cache and prints the same report', async () => {
    const file = join(dir, 'same.csv');
    table(file, [1, 3, 5, 7]);
    const first = await report(file);
    expect(first.code).toBe(0);
    expect(entries().length).toBe(1);
    const stamp = statSync(join(cacheHome(), 'floorgap', 'cells', entries()[0])).mtimeMs;
    const second = await report(file);
    expect(second.stdout).toBe(first.stdout);
    // still one entry: the second run wrote nothing new
    expect(entries().length).toBe(1);
    expect(statSync(join(cacheHome(), 'floorgap', 'cells', entries()[0])).mtimeMs).toBeGreaterThanOrEqual(stamp);
    const scanned = await report(file, ['--no-cache']);
    expect(second.stdout).toBe(scanned.stdout);
  });

  it('a changed file of the same size and modification time is scanned again, never served stale cells', async () => {
    const file = join(dir, 'changed.csv');
    table(file, [1, 3]);
    // whole seconds, so that putting the time back restores it exactly
    utimesSync(file, 1_700_000_000, 1_700_000_000);
    const before = await report(file);
    const { size, mtimeMs } = statSync(file);
    // rows 2 and 4 (dev rows of S2 and S0) wrong instead of 1 and 3 (train rows of S1 and S3): the
    // same number of bytes, then the old times put back
    table(file, [2, 4]);
    utimesSync(file, 1_700_000_000, 1_700_000_000);
    expect(statSync(file).size).toBe(size);
    expect(statSync(file).mtimeMs).toBe(mtimeMs);
    const after = await report(file);
    const truth = await report(file, ['--no-cache']);
    expect(after.stdout).toBe(truth.stdout);
    // the errors moved to other stations and split: the reports differ
    expect(after.stdout).not.toBe(before.stdout);
  });

  it('other options that shape the cells get their own entry', async () => {
    const file = join(dir, 'options.csv');
    table(file, [2, 4, 6]);
    const n = entries().length;
    await report(file);
    await report(file, ['--by', 'station']);
    await report(file, ['--where', "station <> 'S0'"]);
    expect(entries().length).toBe(n + 3);
  });

  it('the bin method gets its own entry: natural bins are never served from quantile cells', async () => {
    // invented: a numeric column v = i² (400 distinct values, skewed), binned by either method
    const file = join(dir, 'bins.csv');
    const lines = ['id,split,v,label,pred'];
    for (let i = 1; i <= 400; i++) lines.push(`r${i},${i % 2 ? 'train' : 'dev'},${i * i},a,${i % 7 ? 'a' : 'b'}`);
    writeFileSync(file, lines.join('\n') + '\n');
    const bins = (stdout: string) => (JSON.parse(stdout) as { slices: { key: Record<string, string> }[] }).slices.map((s) => s.key.v).sort();
    const quantile = await report(file);
    const natural = await report(file, ['--bin-method', 'natural']);
    const truth = await report(file, ['--bin-method', 'natural', '--no-cache']);
    expect(natural.code, natural.stderr).toBe(0);
    expect(bins(natural.stdout)).toEqual(bins(truth.stdout));
    // the two methods cut this column differently, so a cache hit across them would show
    expect(bins(natural.stdout)).not.toEqual(bins(quantile.stdout));
  });

  it('cells cached with --union never let a run without it skip the column check', async () => {
    const a = join(dir, 'union-a.csv');
    table(a, [1]);
    const b = join(dir, 'union-b.csv');
    writeFileSync(b, 'id,split,station,lighting,label,pred\nx1,dev,S1,dome,a,a\n');
    const union = await runMain(['report', a, b, '--union', '--format', 'json', '--floor', '0.02'], { XDG_CACHE_HOME: cacheHome() });
    expect(union.code, union.stderr).toBe(0);
    const plain = await runMain(['report', a, b, '--format', 'json', '--floor', '0.02'], { XDG_CACHE_HOME: cacheHome() });
    expect(plain.code).toBe(2);
    expect(plain.stderr).toMatch(/union-b\.csv: its columns differ from .*union-a\.csv's/);
  });

  it('--no-cache neither reads nor writes the cache', async () => {
    const file = join(dir, 'nocache.csv');
    table(file, [9]);
    const n = entries().length;
    const r = await report(file, ['--no-cache']);
    expect(r.code).toBe(0);
    expect(entries().length).toBe(n);
  });

  it('a damaged entry is a miss (and removed), not an error', async () => {
    const file = join(dir, 'damaged.csv');
    table(file, [11]);
    const before = new Set(entries());
    const good = await report(file);
    const made = entries().find((e) => !before.has(e))!;
    const path = join(cacheHome(), 'floorgap', 'cells', made);
    writeFileSync(path, readFileSync(path).subarray(0, 40));
    const again = await report(file);
    expect(again.code).toBe(0);
    expect(again.stdout).toBe(good.stdout);
  });
});

describe('an entry path that is not a regular file', () => {
  it('a named pipe there is neither read (it would wait for a writer) nor replaced; the report is made', async () => {
    const file = join(dir, 'piped.csv');
    table(file, [5, 9]);
    const before = new Set(entries());
    const good = await report(file);
    const made = entries().find((e) => !before.has(e))!;
    const path = join(cacheHome(), 'floorgap', 'cells', made);
    rmSync(path);
    execFileSync('mkfifo', [path]);
    const again = await report(file);
    expect(again.code).toBe(0);
    expect(again.stdout).toBe(good.stdout);
    expect(lstatSync(path).isFIFO()).toBe(true);
    rmSync(path);
  }, 20_000);
});

describe('damaged entries are detected by their checksum and rebuilt', () => {
  it('one flipped bit in the stored cell sums: not trusted, scanned again, the entry rewritten', async () => {
    const file = join(dir, 'flipped.csv');
    table(file, [2, 4, 6, 8, 10, 12]);
    const before = new Set(entries());
    const good = await report(file);
    const made = entries().find((e) => !before.has(e))!;
    const path = join(cacheHome(), 'floorgap', 'cells', made);
    const bytes = readFileSync(path);
    // the last 8 bytes belong to the last typed array: a bit flip there would change a sum silently
    const damaged = Buffer.from(bytes);
    damaged[damaged.length - 3] ^= 0x10;
    writeFileSync(path, damaged);
    const { mtimeMs } = statSync(path);
    const again = await report(file);
    expect(again.code).toBe(0);
    expect(jsonDifferences(JSON.parse(again.stdout), JSON.parse(good.stdout))).toEqual([]); // the same report, to 1e-9
    // rebuilt: a whole entry again (its checksum holds), not the damaged bytes; its sums may differ from
    // the first entry's in the last bits (DuckDB adds floats in parallel), so bytes are not compared
    const rebuilt = readFileSync(path);
    expect(rebuilt.equals(damaged)).toBe(false);
    expect(rebuilt.length).toBe(bytes.length);
    expect(decodeEntry(rebuilt, made.replace(/\.fgcells$/, ''))).not.toBeNull();
    expect(statSync(path).mtimeMs).toBeGreaterThanOrEqual(mtimeMs);
  });

  it('decodeEntry throws on any changed byte after the checksum, and on a cut entry', async () => {
    const file = join(dir, 'decode-sum.csv');
    table(file, [1]);
    const duck = await openDuck({ threads: 1 });
    try {
      const loaded = await loadCells(duck, { source: { files: [file], perSplit: {} }, roles: {}, where: null, by: null, sliceCols: null, bins: 5, maxCells: 1000, floor: 0.02, floorTable: null });
      const buf = encodeEntry('k', loaded);
      expect(decodeEntry(buf, 'k')).not.toBeNull();
      for (const at of [41, 60, Math.floor(buf.length / 2), buf.length - 1]) {
        const bad = Buffer.from(buf);
        bad[at] ^= 0x01;
        expect(() => decodeEntry(bad, 'k'), `byte ${at}`).toThrow(/checksum/);
      }
      expect(() => decodeEntry(buf.subarray(0, buf.length - 8), 'k')).toThrow(/checksum/);
    } finally {
      duck.close();
    }
  });
});

describe('entry encoding', () => {
  it('keeps the column kinds of a Parquet source as a Map (JSON alone turned it into {})', async () => {
    const csv = join(dir, 'kinds.csv');
    table(csv, [2, 4]);
    const parquet = join(dir, 'kinds.parquet');
    const duck = await openDuck({ threads: 1 });
    try {
      await csvToParquet(duck, csv, parquet);
      const loaded = await loadCells(duck, { source: { files: [parquet], perSplit: {} }, roles: {}, where: null, by: null, sliceCols: null, bins: 5, maxCells: 1000, floor: 0.02, floorTable: null });
      const kinds = loaded.source.native?.kinds;
      expect(kinds).toBeInstanceOf(Map);
      const back = decodeEntry(encodeEntry('k', loaded), 'k')!;
      expect(back.source.native?.kinds).toBeInstanceOf(Map);
      // the table's columns as Parquet types them, text for the CSV's text (csvToParquet keeps VARCHAR)
      expect([...back.source.native!.kinds.entries()]).toEqual([...kinds!.entries()]);
      expect(back.source.native!.kinds.get('station')).toBe('text');
    } finally {
      duck.close();
    }
  });


  it('decodes to the same cells and metadata, and refuses another key', async () => {
    const file = join(dir, 'encode.csv');
    table(file, [1, 2, 3]);
    const duck = await openDuck({ threads: 1 });
    try {
      const loaded = await loadCells(duck, { source: { files: [file], perSplit: {} }, roles: {}, where: null, by: null, sliceCols: null, bins: 5, maxCells: 1000, floor: 0.02, floorTable: null });
      const buf = encodeEntry('k1', loaded);
      const back = decodeEntry(buf, 'k1')!;
      expect(recordsOf(back.table)).toEqual(recordsOf(loaded.table));
      expect(back.table.dicts).toEqual(loaded.table.dicts);
      expect(back.table.sets).toEqual(loaded.table.sets);
      expect(back.warnings).toEqual(loaded.warnings);
      expect(back.columns).toEqual(loaded.columns);
      expect(decodeEntry(buf, 'k2')).toBeNull();
    } finally {
      duck.close();
    }
  });
});
