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

  it('finds the planted S6 · dome interaction in the pair only: the singles show no gap in the overview', async () => {
    // planted by the demo generator (our own scenario): a pure interaction, +0.12 on S6 · dome, no main
    // effect; the thresholds are the report's (--fdr 0.05) and what a search over thousands of pairs needs
    for (const label of ['station=S6', 'lighting=dome']) {
      expect(slice(r, label).flagged, label).toBe(false);
      expect(slice(r, label).gaps.avoidable_bias!.q!, label).toBeGreaterThan(0.2);
    }
    expect(flaggedLabels(r).sort()).toEqual(['lighting=low-angle', 'package=QFN', 'station=S5']);
    const byPair = await report([...files, '--by', 'station,lighting']);
    const pair = slice(byPair, 'station=S6 · lighting=dome');
    expect(pair.flagged).toBe(true);
    expect(pair.focus).toBe('bias');
    expect(pair.gaps.avoidable_bias!.p!).toBeLessThan(1e-6);
    // the pair's train error over the rest of its station and of its lighting: planted 0.12 + 0.04 and
    // 0.12 + 0.028 on the 3/4 of rows that are not 0201 (hand arithmetic: 12 and 11 points, a little less
    // where the rest stops at 0), at least 8 points
    const trainErrors = (s: SliceReport) => ({ errors: s.error.train!.value * s.rows.train!, rows: s.rows.train! });
    const p = trainErrors(pair);
    for (const [by, label] of [['station', 'station=S6'], ['lighting', 'lighting=dome']] as const) {
      const whole = trainErrors(slice(await report([...files, '--by', by]), label));
      const rest = (whole.errors - p.errors) / (whole.rows - p.rows);
      expect(p.errors / p.rows - rest, label).toBeGreaterThan(0.08);
    }
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

  it('by station and lighting: S6 · dome is flagged with its planted focus, bias', async () => {
    const r = await report([...files, '--by', 'station,lighting']);
    // planted by the demo generator (our own scenario): +0.12 on the pair in every split
    const pair = slice(r, 'station=S6 · lighting=dome');
    expect(pair.flagged).toBe(true);
    expect(pair.focus).toBe('bias');
    expect(pair.gaps.avoidable_bias!.p!).toBeLessThan(1e-6);
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
    // without the S6 · dome cell, what is left of the interaction is below 0 on S6 and on dome, ≤ 0 elsewhere
    const where = "package <> 'QFN' AND station <> 'S5' AND lighting <> 'low-angle' AND NOT (station = 'S6' AND lighting = 'dome')";
    const r = await report([...files, '--where', where]);
    expect(r.slices.length).toBeGreaterThan(15);
    expect(flaggedLabels(r)).toEqual([]);
  });
});
