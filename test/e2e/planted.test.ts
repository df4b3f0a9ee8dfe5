/**
 * Planted-structure recovery: the demo generator plants known truths (our own scenario, see
 * DEMO_PLANTS in src/demo/scenario.ts) and the report, run through the built CLI, must find them.
 * Expected foci are the planted truths, not values read off a previous run.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { runCli } from '../helpers/run-cli.js';

async function report(args: string[]): Promise<Report> {
  const r = await runCli([...args, '--format', 'json']);
  expect(r.stderr).toBe('');
  expect(r.code).toBe(0);
  return JSON.parse(r.stdout) as Report;
}

function slice(r: Report, label: string): SliceReport {
  const s = r.slices.find((x) => x.label === label);
  if (!s) throw new Error(`no slice ${label} in ${r.slices.map((x) => x.label).join(', ')}`);
  return s;
}

const flaggedLabels = (r: Report) => r.slices.filter((s) => s.flagged).map((s) => s.label);

describe('shipped demo sample (data-samples/, 20,000 rows, seed 24)', () => {
  const files = ['data-samples/solder-joints.csv', '--floor-table', 'data-samples/inspector-floors.csv', '--annotators', 'insp_a,insp_b,insp_c'];
  let r: Report;
  beforeAll(async () => {
    r = await report(files);
  });

  it('finds each planted slice with its planted focus', () => {
    // planted by the demo generator (our own scenario): QFN avoidable bias, S5 mismatch,
    // low-angle variance, 0201 at its floor
    expect(slice(r, 'package=QFN').focus).toBe('bias');
    expect(slice(r, 'package=QFN').flagged).toBe(true);
    expect(slice(r, 'station=S5').focus).toBe('mismatch');
    expect(slice(r, 'station=S5').flagged).toBe(true);
    expect(slice(r, 'lighting=low-angle').focus).toBe('variance');
    expect(slice(r, 'lighting=low-angle').flagged).toBe(true);
    expect(slice(r, 'package=0201').focus).toBe('at-floor');
    expect(slice(r, 'package=0201').flagged).toBe(false);
  });

  it('is the overview: one-column slices whose shares add to 1 within each column', () => {
    expect(r.by).toBeNull();
    for (const col of ['station', 'lighting', 'package', 'finish', 'shift']) {
      const total = r.slices.filter((s) => Object.keys(s.key)[0] === col).reduce((a, s) => a + s.share, 0);
      expect(total).toBeCloseTo(1, 12); // shares partition the dev rows within a column (definition)
    }
    // the planted floors come from the inspector table: 0201 = 0.12 (planted, our own scenario)
    expect(slice(r, 'package=0201').floor.value).toBeCloseTo(0.12, 12);
    expect(slice(r, 'package=0201').floor.source).toBe('table');
  });
});

describe('a larger demo (100,000 rows, seed 101): recovery and no flags where nothing was planted', () => {
  let dir: string;
  let files: string[];
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'floorgap-planted-'));
    const made = await runCli(['demo', '--out', dir, '--rows', '100000', '--seed', '101']);
    expect(made.code).toBe(0);
    files = [join(dir, 'solder-joints.csv'), '--floor-table', join(dir, 'inspector-floors.csv'), '--annotators', 'insp_a,insp_b,insp_c'];
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('overview: the planted slices carry their planted focus', async () => {
    const r = await report(files);
    // planted by the demo generator (our own scenario)
    expect(slice(r, 'package=QFN').focus).toBe('bias');
    expect(slice(r, 'station=S5').focus).toBe('mismatch');
    expect(slice(r, 'lighting=low-angle').focus).toBe('variance');
    expect(slice(r, 'package=0201').focus).toBe('at-floor');
    // the new camera is the largest lever by yield, as planted: rank 1
    expect(r.slices[0].label).toBe('station=S5');
  });

  it('by package, outside S5 and low-angle: only QFN is flagged', async () => {
    const r = await report([...files, '--by', 'package', '--where', "station <> 'S5' AND lighting <> 'low-angle'"]);
    expect(flaggedLabels(r)).toEqual(['QFN'].map((v) => `package=${v}`));
    expect(slice(r, 'package=0201').focus).toBe('at-floor');
  });

  it('by station, outside QFN and low-angle: only S5 is flagged', async () => {
    const r = await report([...files, '--by', 'station', '--where', "package <> 'QFN' AND lighting <> 'low-angle'"]);
    expect(flaggedLabels(r)).toEqual(['station=S5']);
    expect(slice(r, 'station=S5').focus).toBe('mismatch');
  });

  it('by lighting, outside QFN and S5: only low-angle is flagged', async () => {
    const r = await report([...files, '--by', 'lighting', '--where', "package <> 'QFN' AND station <> 'S5'"]);
    expect(flaggedLabels(r)).toEqual(['lighting=low-angle']);
  });

  it('with every planted slice removed, nothing is flagged', async () => {
    const r = await report([...files, '--where', "package <> 'QFN' AND station <> 'S5' AND lighting <> 'low-angle'"]);
    expect(r.slices.length).toBeGreaterThan(15);
    expect(flaggedLabels(r)).toEqual([]);
  });
});
