/**
 * Paired cells → paired sums per slice and split: an arquero groupby/rollup over the cells of one
 * grouping set (as slices/rollup.ts rolls up cells), so a slice's sums come from the cells and never
 * from another scan.
 */
import * as aq from 'arquero';
import type { PairedCells } from '../cells/paired-cells.js';
import { SPLITS, type Split } from '../core/split.js';
import type { PairedWeightSums } from '../stats/index.js';
import { sliceId } from '../triage/report.js';

const { op } = aq;

/** A split's paired sums: the pairs and their weight sums. */
export interface PairedSplitSums extends PairedWeightSums {
  readonly pairs: number;
}

/** Per slice (by {@link sliceId} of its key), per split, the paired sums. */
export type PairedSlices = ReadonlyMap<string, Readonly<Partial<Record<Split, PairedSplitSums>>>>;

const SUMS = ['pairs', 'sumW', 'sumW2', 'bSumW', 'bSumW2', 'cSumW', 'cSumW2'] as const;

/**
 * The paired sums of every slice of each grouping (and the overall slice, key {}), each rolled up from
 * the cells of the first grouping set that holds the grouping's columns.
 * @param groupings the slices' groupings: [[...by]] or one [column] per overview column
 * @example
 * rollupPaired(cells, [['station']]).get(sliceId({ station: 'S5' }))?.dev?.cSumW; // => Σw of the c pairs of station=S5 on dev
 */
export function rollupPaired(paired: PairedCells, groupings: readonly (readonly string[])[]): PairedSlices {
  const out = new Map<string, Partial<Record<Split, PairedSplitSums>>>();
  if (paired.cells.length === 0) return out;
  const table = aq.from(
    paired.cells.map((c) => ({
      set: c.set,
      split: c.split,
      ...Object.fromEntries(paired.columns.map((_, i) => [`k${i}`, c.keys[i]])),
      ...Object.fromEntries(SUMS.map((s) => [s, c[s]])),
    })),
  );
  const sums = Object.fromEntries(SUMS.map((s) => [s, op.sum(s)]));
  for (const g of [[], ...groupings]) {
    const set = paired.sets.findIndex((s) => g.every((name) => s.includes(name)));
    if (set < 0) throw new Error(`rollupPaired: no grouping set holds ${g.join(', ')}`);
    const idx = g.map((name) => paired.columns.indexOf(name));
    const keys = idx.map((i) => `k${i}`);
    const rows = table
      .params({ set })
      .filter((d: { set: number }, $: { set: number }) => d.set === $.set)
      .groupby(...keys, 'split')
      .rollup(sums)
      .objects() as Record<string, unknown>[];
    for (const r of rows) {
      const key = Object.fromEntries(g.map((name, j) => [name, String(r[keys[j]])]));
      const id = sliceId(key);
      const slot = out.get(id) ?? {};
      const split = r.split as Split;
      if (!SPLITS.includes(split)) continue;
      slot[split] = Object.fromEntries(SUMS.map((s) => [s, Number(r[s])])) as unknown as PairedSplitSums;
      out.set(id, slot);
    }
  }
  return out;
}
