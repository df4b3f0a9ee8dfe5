/** How rows are grouped into cells: the full cross of the slice columns when it is small enough, else grouping sets. */
import type { CellPlan, Grouping } from './plan.js';
import { keySql } from './row-sql.js';
import type { Duck } from '../sql/duck.js';
import { sampleTupleCount, sampleTupleStats, type Profile } from './profile.js';
import { chao1 } from '../stats/chao1.js';
import { ident } from '../sql/quote.js';

/**
 * Full cross when the cells it would hold are at most `maxCells`, else grouping sets of every column and
 * every pair. The count is exact when the sample holds every row; otherwise the product of the columns'
 * value counts, or, when that is too large, the Chao1 estimate from the sample's key tuples (columns
 * often nest, e.g. a board belongs to one package, so the product overstates the cross).
 */
export async function chooseGrouping(duck: Duck, plan: CellPlan, profile: Profile, maxCells: number, by: readonly string[] | null, sample: string): Promise<Grouping> {
  const names = plan.columns.map((c) => c.name);
  const splitExpr = 'lower(trim(' + `"${plan.splitColumn.replace(/"/g, '""')}"` + '))';
  let estimate: number;
  if (profile.complete) {
    estimate = await sampleTupleCount(duck, plan.columns.map(keySql), splitExpr, plan.where, sample);
  } else {
    estimate = 4;
    for (const c of plan.columns) {
      const p = profile.columns.find((x) => x.name === c.name)!;
      const values = c.kind === 'binned' ? (c.edges?.length ?? 0) + 2 : p.distinct + 1;
      estimate *= values;
      if (estimate > 1e12) break;
    }
    if (estimate > maxCells) {
      // raw values are enough for an estimate (trimming merges a few at most)
      const keys = plan.columns.map((c) => (c.kind === 'binned' && c.edges?.length ? keySql(c) : ident(c.name)));
      const t = await sampleTupleStats(duck, keys, ident(plan.splitColumn), plan.where, sample);
      estimate = Math.min(estimate, chao1(t.distinct, t.singletons, t.doubletons));
    }
  }
  if (estimate <= maxCells) return { kind: 'cross' };
  return pairSets(names, by);
}

/** Grouping sets of every column and every pair (and the `by` pair when it is not one of them). */
export function pairSets(names: readonly string[], by: readonly string[] | null): Grouping {
  const sets: string[][] = names.map((n) => [n]);
  for (let i = 0; i < names.length; i++) for (let j = i + 1; j < names.length; j++) sets.push([names[i], names[j]]);
  const want = by ? [...by].sort().join('\u0000') : '';
  if (by && by.length === 2 && !sets.some((s) => [...s].sort().join('\u0000') === want)) sets.push([...by]);
  return { kind: 'sets', sets };
}

/** True when cells made with `grouping` can serve the `by` grouping without another scan. */
export function groupingCovers(grouping: Grouping, by: readonly string[]): boolean {
  if (grouping.kind === 'cross' || by.length <= 1) return true;
  const want = [...by].sort().join('\u0000');
  return grouping.sets.some((set) => [...set].sort().join('\u0000') === want);
}
