/**
 * The arquero roll-up of the cell table (src/slices/rollup.ts) against a plain loop over cell records,
 * on random cells: the same slices with the same sums. Expected values: the plain loop.
 */
import { describe, expect, it } from 'vitest';
import { cellsWithin, mergeCells } from '../../src/cells/cell-table.js';
import { rollupByRun, rollupSlices } from '../../src/slices/rollup.js';
import type { CellRecord as Cell } from '../helpers/cell-records.js';
import { SPLITS } from '../../src/core/split.js';
import { prng } from '../helpers/engine-fixture.js';
import { cellsOf } from '../helpers/cell-records.js';

const COLUMNS = ['a', 'b', 'c'];
const VALUES = [['a0', 'a1', 'a2'], ['b0', 'b1', 'b2', 'b3', 'b4'], ['c0', 'c1']];

function randomCells(n: number, seed: number, sets = false): Cell[] {
  const rnd = prng(seed);
  const out: Cell[] = [];
  for (let i = 0; i < n; i++) {
    const grouped = sets ? [[0], [1], [2], [0, 1]][Math.floor(rnd() * 4)] : [0, 1, 2];
    const key = Object.fromEntries(COLUMNS.map((c, j) => [c, grouped.includes(j) ? VALUES[j][Math.floor(rnd() * VALUES[j].length)] : null]));
    const rows = 1 + Math.floor(rnd() * 20);
    const weight = rows * (0.5 + rnd());
    const entry = Math.floor(rnd() * 4) - 1;
    out.push({
      key,
      split: SPLITS[Math.floor(rnd() * 4)],
      run: rnd() < 0.5 ? 'r1' : 'r2',
      rows,
      weight,
      weightSq: weight * weight / rows,
      errors: weight * rnd() * 0.3,
      floorSum: weight * 0.05,
      floorEntry: entry,
      floorN: entry < 0 ? null : 100 * (entry + 1),
      costSum: weight * 2,
      costWeight: weight,
      audit: null,
    });
  }
  return out;
}

/** The plain loop: per slice key and split, the sums; per key, entry and split (train/dev), the floor parts. */
function plainRollup(cells: readonly Cell[], by: readonly string[], run: string | null) {
  const slices = new Map<string, { splits: Record<string, number[]>; parts: Map<string, number[]> }>();
  for (const c of cells) {
    if (run !== null && c.run !== run) continue;
    const id = JSON.stringify(by.map((b) => c.key[b]));
    const s = slices.get(id) ?? { splits: {} as Record<string, number[]>, parts: new Map<string, number[]>() };
    slices.set(id, s);
    const t = (s.splits[c.split] ??= [0, 0, 0, 0, 0, 0, 0]);
    [c.rows, c.weight, c.weightSq, c.errors, c.floorSum, c.costSum, c.costWeight].forEach((v, i) => (t[i] += v));
    if (c.split === 'train' || c.split === 'dev') {
      const pid = `${c.split}:${c.floorEntry}`;
      const p = s.parts.get(pid) ?? [0, 0];
      p[0] += c.weight;
      p[1] += c.floorSum;
      s.parts.set(pid, p);
    }
  }
  return slices;
}

function expectSame(actual: ReturnType<typeof rollupSlices>, expected: ReturnType<typeof plainRollup>, by: readonly string[]): void {
  expect(actual).toHaveLength(expected.size);
  for (const s of actual) {
    const e = expected.get(JSON.stringify(by.map((b) => s.key[b])))!;
    expect(Object.keys(s.splits).sort()).toEqual(Object.keys(e.splits).sort());
    for (const [split, sums] of Object.entries(s.splits)) {
      const want = e.splits[split];
      [sums!.rows, sums!.weight, sums!.weightSq, sums!.errors, sums!.floorSum, sums!.costSum, sums!.costWeight].forEach((v, i) => expect(v).toBeCloseTo(want[i], 9));
    }
    const parts = [...s.floorParts.map((p) => ['train', p] as const), ...s.devFloorParts.map((p) => ['dev', p] as const)];
    expect(parts).toHaveLength(e.parts.size);
    for (const [split, p] of parts) {
      const want = e.parts.get(`${split}:${p.entry}`)!;
      expect(p.weight).toBeCloseTo(want[0], 9);
      expect(p.floorSum).toBeCloseTo(want[1], 9);
      expect(p.n).toBe(p.entry < 0 ? null : 100 * (p.entry + 1));
    }
  }
}

describe('rollupSlices on the cell table', () => {
  const cells = randomCells(3000, 7);
  const table = cellsOf(cells);

  for (const by of [[], ['a'], ['b', 'c'], ['c', 'a', 'b']]) {
    it(`by [${by.join(', ')}]: the plain loop's sums`, () => {
      expectSame(rollupSlices(table, by), plainRollup(cells, by, null), by);
    });
  }

  it('one run only, and every run from one roll-up with the run in its key (train and dev sums only)', () => {
    expectSame(rollupSlices(table, ['b'], 'r2'), plainRollup(cells, ['b'], 'r2'), ['b']);
    expect(rollupSlices(table, ['b'], 'r9')).toEqual([]);
    const byRun = rollupByRun(table, ['b', 'c']);
    expect([...byRun.keys()].sort()).toEqual(['r1', 'r2']);
    for (const run of ['r1', 'r2']) {
      // a learning curve needs train and dev only: those splits' rows, weights and errors, nothing else
      const want = plainRollup(cells, ['b', 'c'], run);
      const got = byRun.get(run)!;
      expect(got).toHaveLength(want.size);
      for (const s of got) {
        const e = want.get(JSON.stringify(['b', 'c'].map((b) => s.key[b])))!;
        expect(Object.keys(s.splits).sort()).toEqual(Object.keys(e.splits).filter((k) => k === 'train' || k === 'dev').sort());
        for (const [split, sums] of Object.entries(s.splits)) {
          [sums!.rows, sums!.weight, sums!.weightSq, sums!.errors].forEach((v, i) => expect(v).toBeCloseTo(e.splits[split][i], 9));
        }
        expect(s.floorParts).toEqual([]);
        expect(s.audit).toBeNull();
      }
    }
  });

  it('the cells of one slice (a drill-down) roll up as that slice alone', () => {
    const within = cellsWithin(table, { a: 'a1' }, ['a', 'b']);
    const subset = cells.filter((c) => c.key.a === 'a1');
    expect(within.size).toBe(subset.length);
    expectSame(rollupSlices(within, ['b']), plainRollup(subset, ['b'], null), ['b']);
    expect(cellsWithin(table, { a: 'no such value' }, ['a', 'b']).size).toBe(0);
  });

  it('merged tables re-code the second table\'s values into the first\'s dictionaries', () => {
    const first = randomCells(500, 11);
    const second = randomCells(400, 12).map((c) => ({ ...c, key: { ...c.key, a: c.key.a === null ? null : `${c.key.a}-new` } }));
    const merged = mergeCells(cellsOf(first), cellsOf(second));
    expect(merged.size).toBe(900);
    expectSame(rollupSlices(merged, ['a', 'b']), plainRollup([...first, ...second], ['a', 'b'], null), ['a', 'b']);
  });
});

describe('grouping sets', () => {
  const cells = randomCells(2000, 9, true);

  it('a grouping takes only the cells of its own set; [] takes the first cell\'s set', () => {
    for (const by of [['a'], ['b'], ['a', 'b'], ['b', 'a']]) {
      const want = [...by].sort().join();
      const own = cells.filter((c) => COLUMNS.filter((k) => c.key[k] !== null).sort().join() === want);
      expectSame(rollupSlices(cellsOf(cells), by), plainRollup(own, by, null), by);
    }
    const first = COLUMNS.filter((k) => cells[0].key[k] !== null).join();
    const own = cells.filter((c) => COLUMNS.filter((k) => c.key[k] !== null).join() === first);
    expectSame(rollupSlices(cellsOf(cells), []), plainRollup(own, [], null), []);
  });
});
