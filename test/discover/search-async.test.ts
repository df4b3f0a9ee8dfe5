/**
 * The search run in steps (src/discover/search.ts): `discoverAsync` is the same search as `discover`,
 * giving the event loop a turn between column-set roll-ups and stopping early on an AbortSignal.
 * Expected values: `discover()` itself on the same cells (the demo sample, data-samples/, seed 24), and
 * the count of column sets of its 9 candidate columns at depth 2 (hand arithmetic: 9 + 9·8/2 = 45).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Analysis } from '../../src/app/analysis.js';
import { discover, discoverAsync } from '../../src/discover/search.js';
import { DISCOVER_DEFAULTS } from '../../src/discover/types.js';
import type { Duck } from '../../src/sql/duck.js';
import { sampleAnalysis } from '../helpers/sample-analysis.js';

let duck: Duck;
let an: Analysis;
beforeAll(async () => {
  ({ duck, analysis: an } = await sampleAnalysis());
}, 60_000);
afterAll(() => duck.close());

const args = () => [an.loaded.table, an.loaded.overviewColumns, an.context, an.options, DISCOVER_DEFAULTS] as const;

describe('discoverAsync', () => {
  it('finds what discover finds, with the same progress, one turn of the event loop per step', async () => {
    const syncSteps: [number, number][] = [];
    const want = discover(...args(), (done, total) => syncSteps.push([done, total]));
    expect(an.loaded.overviewColumns).toHaveLength(9);
    // 45 column sets (hand arithmetic above), each reported once
    expect(syncSteps).toEqual(Array.from({ length: 45 }, (_, i) => [i + 1, 45]));
    expect(want.slices.length).toBeGreaterThan(0);

    const steps: [number, number][] = [];
    let pauses = 0;
    const got = await discoverAsync(...args(), {
      onProgress: (done, total) => steps.push([done, total]),
      pause: () => {
        pauses++;
        return new Promise<void>((r) => setImmediate(r));
      },
    });
    expect(got).toEqual(want);
    expect(steps).toEqual(syncSteps);
    // a pause after each of the 45 roll-ups, after the triage of the examined slices and after the tests
    expect(pauses).toBe(45 + 2);
  }, 60_000);

  it('lets timers run while it searches (the default pause is a turn of the event loop)', async () => {
    let ticks = 0;
    const timer = setInterval(() => ticks++, 0);
    let progressAtFirstTick: number | null = null;
    let last = 0;
    const watch = setTimeout(() => (progressAtFirstTick = last), 0);
    try {
      await discoverAsync(...args(), { onProgress: (done) => (last = done) });
    } finally {
      clearInterval(timer);
      clearTimeout(watch);
    }
    // the timer set before the search ran before it ended: the search was not one blocking call
    expect(progressAtFirstTick).not.toBeNull();
    expect(progressAtFirstTick!).toBeLessThan(45);
    expect(ticks).toBeGreaterThan(0);
  }, 60_000);

  it('stops at the next step once aborted, rejecting with the signal reason', async () => {
    const controller = new AbortController();
    const seen: number[] = [];
    const run = discoverAsync(...args(), {
      signal: controller.signal,
      onProgress: (done) => {
        seen.push(done);
        if (done === 3) controller.abort();
      },
    });
    await expect(run).rejects.toMatchObject({ name: 'AbortError' });
    expect(seen).toEqual([1, 2, 3]); // no roll-up after the abort
  }, 60_000);

  it('never starts when the signal is already aborted', async () => {
    const seen: number[] = [];
    await expect(discoverAsync(...args(), { signal: AbortSignal.abort(), onProgress: (d) => seen.push(d) })).rejects.toMatchObject({ name: 'AbortError' });
    expect(seen).toEqual([]);
  });

  it('rejects with the same FloorgapError as discover for bad options', async () => {
    const bad = { ...DISCOVER_DEFAULTS, depth: 4 };
    const a = [an.loaded.table, an.loaded.overviewColumns, an.context, an.options, bad] as const;
    expect(() => discover(...a)).toThrow('--depth 4: expected 1, 2 or 3 conditions per slice');
    await expect(discoverAsync(...a)).rejects.toThrow('--depth 4: expected 1, 2 or 3 conditions per slice');
  });
});
