/**
 * `--bin-method natural` through the built CLI: `report` bins the demo sample's `sharpness` at its
 * natural breaks, and `floorgap sql` prints the same edges. The expected edges are computed here, apart
 * from floorgap's code: the distinct sharpness values of the sample, the textbook O(k·n²) dynamic
 * programme of optimal 1-D k-means (Wang & Song 2011, The R Journal 3(2):29, their recurrence
 * D[m][j] = min_i D[m−1][i−1] + d(x_i…x_j)), and the edge rule of docs/method.md.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { Report } from '../../src/triage/types.js';
import { ROOT, runCli } from '../helpers/run-cli.js';

const TABLE = 'data-samples/solder-joints.csv';

/** The distinct sharpness values of the demo sample (20,000 rows: the whole table is the sample), sorted. */
function sharpnessValues(): number[] {
  const lines = readFileSync(join(ROOT, TABLE), 'utf8').trim().split('\n');
  const col = lines[0].split(',').indexOf('sharpness');
  const values = lines.slice(1).map((l) => l.split(',')[col].trim()).filter((v) => v !== '').map(Number);
  return [...new Set(values)].sort((a, b) => a - b);
}

/** Start index of each run after the first, of the optimal k runs of sorted `x` (least within-run sum of squares). */
function optimalRunStarts(x: readonly number[], k: number): number[] {
  const n = x.length;
  const s1 = [0];
  const s2 = [0];
  for (const v of x) {
    s1.push(s1[s1.length - 1] + v);
    s2.push(s2[s2.length - 1] + v * v);
  }
  const d = (i: number, j: number) => s2[j + 1] - s2[i] - (s1[j + 1] - s1[i]) ** 2 / (j - i + 1);
  let cost = x.map((_, j) => d(0, j));
  const back: number[][] = [];
  for (let m = 1; m < k; m++) {
    const next = new Array<number>(n).fill(Infinity);
    const from = new Array<number>(n).fill(0);
    for (let j = m; j < n; j++) {
      for (let i = m; i <= j; i++) {
        const c = cost[i - 1] + d(i, j);
        if (c < next[j]) {
          next[j] = c;
          from[j] = i;
        }
      }
    }
    cost = next;
    back.push(from);
  }
  const starts: number[] = [];
  let j = n - 1;
  for (let m = k - 2; m >= 0; m--) {
    starts.unshift(back[m][j]);
    j = back[m][j] - 1;
  }
  return starts;
}

/**
 * The natural edges of the demo's sharpness, by the rule of docs/method.md: between runs ending at a and
 * starting at b, the number of 3 significant digits in (a, b] nearest (a + b)/2. Sharpness has 3
 * decimals in [0.2, 1), so those numbers are the thousandths, counted here in whole thousandths.
 */
function expectedEdges(bins: number): number[] {
  const x = sharpnessValues();
  expect(x.length).toBeLessThanOrEqual(10_000); // all of them are used (no thinning to check here)
  return optimalRunStarts(x, bins).map((start) => {
    const [a, b] = [Math.round(x[start - 1] * 1000), Math.round(x[start] * 1000)];
    const candidates = Array.from({ length: b - a }, (_, i) => a + 1 + i);
    const distance = (t: number) => Math.abs(2 * t - (a + b));
    const best = Math.min(...candidates.map(distance));
    const nearest = candidates.filter((t) => distance(t) === best);
    expect(nearest).toHaveLength(1); // no tie between two thousandths: the rule gives one edge
    return nearest[0] / 1000;
  });
}

function labels(edges: readonly number[]): string[] {
  return [`< ${edges[0]}`, ...edges.slice(1).map((e, i) => `[${edges[i]}, ${e})`), `>= ${edges[edges.length - 1]}`];
}

function sharpnessLabels(stdout: string): string[] {
  const rep = JSON.parse(stdout) as Report;
  return rep.slices.map((s) => s.key.sharpness).filter((v): v is string => v !== undefined);
}

describe('--bin-method natural', () => {
  it('report bins sharpness at its natural breaks, computed here independently', async () => {
    const edges = expectedEdges(5);
    // the values of this check, from the dynamic programme above on the 659 distinct values
    expect(edges).toEqual([0.453, 0.588, 0.723, 0.858]);
    const r = await runCli(['report', TABLE, '--floor', '0.02', '--bin-method', 'natural', '--format', 'json', '--no-cache']);
    expect(r.code, r.stderr).toBe(0);
    expect(sharpnessLabels(r.stdout).sort()).toEqual(labels(edges).sort());
    // the default stays the quantile bins (edges as the README shows them for this sample)
    const q = await runCli(['report', TABLE, '--floor', '0.02', '--format', 'json', '--no-cache']);
    expect(sharpnessLabels(q.stdout).sort()).toEqual(labels([0.583, 0.649, 0.705, 0.768]).sort());
  });

  it('with --bins 3 too', async () => {
    const edges = expectedEdges(3);
    const r = await runCli(['report', TABLE, '--floor', '0.02', '--bin-method', 'natural', '--bins', '3', '--format', 'json', '--no-cache']);
    expect(r.code, r.stderr).toBe(0);
    expect(sharpnessLabels(r.stdout).sort()).toEqual(labels(edges).sort());
  });

  it('floorgap sql from the sample prints the same edges, in its header and in the query', async () => {
    const edges = expectedEdges(5);
    const r = await runCli(['sql', TABLE, '--table', 'lake.preds', '--bin-method', 'natural']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain(`sharpness (bins at ${edges.join(', ')})`);
    for (const label of labels(edges)) expect(r.stdout).toContain(`'${label}'`);
  });

  it('floorgap sql without a sample cannot find natural breaks: one line asking for a sample or the edges', async () => {
    const r = await runCli(['sql', '--table', 'preds', '--slice-cols', 'station', '--bin-edges', 'sharpness', '--bin-method', 'natural']);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe(
      'floorgap: --bin-method natural needs the values of "sharpness", which floorgap sql reads from a local sample of the table: give a sample file (floorgap sql sample.parquet --table preds --bin-method natural …), or the edges as --bin-edges "sharpness=e1,e2,..."\n',
    );
    // edges given: the method has nothing to do, the query is printed
    const given = await runCli(['sql', '--table', 'preds', '--slice-cols', 'station,sharpness', '--bin-edges', 'sharpness=0.5,0.7', '--bin-method', 'natural']);
    expect(given.code, given.stderr).toBe(0);
    expect(given.stdout).toContain('sharpness (bins at 0.5, 0.7)');
  });

  it('an unknown method is a usage error', async () => {
    const r = await runCli(['report', TABLE, '--bin-method', 'jenks']);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^floorgap: Invalid values:.*bin-method.*"jenks".*"quantile", "natural"/);
  });
});
