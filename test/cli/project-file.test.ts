/**
 * The project file through the CLI (in-process, each run with its own working folder): a file found
 * implicitly sets analysis options only, never an output path, --force, --junit or SQL text; a file
 * named with --config may also set --where; keys outside the allow-list are errors naming the file and
 * the key; a relative --config is found in the command's working folder. The table is the corpus's
 * valid.csv (make.mjs: 40 train and 40 dev rows, errors on rows i % 4 == 0, i.e. 10 of 40 per split).
 */
import { existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import type { Report } from '../../src/triage/types.js';
import { Captured } from '../helpers/run-main.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

const VALID = resolve('test', 'fixtures', 'bad', 'valid.csv');
let dir: string;
let n = 0;

/** A fresh working folder holding `floorgap.json` (when given) and other files. */
function folder(project?: unknown, files: Record<string, unknown> = {}): string {
  const f = join(dir, `case-${n++}`);
  mkdirSync(f);
  if (project !== undefined) writeFileSync(join(f, 'floorgap.json'), JSON.stringify(project));
  for (const [name, value] of Object.entries(files)) writeFileSync(join(f, name), JSON.stringify(value));
  return f;
}

async function run(argv: string[], cwd: string): Promise<{ code: number; stdout: string; stderr: string }> {
  const stdout = new Captured();
  const stderr = new Captured();
  const code = await main(argv, { stdout, stderr, env: { ...process.env, NO_COLOR: '1' }, cwd });
  return { code, stdout: stdout.text, stderr: stderr.text };
}

async function expectError(argv: string[], cwd: string, message: string) {
  const r = await run(argv, cwd);
  expect(r.stdout).toBe('');
  expect(r.stderr).toBe(`floorgap: ${message}\n`);
  expect(r.code).toBe(2);
}

beforeAll(() => {
  dir = makeTempDir();
});
afterAll(() => removeTempDir(dir));

describe('a project file found in the working folder', () => {
  it('cannot aim --junit anywhere: exit 2 naming the key, and no file is written', async () => {
    const target = join(dir, 'elsewhere.xml');
    const f = folder({ junit: target, 'max-bias': 0.9 });
    await expectError(
      ['check', VALID, '--no-cache'],
      f,
      `${join(f, 'floorgap.json')}: "junit" names an output or allows overwriting one, which a project file may not set; give it on the command line`,
    );
    expect(existsSync(target)).toBe(false);
  });

  it('cannot set --out or --force', async () => {
    const f = folder({ out: 'rows.csv' });
    await expectError(['export', VALID, '--no-cache'], f, `${join(f, 'floorgap.json')}: "out" names an output or allows overwriting one, which a project file may not set; give it on the command line`);
    const g = folder({ force: true });
    await expectError(['export', VALID, '--out', join(g, 'rows.csv'), '--no-cache'], g, `${join(g, 'floorgap.json')}: "force" names an output or allows overwriting one, which a project file may not set; give it on the command line`);
    expect(readdirSync(g)).toEqual(['floorgap.json']);
    const h = folder({ o: 'rows.csv' }); // the alias of --out
    await expectError(['export', VALID, '--no-cache'], h, `${join(h, 'floorgap.json')}: "o" names an output or allows overwriting one, which a project file may not set; give it on the command line`);
  });

  it('cannot carry SQL text (--where)', async () => {
    const f = folder({ where: "station <> 'S1'" });
    await expectError(
      [VALID, '--format', 'json', '--no-cache'],
      f,
      `${join(f, 'floorgap.json')}: "where" (SQL text) may not come from a project file found in the working folder; give --where on the command line, or name the file with --config`,
    );
  });

  it('a key outside the allow-list (a typo, an input file, the cache, the format) is an error naming it', async () => {
    for (const key of ['lable', 'train', 'cells', 'cache', 'format', 'maxBias']) {
      const f = folder({ [key]: 'x' });
      await expectError(
        [VALID, '--format', 'json', '--no-cache'],
        f,
        `${join(f, 'floorgap.json')}: "${key}" is not an option a project file may set; it sets analysis options only (column roles, slices, floors, statistics, check limits, threads, memory limit), e.g. "label", "floor-table", "by"`,
      );
    }
  });

  it('sets analysis options; a check limit in it does not break report, and check uses it', async () => {
    const f = folder({ 'slice-cols': 'station', floor: 0.05, 'max-dev-error': 0.1, strict: true });
    const r = await run([VALID, '--format', 'json', '--no-cache'], f);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(r.stdout) as Report;
    expect(report.slices.map((s) => s.label).sort()).toEqual(['station=S1', 'station=S2', 'station=S3', 'station=S4']);
    expect(report.overall.floor.value).toBe(0.05); // the file's floor
    // dev error 10 of 40 = 0.25 > 0.1 (make.mjs), judged on the point value (--strict from the file): exit 1
    const c = await run(['check', VALID, '--format', 'json', '--no-cache'], f);
    expect(c.code, c.stderr).toBe(1);
    expect(JSON.parse(c.stdout).limits).toEqual({ 'max-dev-error': 0.1 });
  });

  it('may set --bin-method, which the flag overrides; a method it does not know is exit 2', async () => {
    // invented: a numeric column v = i² (200 distinct values), which the two methods cut differently
    const lines = ['id,split,v,label,pred'];
    for (let i = 1; i <= 200; i++) lines.push(`r${i},${i % 2 ? 'train' : 'dev'},${i * i},a,${i % 5 ? 'a' : 'b'}`);
    const f = folder({ 'bin-method': 'natural', floor: 0.02 });
    const table = join(f, 'squares.csv');
    writeFileSync(table, lines.join('\n') + '\n');
    const bins = (stdout: string) => (JSON.parse(stdout) as Report).slices.map((s) => s.key.v).sort();
    const fromFile = await run([table, '--format', 'json', '--no-cache'], f);
    expect(fromFile.code, fromFile.stderr).toBe(0);
    const flag = await run([table, '--format', 'json', '--no-cache', '--bin-method', 'natural'], folder());
    expect(bins(fromFile.stdout)).toEqual(bins(flag.stdout));
    const quantile = await run([table, '--format', 'json', '--no-cache', '--bin-method', 'quantile'], f);
    expect(bins(quantile.stdout)).not.toEqual(bins(fromFile.stdout));
    const bad = await run([table, '--no-cache'], folder({ 'bin-method': 'jenks' }));
    expect(bad.code).toBe(2);
    expect(bad.stdout).toBe('');
    expect(bad.stderr).toMatch(/bin-method.*"jenks"/);
  });
});

describe('a project file named with --config', () => {
  it('may set --where', async () => {
    const f = folder(undefined, { 'cfg.json': { where: "station <> 'S1'", 'slice-cols': 'station' } });
    const r = await run([VALID, '--config', join(f, 'cfg.json'), '--format', 'json', '--no-cache'], f);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(r.stdout) as Report;
    expect(report.overall.error.dev?.n).toBe(30); // make.mjs: S1 is every 4th row, 10 of the 40 dev rows left out
  });

  it('still may not set an output, and says so', async () => {
    const f = folder(undefined, { 'cfg.json': { junit: 'x.xml', 'max-bias': 0.9 } });
    await expectError(
      ['check', VALID, '--config', join(f, 'cfg.json'), '--no-cache'],
      f,
      `${join(f, 'cfg.json')}: "junit" names an output or allows overwriting one, which a project file may not set, even one named with --config; give it on the command line`,
    );
  });

  it('a relative path is found in the working folder given to the command', async () => {
    const f = folder(undefined, { 'cfg.json': { 'slice-cols': 'package' } });
    const r = await run([VALID, '--config', 'cfg.json', '--format', 'json', '--no-cache'], f);
    expect(r.code, r.stderr).toBe(0);
    expect((JSON.parse(r.stdout) as Report).slices.map((s) => s.label).sort()).toEqual(['package=0402', 'package=QFN']);
    const g = folder();
    await expectError([VALID, '--config=cfg.json', '--no-cache'], g, `cfg.json: cannot read the config file (ENOENT)`);
  });
});
