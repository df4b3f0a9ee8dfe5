/**
 * The lattice the search walks, checked by exhaustive enumeration on random small cell tables: every
 * conjunction a plain loop over the cell records finds is a candidate, the counts agree, the headroom
 * bound holds for every slice beneath a parent, and the search that skips through the bound lists the
 * same slices as the search that examines every slice. Expected values: the plain loop, and the
 * search with pruning off.
 */
import { describe, expect, it } from 'vitest';
import { columnSets, headroomBound, parentKeys } from '../../src/discover/lattice.js';
import { discover } from '../../src/discover/search.js';
import { DISCOVER_DEFAULTS } from '../../src/discover/types.js';
import { rollupSlices } from '../../src/slices/rollup.js';
import { draft } from '../../src/triage/triage.js';
import { DEFAULT_TRIAGE_OPTIONS } from '../../src/triage/types.js';
import type { ReportContext } from '../../src/triage/report.js';
import type { Split } from '../../src/core/split.js';
import { cellsOf, type CellRecord } from '../helpers/cell-records.js';
import { prng } from '../helpers/engine-fixture.js';

const CONTEXT: ReportContext = { inputs: [], roles: {}, where: null, version: 'test', warnings: [] };
const VALUES: Record<string, string[]> = { A: ['a0', 'a1', 'a2'], B: ['b0', 'b1'], C: ['c0', 'c1', 'c2', 'c3'] };

/** A random full cross of A × B × C over train, train_dev and dev, with random rows, error rates and floors. */
function randomCells(seed: number, rowsMax: number): CellRecord[] {
  const rnd = prng(seed);
  const out: CellRecord[] = [];
  for (const a of VALUES.A) for (const b of VALUES.B) for (const c of VALUES.C) {
    const base = 0.02 + 0.2 * rnd();
    const floor = 0.01 + 0.05 * rnd();
    for (const split of ['train', 'train_dev', 'dev'] as Split[]) {
      const rows = 1 + Math.floor(rnd() * rowsMax);
      const p = Math.min(0.9, base * (0.5 + rnd()));
      out.push({ key: { A: a, B: b, C: c }, split, run: null, rows, weight: rows, weightSq: rows, errors: Math.round(p * rows), floorSum: floor * rows, floorEntry: -1, floorN: null, costSum: 0, costWeight: 0, audit: null });
    }
  }
  return out;
}

describe('the lattice', () => {
  it('column sets and parents', () => {
    expect(columnSets(['a', 'b', 'c'], 2)).toEqual([['a'], ['b'], ['c'], ['a', 'b'], ['a', 'c'], ['b', 'c']]);
    expect(columnSets(['a', 'b', 'c'], 3)).toHaveLength(7);
    expect(parentKeys({ s: 'S2', l: 'dome' })).toEqual([{ l: 'dome' }, { s: 'S2' }]);
    expect(parentKeys({ s: 'S2' })).toEqual([{}]);
  });

  for (const seed of [1, 2, 3, 4, 5]) {
    it(`seed ${seed}: every conjunction is a candidate, thin ones as the plain loop counts them`, () => {
      const records = randomCells(seed, 80);
      const cells = cellsOf(records);
      // the plain loop: every conjunction of 1 to 3 conditions that holds a row, with its train and dev rows
      const seen = new Map<string, { train: number; dev: number }>();
      for (const r of records) {
        const cols = Object.keys(r.key);
        for (let mask = 1; mask < 1 << cols.length; mask++) {
          const id = cols.filter((_, i) => mask & (1 << i)).map((c) => `${c}=${r.key[c]}`).join('&');
          const e = seen.get(id) ?? { train: 0, dev: 0 };
          if (r.split === 'train') e.train += r.rows;
          if (r.split === 'dev') e.dev += r.rows;
          seen.set(id, e);
        }
      }
      const thin = [...seen.values()].filter((e) => e.train < 30 || e.dev < 30).length;
      const d = discover(cells, cells.columns, CONTEXT, DEFAULT_TRIAGE_OPTIONS, { ...DISCOVER_DEFAULTS, depth: 3 });
      expect(d.counts.candidates).toBe(seen.size);
      expect(d.counts.thin).toBe(thin);
      expect(d.counts.examined + d.counts.thin + d.counts.skipped).toBe(seen.size);
    });

    it(`seed ${seed}: no slice beneath a parent has a part headroom above the parent's bound`, () => {
      const cells = cellsOf(randomCells(seed, 200));
      const present = new Set<Split>(['train', 'train_dev', 'dev']);
      const overall = rollupSlices(cells, [])[0];
      const devTotal = overall.splits.dev!.weight;
      const all = [overall, ...columnSets(cells.columns, 3).flatMap((by) => rollupSlices(cells, by))];
      let pairs = 0;
      for (const parent of all) {
        const bound = headroomBound(parent, devTotal, true);
        for (const child of all) {
          const within = Object.entries(parent.key).every(([k, v]) => child.key[k] === v);
          if (!within) continue;
          const d = draft(child, devTotal, present, DEFAULT_TRIAGE_OPTIONS, null);
          for (const g of [d.gaps.avoidable_bias, d.gaps.variance, d.gaps.mismatch]) {
            if (g) expect(d.share * g.value).toBeLessThanOrEqual(bound + 1e-15);
          }
          pairs++;
        }
      }
      // 60 slices (1 + 3 + 2 + 4 + 26 pairs + 24 triples): 315 parent–descendant pairs, itself included
      expect(pairs).toBe(315);
    });

    it(`seed ${seed}: skipping through the bound lists the same slices as examining every slice`, () => {
      const cells = cellsOf(randomCells(seed, 400));
      // a headroom threshold high enough that the bound skips slices: 2 points of overall dev error
      const options = { ...DEFAULT_TRIAGE_OPTIONS, minHeadroom: 0.02 };
      const search = (prune: boolean) => discover(cells, cells.columns, CONTEXT, options, { ...DISCOVER_DEFAULTS, depth: 3, all: true, top: 1000, prune });
      const pruned = search(true);
      const full = search(false);
      expect(pruned.counts.skipped).toBeGreaterThan(0);
      expect(full.counts.skipped).toBe(0);
      expect(pruned.slices.map((s) => [s.label, s.part, s.explained_by])).toEqual(full.slices.map((s) => [s.label, s.part, s.explained_by]));
    });
  }
});
