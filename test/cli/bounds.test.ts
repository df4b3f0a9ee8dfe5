/**
 * Every numeric option is bounded (src/cli/bounds.ts) and checked before any command starts: the cases
 * a tester reproduced (`--threads 100000` exhausted the machine's thread limit, `--bins 10000000` grew
 * until the kernel stopped it, `--bins 1e308`, `--memory-limit abc`/`0`/`1e400GB`, the same values in a
 * project file) end in exit 2 and one line, from a flag and from floorgap.json alike.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { boundedNumber, checkBounds, MAX_THREADS, memoryLimit, NUMBER_BOUNDS } from '../../src/cli/bounds.js';
import { DEMO_MAX_RUNS } from '../../src/demo/scenario.js';
import { ROOT, runCli } from '../helpers/run-cli.js';

const SAMPLE = join(ROOT, 'data-samples', 'solder-joints.csv');

describe('boundedNumber and memoryLimit', () => {
  it('accepts values inside and at the closed ends', () => {
    expect(boundedNumber(NUMBER_BOUNDS.bins, 2, '--bins 2')).toBe(2);
    expect(boundedNumber(NUMBER_BOUNDS.bins, '1000', '--bins 1000')).toBe(1000); // a project file's text
    expect(boundedNumber(NUMBER_BOUNDS.floor, 0, '--floor 0')).toBe(0);
    expect(boundedNumber(NUMBER_BOUNDS['max-bias'], -0.5, '--max-bias -0.5')).toBe(-0.5);
  });

  it('refuses the open ends, fractions of a whole number, NaN and infinities', () => {
    expect(() => boundedNumber(NUMBER_BOUNDS.fdr, 1, '--fdr 1')).toThrow('--fdr 1: expected a fraction strictly between 0 and 1 (e.g. 0.05)');
    expect(() => boundedNumber(NUMBER_BOUNDS.bins, 2.5, '--bins 2.5')).toThrow('--bins 2.5: expected a whole number from 2 to 1,000');
    expect(() => boundedNumber(NUMBER_BOUNDS.top, NaN, '--top abc')).toThrow('--top abc: expected a whole number from 1 to 1,000,000');
    expect(() => boundedNumber(NUMBER_BOUNDS['curve-exponent'], Infinity, '--curve-exponent 1e400')).toThrow('--curve-exponent 1e400: expected a number > 0 and <= 10');
    expect(() => boundedNumber(NUMBER_BOUNDS['label-cost'], 1e308, '--label-cost 1e308')).toThrow('--label-cost 1e308: expected a cost from 1e-12 to 1e12');
  });

  it('threads: 1 to 4 × the cores', () => {
    expect(MAX_THREADS).toBe(Math.max(4, 4 * cpus().length));
    expect(() => boundedNumber(NUMBER_BOUNDS.threads, MAX_THREADS + 1, '--threads x')).toThrow(/expected a whole number from 1 to/);
  });

  it('a memory limit is a size with a unit between 64 MB and the machine', () => {
    expect(memoryLimit('2GB', 'm', 8e9)).toBe('2GB');
    expect(memoryLimit('512 MiB', 'm', 8e9)).toBe('512 MiB');
    for (const bad of ['abc', '0', '0GB', '1e400GB', '10MB', '9GB', '-1GB', '2', '']) {
      expect(() => memoryLimit(bad, `--memory-limit ${bad}`, 8e9), bad).toThrow(/expected a size such as 2GB or 512MB, from 64MB to this machine's memory \(8\.0GB\)/);
    }
  });

  it('demo --runs: at most the runs the generator makes (DEMO_MAX_RUNS, 10)', () => {
    expect(boundedNumber(NUMBER_BOUNDS.runs, DEMO_MAX_RUNS, '--runs 10')).toBe(10);
    // the bound said 12 while the generator stops at 10: --runs 11 passed the check and failed later
    expect(() => boundedNumber(NUMBER_BOUNDS.runs, 11, '--runs 11')).toThrow('--runs 11: expected a whole number from 1 to 10 (each run doubles the training rows)');
  });

  it('bins may not exceed the slices a grouping may list', () => {
    expect(() => checkBounds({ bins: 50, 'max-slices': 20 })).toThrow('--bins 50: more bins than --max-slices 20 lets one grouping list; expected at most 20');
  });

  it('converts a project file\'s numeric text to numbers in place', () => {
    const args: Record<string, unknown> = { threads: '2', fdr: '0.1' };
    checkBounds(args);
    expect(args).toEqual({ threads: 2, fdr: 0.1 });
  });
});

describe.concurrent('through the built CLI: exit 2 before any work', () => {
  const cases: [string[], RegExp][] = [
    [['--threads', '100000'], /^floorgap: --threads 100000: expected a whole number from 1 to \d+ \(4 × this machine's \d+ cores?\)$/],
    [['--threads', '1e9'], /^floorgap: --threads 1e9: expected a whole number from 1 to/],
    [['--bins', '10000000'], /^floorgap: --bins 10000000: expected a whole number from 2 to 1,000$/],
    [['--bins', '1e308'], /^floorgap: --bins 1e308: expected a whole number from 2 to 1,000$/],
    // --bins 1 once passed, gave no edges and grouped the column by its raw values past the slice cap
    [['--bins', '1'], /^floorgap: --bins 1: expected a whole number from 2 to 1,000$/],
    [['--memory-limit', 'abc'], /^floorgap: --memory-limit abc: expected a size such as 2GB or 512MB/],
    [['--memory-limit', '0'], /^floorgap: --memory-limit 0: expected a size/],
    [['--memory-limit', '1e400GB'], /^floorgap: --memory-limit 1e400GB: expected a size/],
    [['--max-cells', '0'], /^floorgap: --max-cells 0: expected a whole number from 1 to 2,000,000/],
    [['--max-slices', '1e7'], /^floorgap: --max-slices 1e7: expected a whole number from 1 to 200,000$/],
    [['--confidence', '1'], /^floorgap: --confidence 1: expected a fraction strictly between 0 and 1/],
    [['--min-rows', '0'], /^floorgap: --min-rows 0: expected a whole number from 1/],
  ];
  for (const [flags, message] of cases) {
    it(flags.join(' '), async () => {
      const t0 = Date.now();
      const r = await runCli(['report', SAMPLE, '--no-cache', ...flags]);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr.trimEnd()).toMatch(message);
      expect(Date.now() - t0).toBeLessThan(20_000); // no scan started (a generous bound for a loaded machine)
    });
  }

  it('export --top 0 and --limit-per-slice 0', async () => {
    for (const flag of ['--top', '--limit-per-slice']) {
      const r = await runCli(['export', SAMPLE, flag, '0', '--out', join(tmpdir(), 'never-written.csv')]);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(new RegExp(`^floorgap: ${flag} 0: expected a whole number from 1`));
    }
  });
});

describe('the same bounds hold for values from a project file', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'floorgap-bounds-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('floorgap.json with threads 100000 and a bad memory limit', async () => {
    writeFileSync(join(dir, 'floorgap.json'), JSON.stringify({ threads: 100000 }));
    const r = await runCli(['report', SAMPLE], { cwd: dir });
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toMatch(/^floorgap: the project file's "threads": 100000: expected a whole number from 1 to/);
    writeFileSync(join(dir, 'floorgap.json'), JSON.stringify({ 'memory-limit': 'abc' }));
    const m = await runCli(['report', SAMPLE], { cwd: dir });
    expect(m.code).toBe(2);
    expect(m.stderr.trim()).toMatch(/^floorgap: the project file's "memory-limit": "abc": expected a size/);
  });
});
