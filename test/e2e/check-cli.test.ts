/**
 * `floorgap check` through the built CLI: exit codes on planted violations and on clean data, the
 * regression test against a saved report (unpaired) and against the baseline model's predictions
 * (paired by id), and JUnit XML that parses. The "worse" model is made in the test from the demo table
 * by turning 15 % of station S3's correct dev predictions wrong — a change the test itself plants.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { XMLParser } from 'fast-xml-parser';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck } from '../../src/sql/duck.js';
import { newcombeInterval } from '../../src/stats/index.js';
import type { CheckResult } from '../../src/triage/check.js';
import type { Report } from '../../src/triage/types.js';
import { runCli } from '../helpers/run-cli.js';
import { expectClose } from '../stats/expect-close.js';

let dir: string;
let base: string;
let worse: string;
let floors: string;

async function check(args: string[]): Promise<{ code: number | null; result: CheckResult; stderr: string }> {
  const r = await runCli(['check', ...args, '--format', 'json']);
  return { code: r.code, result: r.stdout ? (JSON.parse(r.stdout) as CheckResult) : (null as unknown as CheckResult), stderr: r.stderr };
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-check-'));
  expect((await runCli(['demo', '--out', dir, '--rows', '60000', '--seed', '9'])).code).toBe(0);
  base = join(dir, 'solder-joints.csv');
  floors = join(dir, 'inspector-floors.csv');
  worse = join(dir, 'worse.csv');
  const duck = await openDuck({ threads: 1 });
  await duck.run(`COPY (
      SELECT * REPLACE (CASE WHEN station = 'S3' AND split = 'dev' AND label = pred AND hash(id) % 100 < 15
                             THEN CASE WHEN label = 'good' THEN 'bridge' ELSE 'good' END ELSE pred END AS pred)
      FROM read_csv('${base}', header = true, all_varchar = true)
    ) TO '${worse}' (FORMAT csv, HEADER)`);
  duck.close();
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('limits', () => {
  it('a planted violation fails (exit 1): the avoidable bias of QFN is over 5 points', async () => {
    const { code, result } = await check([base, '--floor-table', floors, '--max-bias', '0.05']);
    expect(code).toBe(1);
    expect(result.passed).toBe(false);
    // planted by the demo generator (our own scenario): QFN avoidable bias +8 points
    expect(result.checks.filter((c) => c.status === 'fail').map((c) => c.slice)).toEqual(['package=QFN']);
  });

  it('clean data within the limits passes (exit 0)', async () => {
    const { code, result } = await check([base, '--floor-table', floors, '--max-bias', '0.2', '--max-variance', '0.2', '--max-mismatch', '0.3', '--max-dev-error', '0.5']);
    expect(code).toBe(0);
    expect(result.passed).toBe(true);
    expect(result.counts.violations).toBe(0);
  });

  it('by default a slice fails only when its interval is above the limit; --strict judges the value', async () => {
    const rep = JSON.parse((await runCli([base, '--floor-table', floors, '--format', 'json'])).stdout) as Report;
    const qfn = rep.slices.find((s) => s.label === 'package=QFN')!.gaps.avoidable_bias!;
    const between = (qfn.lo! + qfn.value) / 2; // above the interval's lower end, below the value
    const soft = await check([base, '--floor-table', floors, '--max-bias', String(between), '--by', 'package']);
    expect(soft.result.checks.find((c) => c.slice === 'package=QFN')!.status).toBe('pass');
    const strict = await check([base, '--floor-table', floors, '--max-bias', String(between), '--by', 'package', '--strict']);
    expect(strict.result.checks.find((c) => c.slice === 'package=QFN')!.status).toBe('fail');
    expect(strict.code).toBe(1);
  });

  it('thin slices are listed but never fail', async () => {
    const { result } = await check([base, '--floor-table', floors, '--by', 'station', '--max-dev-error', '0', '--min-rows', '1000000']);
    const failing = result.checks.filter((c) => c.status === 'fail').map((c) => c.slice);
    expect(failing).toEqual(['overall']); // the overall slice is never thin
    expect(result.checks.filter((c) => c.status === 'thin')).toHaveLength(6);
  });

  it('no limit and no baseline is a usage error (exit 2)', async () => {
    const r = await runCli(['check', base]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/check needs at least one limit/);
  });
});

describe('regressions against a baseline', () => {
  it('unpaired, against a saved report: only station=S3 regressed', async () => {
    const saved = join(dir, 'base.json');
    writeFileSync(saved, (await runCli([base, '--floor-table', floors, '--by', 'station', '--format', 'json'])).stdout);
    const { code, result } = await check([worse, '--floor-table', floors, '--by', 'station', '--baseline', saved]);
    expect(code).toBe(1);
    expect(result.baseline).toEqual({ path: saved, kind: 'report' });
    // the overall dev error rose with S3's (the test turned only S3's predictions wrong)
    expect(result.comparisons.filter((c) => c.status === 'regressed').map((c) => c.slice)).toEqual(['overall', 'station=S3']);
    const s3 = result.comparisons.find((c) => c.slice === 'station=S3')!;
    expect(s3.lo!).toBeGreaterThan(0); // the Newcombe interval of the rise excludes 0
    expect(s3.method).toBe('two-proportion');
    const same = await check([base, '--floor-table', floors, '--by', 'station', '--baseline', saved]);
    expect(same.code).toBe(0); // the baseline against itself: nothing changed
    expect(same.result.comparisons.every((c) => c.change === 0)).toBe(true);
  });

  it("unpaired: the intervals of the rise take the check's --confidence", async () => {
    const saved = join(dir, 'base-confidence.json');
    writeFileSync(saved, (await runCli([base, '--floor-table', floors, '--by', 'station', '--format', 'json'])).stdout);
    const worseReport = JSON.parse((await runCli([worse, '--floor-table', floors, '--by', 'station', '--format', 'json'])).stdout) as Report;
    const savedReport = JSON.parse(readFileSync(saved, 'utf8')) as Report;
    const at = async (confidence: string) => {
      const { result } = await check([worse, '--floor-table', floors, '--by', 'station', '--baseline', saved, '--confidence', confidence]);
      return result.comparisons.find((c) => c.slice === 'station=S3')!;
    };
    const now = worseReport.slices.find((s) => s.label === 'station=S3')!.error.dev!;
    const was = savedReport.slices.find((s) => s.label === 'station=S3')!.error.dev!;
    for (const confidence of [0.5, 0.99]) {
      const c = await at(String(confidence));
      // newcombeInterval (src/stats, checked against statsmodels' confint_proportions_2indep in
      // test/stats/newcombe-interval.test.ts) on the two reports' dev errors, at the check's level
      const expected = newcombeInterval(now.value * now.n, now.n, was.value * was.n, was.n, confidence)!;
      expectClose(c.lo, expected.lo, 1e-12);
      expectClose(c.hi, expected.hi, 1e-12);
    }
    // a 50 % interval lies inside the default 95 % one, a 99 % one around it
    const [half, ninetyFive] = [await at('0.5'), await at('0.95')];
    expect(half.lo!).toBeGreaterThan(ninetyFive.lo!);
    expect(half.hi!).toBeLessThan(ninetyFive.hi!);
  });

  it('a baseline report with another grouping is a clear error', async () => {
    const saved = join(dir, 'base-overview.json');
    writeFileSync(saved, (await runCli([base, '--floor-table', floors, '--format', 'json'])).stdout);
    const r = await runCli(['check', worse, '--floor-table', floors, '--by', 'station', '--baseline', saved]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/grouped by the overview \(no --by\), this check by --by station/);
  });

  it('paired by id on the dev rows (McNemar): only station=S3 regressed', async () => {
    const { code, result } = await check([worse, '--floor-table', floors, '--by', 'station', '--baseline', base]);
    expect(code).toBe(1);
    expect(result.baseline!.kind).toBe('paired');
    expect(result.comparisons.filter((c) => c.status === 'regressed').map((c) => c.slice)).toEqual(['overall', 'station=S3']);
    const s3 = result.comparisons.find((c) => c.slice === 'station=S3')!;
    expect(s3.better).toBe(0); // the test only turned right predictions wrong
    expect(s3.worse!).toBeGreaterThan(25); // enough discordant pairs for the chi-square branch
    expect(s3.method).toBe('mcnemar-chi-square');
    const other = result.comparisons.find((c) => c.slice === 'station=S1')!;
    expect(other.worse).toBe(0);
    expect(other.better).toBe(0);
    expect(other.status).toBe('unchanged');
  });

  it('writes JUnit XML that parses: one test case per slice and limit, failures counted', async () => {
    const junit = join(dir, 'check.xml');
    const r = await runCli(['check', worse, '--floor-table', floors, '--by', 'station', '--baseline', base, '--max-bias', '0.05', '--junit', junit]);
    expect(r.code).toBe(1);
    const xml = new XMLParser({ ignoreAttributes: false }).parse(readFileSync(junit, 'utf8'));
    const suite = xml.testsuites.testsuite;
    const cases = suite.testcase as Array<Record<string, unknown>>;
    expect(cases).toHaveLength(2 * 7); // (overall + 6 stations) × (one limit + the baseline comparison)
    expect(Number(suite['@_tests'])).toBe(14);
    expect(Number(suite['@_failures'])).toBe(cases.filter((c) => 'failure' in c).length);
    expect(cases.filter((c) => 'failure' in c).map((c) => c['@_name'])).toContain('station=S3 · dev error vs baseline');
  });
});
