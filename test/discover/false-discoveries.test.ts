/**
 * False discoveries of the search, by simulation: cells drawn directly (no files) over 500 seeds, with
 * planted effects of several sizes and columns that carry none. A listed slice is false when its
 * conditions neither lie within a planted effect's nor contain them (it overlaps no planted effect as a
 * slice of it or above it). The mean false-discovery proportion must stay at or below the FDR level
 * (5 %) within twice its simulation standard error, with Benjamini–Hochberg and with
 * Benjamini–Yekutieli (Benjamini & Hochberg 1995; Benjamini & Yekutieli 2001: the guarantees are for
 * the family of tests; the search's tests are intersection–union tests, Berger 1982).
 *
 * Every cell holds a real avoidable bias of 3 points (train error 8 %, floor 5 %) that no slice adds
 * to: a slice's gap is real everywhere and only its lift separates a discovery from the rest, the case
 * the intersection–union test is there for.
 */
import { describe, expect, it } from 'vitest';
import { discover } from '../../src/discover/search.js';
import { DISCOVER_DEFAULTS } from '../../src/discover/types.js';
import { DEFAULT_TRIAGE_OPTIONS } from '../../src/triage/types.js';
import type { ReportContext } from '../../src/triage/report.js';
import { cellsOf, type CellRecord } from '../helpers/cell-records.js';
import { prng } from '../helpers/engine-fixture.js';

const CONTEXT: ReportContext = { inputs: [], roles: {}, where: null, version: 'test', warnings: [] };
const VALUES: Record<string, string[]> = { A: ['a0', 'a1', 'a2', 'a3'], B: ['b0', 'b1', 'b2', 'b3'], C: ['c0', 'c1', 'c2'], D: ['d0', 'd1', 'd2'] };
const ROWS = 60;
const BASE = 0.08;
const FLOOR = 0.05;
const SEEDS = 500;
const SIZES = [0, 0.04, 0.08];

interface Effect {
  readonly conditions: Record<string, string>;
  readonly size: number;
}

/** One seed's cells: A=a1 raises train and dev error (bias), B=b1 · C=c1 raises dev error (variance); D carries nothing. */
function simulate(seed: number): { records: CellRecord[]; effects: Effect[] } {
  const rnd = prng(seed);
  const effects: Effect[] = [
    { conditions: { A: 'a1' }, size: SIZES[seed % 3] },
    { conditions: { B: 'b1', C: 'c1' }, size: SIZES[Math.floor(seed / 3) % 3] },
  ];
  const binomial = (n: number, p: number) => {
    let x = 0;
    for (let i = 0; i < n; i++) if (rnd() < p) x++;
    return x;
  };
  const records: CellRecord[] = [];
  for (const a of VALUES.A) for (const b of VALUES.B) for (const c of VALUES.C) for (const d of VALUES.D) {
    const key = { A: a, B: b, C: c, D: d };
    for (const split of ['train', 'dev'] as const) {
      let p = BASE;
      if (a === 'a1') p += effects[0].size;
      if (split === 'dev' && b === 'b1' && c === 'c1') p += effects[1].size;
      records.push({ key, split, run: null, rows: ROWS, weight: ROWS, weightSq: ROWS, errors: binomial(ROWS, p), floorSum: FLOOR * ROWS, floorEntry: -1, floorN: null, costSum: 0, costWeight: 0, audit: null });
    }
  }
  return { records, effects: effects.filter((e) => e.size > 0) };
}

const within = (inner: Record<string, string>, outer: Record<string, string>) => Object.entries(outer).every(([k, v]) => inner[k] === v);

function falseProportion(method: 'bh' | 'by'): { mean: number; se: number; listed: number; trueFound: number } {
  const fdp: number[] = [];
  let listed = 0;
  let trueFound = 0;
  for (let seed = 0; seed < SEEDS; seed++) {
    const { records, effects } = simulate(seed);
    const cells = cellsOf(records);
    const d = discover(cells, cells.columns, CONTEXT, { ...DEFAULT_TRIAGE_OPTIONS, fdrMethod: method }, { ...DISCOVER_DEFAULTS, depth: 2, top: 1000 });
    const slices = d.slices.filter((s) => s.explained_by.length === 0);
    const bad = slices.filter((s) => !effects.some((e) => within(s.conditions as Record<string, string>, e.conditions) || within(e.conditions, s.conditions as Record<string, string>))).length;
    listed += slices.length;
    trueFound += slices.length - bad;
    fdp.push(slices.length === 0 ? 0 : bad / slices.length);
  }
  const mean = fdp.reduce((a, b) => a + b, 0) / fdp.length;
  const sd = Math.sqrt(fdp.reduce((a, b) => a + (b - mean) ** 2, 0) / (fdp.length - 1));
  return { mean, se: sd / Math.sqrt(fdp.length), listed, trueFound };
}

describe(`false discoveries over ${SEEDS} simulated seeds`, () => {
  for (const method of ['bh', 'by'] as const) {
    it(`${method}: the mean false-discovery proportion is at most the FDR level (5 %) within 2 standard errors`, () => {
      const r = falseProportion(method);
      expect(r.mean).toBeLessThanOrEqual(0.05 + 2 * r.se);
      // the search does find the planted effects: a test that lists nothing would pass the line above
      expect(r.trueFound).toBeGreaterThan(SEEDS / 3);
    }, 120_000);
  }
});
