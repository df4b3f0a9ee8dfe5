/**
 * Floors from the inspectors' audit, label-noise hints, labelling costs and fitted learning curves,
 * through the built CLI on generated demo data. The planted values (DEMO_FLOORS, DEMO_PLANTS) are the
 * demo generator's own invented truths; the report must recover them within its intervals.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_FLOORS, DEMO_PLANTS } from '../../src/demo/scenario.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { runCli } from '../helpers/run-cli.js';

const ANNOTATORS = ['--annotators', 'insp_a,insp_b,insp_c'];

async function report(args: string[]): Promise<Report> {
  const r = await runCli([...args, '--format', 'json']);
  expect(r.stderr).toBe('');
  expect(r.code).toBe(0);
  return JSON.parse(r.stdout) as Report;
}

const byLabel = (r: Report, label: string): SliceReport => {
  const s = r.slices.find((x) => x.label === label);
  if (!s) throw new Error(`no slice ${label}`);
  return s;
};

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-audit-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('annotator floors on a 100,000-row demo (seed 5, about 5,000 audited rows)', () => {
  let table: string;
  let r: Report;
  beforeAll(async () => {
    const out = join(dir, 'one');
    expect((await runCli(['demo', '--out', out, '--rows', '100000', '--seed', '5'])).code).toBe(0);
    table = join(out, 'solder-joints.csv');
    // 99 % intervals: six packages are checked at once, so each interval is made wide enough that a
    // correct estimator misses one of them rarely (about 6 % of seeds rather than 26 % at 95 %)
    r = await report([table, ...ANNOTATORS, '--by', 'package', '--confidence', '0.99']);
  });

  it('recovers every planted per-package floor within its interval (panel rule)', () => {
    for (const [pkg, planted] of Object.entries(DEMO_FLOORS)) {
      const s = byLabel(r, `package=${pkg}`);
      expect(s.floor.source).toBe('annotators');
      expect(s.floor.rule).toBe('panel');
      // planted by the demo generator (our own scenario): panel error = the package floor
      expect(s.floor.lo!).toBeLessThanOrEqual(planted.floor);
      expect(s.floor.hi!).toBeGreaterThanOrEqual(planted.floor);
      expect(s.floor.audited!).toBeGreaterThan(500); // ~5 % of the package's rows are audited (planted)
      expect(s.floor.raw!.n).toBeLessThanOrEqual(s.floor.audited!);
    }
  });

  it('finds QFN biased and 0201 at its floor with floors from the audit alone', async () => {
    expect(byLabel(r, 'package=QFN').focus).toBe('bias'); // planted: QFN +0.08 avoidable bias
    // 0201's floor comes from ~1,250 audited rows: its standard error (~0.9 points) is close to the
    // default at-floor margin of 1 point, so the check uses a margin of 2 points (two standard errors)
    const wide = await report([table, ...ANNOTATORS, '--by', 'package', '--floor-margin', '0.02']);
    expect(byLabel(wide, 'package=0201').focus).toBe('at-floor'); // planted: 0201 at its floor
  });

  it('inspectors agree least on 0201 (the planted noisy slice), which gets the noisy-label hint', () => {
    const kappas = r.slices.map((s) => ({ label: s.label, kappa: s.agreement!.kappa! }));
    const lowest = kappas.reduce((a, b) => (b.kappa < a.kappa ? b : a));
    expect(lowest.label).toBe('package=0201');
    expect(byLabel(r, 'package=0201').agreement!.method).toBe('fleiss');
    expect(byLabel(r, 'package=0201').hints.join(' ')).toMatch(/labels are likely noisy/);
    expect(byLabel(r, 'package=SOIC').hints).toEqual([]);
  });

  it('the typical rule sits above the panel rule: insp_c is harsh on good joints (planted)', async () => {
    const typical = await report([table, ...ANNOTATORS, '--by', 'package', '--floor-rule', 'typical']);
    const panel = byLabel(r, 'package=SOIC').floor.raw!.value;
    expect(byLabel(typical, 'package=SOIC').floor.raw!.value).toBeGreaterThan(panel);
    expect(byLabel(typical, 'package=SOIC').floor.rule).toBe('typical');
  });

  it('a cost table divides the yield and labels_to_halve follows the curve exponent', async () => {
    const costs = join(dir, 'costs.csv');
    writeFileSync(costs, 'station,label_cost\nS5,4\n');
    const plain = await report([table, ...ANNOTATORS, '--by', 'station']);
    const costed = await report([table, ...ANNOTATORS, '--by', 'station', '--cost-table', costs]);
    const a = byLabel(plain, 'station=S5');
    const b = byLabel(costed, 'station=S5');
    expect(a.cost).toBe(1);
    expect(b.cost).toBe(4);
    expect(a.yield).not.toBeNull();
    expect(b.yield! * 4).toBeCloseTo(a.yield!, 12); // yield ÷ cost (definition)
    // Δ = n (2^(1/β) − 1) = 3n at β = 0.5 (hand algebra)
    expect(a.labels_to_halve!).toBeCloseTo(3 * a.error.train!.n, 6);
    expect(byLabel(costed, 'station=S1').cost).toBe(1); // rows the table does not cover cost --label-cost
  });
});

describe('learning curves over 4 runs (40,000 rows, seed 3)', () => {
  let r: Report;
  beforeAll(async () => {
    const out = join(dir, 'runs');
    expect((await runCli(['demo', '--out', out, '--rows', '40000', '--seed', '3', '--runs', '4'])).code).toBe(0);
    r = await report([join(out, 'solder-joints.csv'), '--floor-table', join(out, 'inspector-floors.csv'), ...ANNOTATORS, '--by', 'lighting']);
  });

  it('reports the run with the most training rows and lists every run', () => {
    expect(r.runs).toEqual(['r1', 'r2', 'r3', 'r4']);
    expect(r.run).toBe('r4');
  });

  it('the fitted exponent of low-angle covers the planted one', () => {
    const c = byLabel(r, 'lighting=low-angle').curve;
    expect(c.source).toBe('fit');
    expect(c.runs).toBe(4);
    const planted = DEMO_PLANTS.variance.curveExponent; // 0.5, planted by the demo generator (our own scenario)
    expect(c.lo!).toBeLessThanOrEqual(planted);
    expect(c.hi!).toBeGreaterThanOrEqual(planted);
  });

  it('--run picks another run; an unknown run is a clear error', async () => {
    const r1 = await report([join(dir, 'runs', 'solder-joints.csv'), '--floor', '0.05', '--by', 'lighting', '--run', 'r1']);
    expect(r1.run).toBe('r1');
    expect(r1.overall.rows.train!).toBeLessThan(r.overall.rows.train! / 4); // r1 trains on 1/8 of the rows (planted)
    const bad = await runCli([join(dir, 'runs', 'solder-joints.csv'), '--run', 'r9']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--run r9: no such run; the runs are r1, r2, r3, r4/);
  });

  it('without runs every slice uses the default exponent', async () => {
    const one = await report(['data-samples/solder-joints.csv', '--floor', '0.05', '--by', 'lighting']);
    expect(one.run).toBeNull();
    for (const s of one.slices) expect(s.curve).toEqual({ beta: 0.5, lo: null, hi: null, runs: 0, source: 'default' });
  });
});
