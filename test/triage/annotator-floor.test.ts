/**
 * Annotator floors through `buildReport`: one empirical-Bayes Beta prior per grouping (fitBetaPrior over
 * the slices' rule counts), each slice's floor the posterior mean (x + α)/(n + α + β), so a slice with
 * few audited rows is pulled toward the prior mean and a slice with many barely moves. Expected
 * posteriors are recomputed in this file from the α, β that fitBetaPrior returns for the hand-known
 * (x, n) pairs; raw rates and rule counts are hand-computed from the invented audits.
 */
import { describe, expect, it } from 'vitest';
import type { AuditSums } from '../../src/core/cell.js';
import type { CellRecord as Cell } from '../helpers/cell-records.js';
import { fitBetaPrior } from '../../src/stats/index.js';
import { ruleCounts } from '../../src/triage/annotator-floor.js';
import { buildReport } from '../../src/triage/report.js';
import type { FloorRule, Report, SliceReport } from '../../src/triage/types.js';
import { auditedSlice, panelAudit, zeroAuditSums } from '../helpers/audit-cells.js';
import { CONTEXT, options, sliceCells, type SliceSpec } from '../helpers/cells.js';
import { expectClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const EXACT = 1e-15; // hand arithmetic
const FORMULA = 1e-14; // the posterior mean recomputed here from α, β

function bySlice(report: Report): Record<string, SliceReport> {
  return Object.fromEntries(report.slices.map((s) => [s.key.line, s]));
}

// fixture (hand-built): invented numbers. Every slice has 2,000 train rows (200 errors) and 2,000 dev
// rows (220 errors) at the default floor 0; only the audits differ.
const ROWS: SliceSpec = { train: { rows: 2000, errors: 200 }, dev: { rows: 2000, errors: 220 } };

describe("panel floors: 8 slices of one grouping share a prior; 5 audited rows shrink, 2,000 don't", () => {
  // (panel rows, majority-vote errors) per slice: L1 has 5 audited panel rows, L2 2,000; the rest 400
  // each with raw panel errors from 1 % to 15 % (a real spread, so the fitted prior is weak)
  const AUDITS: Record<string, [number, number]> = {
    L1: [5, 2],
    L2: [2000, 120],
    L3: [400, 4],
    L4: [400, 12],
    L5: [400, 20],
    L6: [400, 32],
    L7: [400, 48],
    L8: [400, 60],
  };
  const cells: Cell[] = Object.entries(AUDITS).flatMap(([line, [n, x]]) => auditedSlice({ line }, ROWS, panelAudit(n, x)));
  const report = buildReport(cellsOf(cells), ['line'], [], CONTEXT, options());
  const slices = bySlice(report);
  const prior = fitBetaPrior(Object.values(AUDITS).map(([n, x]) => ({ x, n })));
  const strength = prior.alpha + prior.beta;
  const posterior = (x: number, n: number) => (x + prior.alpha) / (n + strength);
  // overall audited floor: Σx / Σn = (2 + 120 + 4 + 12 + 20 + 32 + 48 + 60) / (5 + 2000 + 6 · 400) = 298 / 4405
  const overallRaw = 298 / 4405;

  it('the prior is fitted by marginal likelihood (a weak prior: α + β ≈ 24)', () => {
    // observed: α = 1.9278, β = 22.3504 (α + β = 24.278), prior mean α/(α + β) = 0.0794
    expect(prior.method).toBe('marginal-likelihood');
    expectClose(prior.alpha, 1.9278, 1e-4);
    expectClose(prior.beta, 22.3504, 1e-4);
  });

  it('every slice: floor.value = (x + α)/(n + α + β), floor.n = n + α + β, source annotators, rule panel', () => {
    for (const [line, [n, x]] of Object.entries(AUDITS)) {
      const f = slices[line].floor;
      expect(f.source, line).toBe('annotators');
      expect(f.rule, line).toBe('panel');
      expect(f.audited, line).toBe(n);
      expectClose(f.value, posterior(x, n), FORMULA);
      expectClose(f.n, n + strength, 1e-9);
      expect(f.raw!.n, line).toBe(n);
      expectClose(f.raw!.value, x / n, EXACT);
      expect(f.lo! <= f.value && f.value <= f.hi!, `${line}: interval holds the value`).toBe(true);
      expect(f.dev, line).toBeNull();
    }
  });

  it('the 5-row slice moves most of the way from its raw 40 % toward the overall audited floor', () => {
    const f = slices.L1.floor;
    // observed: raw 0.4 → value 0.13415; overall audited floor 298/4405 = 0.06765
    expectClose(f.raw!.value, 0.4, EXACT);
    expectClose(f.value, 0.13415, 1e-5);
    // posterior formula: value − raw = (α + β)/(n + α + β) · (α/(α + β) − raw); with n = 5 the weight
    // (α + β)/(5 + α + β) = 24.278/29.278 = 0.829 of the way to the prior mean
    const weight = strength / (5 + strength);
    expectClose(weight, 0.8292, 1e-4);
    expectClose(f.value - f.raw!.value, weight * (prior.alpha / strength - 0.4), FORMULA);
    // at least 75 % of the distance to the overall audited floor is covered
    // (observed: (0.4 − 0.13415)/(0.4 − 0.06765) = 0.80)
    expect((f.raw!.value - f.value) / (f.raw!.value - overallRaw)).toBeGreaterThan(0.75);
  });

  it('the 2,000-row slice moves by less than 1 % of its raw value', () => {
    const f = slices.L2.floor;
    // observed: raw 0.06 → value 0.060233 (+0.39 %); the formula's weight is 24.278/2024.278 = 0.012,
    // times the distance to the prior mean 0.0794 − 0.06 = 0.0194 → +0.00023
    expectClose(f.raw!.value, 0.06, EXACT);
    expectClose(f.value, 0.060233, 1e-6);
    expect(Math.abs(f.value - f.raw!.value) / f.raw!.value).toBeLessThan(0.01);
    expectClose(f.value - 0.06, (strength / (2000 + strength)) * (prior.alpha / strength - 0.06), FORMULA);
  });

  it('the overall slice uses the same prior on the pooled audit', () => {
    const f = report.overall.floor;
    expect(f.source).toBe('annotators');
    expect(f.audited).toBe(4405);
    expectClose(f.raw!.value, overallRaw, EXACT);
    expectClose(f.value, posterior(298, 4405), FORMULA);
  });

  it('the avoidable-bias gap is measured against the shrunk floor', () => {
    const s = slices.L1;
    // train error 200/2000 = 0.1
    expectClose(s.gaps.avoidable_bias!.value, 0.1 - s.floor.value, EXACT);
  });
});

describe('floor table precedence: a floor-table slice keeps its table floor despite an audit', () => {
  // fixture (hand-built): invented numbers. Slice T took floor-table entry 0 (floor 2 %) on every row;
  // A and B took the default floor; all three have audits.
  const cells: Cell[] = [
    ...auditedSlice(
      { line: 'T' },
      { train: { rows: 2000, errors: 200, floor: 0.02, entry: 0 }, dev: { rows: 2000, errors: 220, floor: 0.02, entry: 0 } },
      panelAudit(300, 30),
    ),
    ...auditedSlice({ line: 'A' }, ROWS, panelAudit(300, 9)),
    ...auditedSlice({ line: 'B' }, ROWS, panelAudit(300, 21)),
    // Z: annotator columns given, but no row of Z was audited
    ...auditedSlice({ line: 'Z' }, ROWS, zeroAuditSums(3, 2)),
  ];
  const slices = bySlice(buildReport(cellsOf(cells), ['line'], [], CONTEXT, options()));
  const prior = fitBetaPrior([
    { x: 30, n: 300 },
    { x: 9, n: 300 },
    { x: 21, n: 300 },
  ]);

  it('table > annotators: T has source table, value 0.02, no rule, no raw', () => {
    const f = slices.T.floor;
    expect(f.source).toBe('table');
    expectClose(f.value, 0.02, EXACT);
    expect(f.rule).toBeNull();
    expect(f.raw).toBeNull();
    expect(f.n).toBeNull();
  });

  it('the other slices take annotator floors (prior fitted over the three audits, T included)', () => {
    expect(slices.A.floor.source).toBe('annotators');
    expectClose(slices.A.floor.value, (9 + prior.alpha) / (300 + prior.alpha + prior.beta), FORMULA);
    expectClose(slices.B.floor.value, (21 + prior.alpha) / (300 + prior.alpha + prior.beta), FORMULA);
  });

  it('a slice with no audited row takes the prior: mean α/(α + β), n = α + β, no raw rate', () => {
    const f = slices.Z.floor;
    expect(f.source).toBe('annotators');
    expect(f.audited).toBe(0);
    expect(f.raw).toBeNull();
    expectClose(f.value, prior.alpha / (prior.alpha + prior.beta), FORMULA);
    expectClose(f.n, prior.alpha + prior.beta, 1e-9);
  });
});

describe('typical and best rules on the same audits', () => {
  // fixture (hand-built): invented audits of four slices. Panel sums are the same for all (40 panel rows,
  // 2 majority errors); the single-annotator counts differ.
  function audit(audited: number, annRows: number[], annErrors: number[]): AuditSums {
    const third = annRows[2] > 0 ? [37, 3, 0] : [0, 0, 0];
    return { audited, panelRows: 40, panelErrors: 2, agreeSum: 30, annRows, annErrors, classCounts: [[36, 4, 0], [38, 2, 0], third] };
  }
  const AUDITS: Record<string, AuditSums> = {
    M1: audit(120, [100, 80, 50], [10, 4, 5]),
    M2: audit(60, [60, 60, 60], [3, 6, 9]),
    M3: audit(220, [200, 100, 0], [30, 12, 0]),
    M4: audit(120, [50, 100, 40], [5, 10, 4]),
  };
  // hand-computed rule counts (x, n):
  // typical pools every single label: M1 (10+4+5, 100+80+50) = (19, 230); M2 (18, 180); M3 (42, 300); M4 (19, 190)
  // best takes the annotator with the lowest error rate (first one on a tie; none with 0 rows):
  // M1 rates .10/.05/.10 → (4, 80); M2 .05/.10/.15 → (3, 60); M3 .15/.12/– → (12, 100);
  // M4 .10/.10/.10 tie → the first, (5, 50)
  const COUNTS: Record<FloorRule, Record<string, { x: number; n: number }>> = {
    panel: { M1: { x: 2, n: 40 }, M2: { x: 2, n: 40 }, M3: { x: 2, n: 40 }, M4: { x: 2, n: 40 } },
    typical: { M1: { x: 19, n: 230 }, M2: { x: 18, n: 180 }, M3: { x: 42, n: 300 }, M4: { x: 19, n: 190 } },
    best: { M1: { x: 4, n: 80 }, M2: { x: 3, n: 60 }, M3: { x: 12, n: 100 }, M4: { x: 5, n: 50 } },
  };
  const cells: Cell[] = Object.entries(AUDITS).flatMap(([line, a]) => auditedSlice({ line }, ROWS, a));

  for (const rule of ['typical', 'best', 'panel'] as const) {
    it(`${rule}: ruleCounts, raw rate and posterior per slice`, () => {
      const slices = bySlice(buildReport(cellsOf(cells), ['line'], [], CONTEXT, options({ floorRule: rule })));
      const prior = fitBetaPrior(Object.values(COUNTS[rule]));
      for (const [line, { x, n }] of Object.entries(COUNTS[rule])) {
        expect(ruleCounts(AUDITS[line], rule), `${rule} ${line}`).toEqual({ x, n });
        const f = slices[line].floor;
        expect(f.rule).toBe(rule);
        expect(f.source).toBe('annotators');
        expect(f.audited).toBe(AUDITS[line].audited);
        expect(f.raw!.n).toBe(n);
        expectClose(f.raw!.value, x / n, EXACT);
        expectClose(f.value, (x + prior.alpha) / (n + prior.alpha + prior.beta), FORMULA);
      }
    });
  }

  it('best is never above typical in raw terms (hand-computed: 0.05 ≤ 0.0826, …)', () => {
    for (const line of Object.keys(AUDITS)) {
      const t = COUNTS.typical[line];
      const b = COUNTS.best[line];
      expect(b.x / b.n).toBeLessThanOrEqual(t.x / t.n);
    }
  });

  it('an audit without any label gives no rule counts (each rule null)', () => {
    const none: AuditSums = { ...AUDITS.M3, panelRows: 0, annRows: [0, 0, 0] };
    expect(ruleCounts(none, 'panel')).toBeNull();
    expect(ruleCounts(none, 'typical')).toBeNull();
    expect(ruleCounts(none, 'best')).toBeNull();
  });
});

describe('the bias gap: an estimated floor widens the interval', () => {
  // fixture (hand-built): the panel slices of the first block again; slice L4 (raw 12/400)
  const AUDITS: Record<string, [number, number]> = {
    L1: [5, 2],
    L2: [2000, 120],
    L3: [400, 4],
    L4: [400, 12],
    L5: [400, 20],
    L6: [400, 32],
    L7: [400, 48],
    L8: [400, 60],
  };
  const cells: Cell[] = Object.entries(AUDITS).flatMap(([line, [n, x]]) => auditedSlice({ line }, ROWS, panelAudit(n, x)));
  const estimated = bySlice(buildReport(cellsOf(cells), ['line'], [], CONTEXT, options())).L4;
  // the same slice with the same floor value given exactly (default floor, no audit, no n)
  const v = estimated.floor.value;
  const exact = buildReport(
    cellsOf(sliceCells({ line: 'L4' }, { train: { rows: 2000, errors: 200, floor: v }, dev: { rows: 2000, errors: 220, floor: v } })),
    ['line'],
    [],
    CONTEXT,
    options(),
  ).slices[0];

  it('same floor, same gap value', () => {
    expect(exact.floor.source).toBe('default');
    expect(exact.floor.n).toBeNull();
    expectClose(exact.floor.value, v, EXACT);
    expectClose(estimated.gaps.avoidable_bias!.value, exact.gaps.avoidable_bias!.value, 1e-15);
  });

  it('the interval is wider with the estimated floor (Newcombe vs Wilson of the train error alone)', () => {
    const e = estimated.gaps.avoidable_bias!;
    const x = exact.gaps.avoidable_bias!;
    const widthEstimated = e.hi! - e.lo!;
    const widthExact = x.hi! - x.lo!;
    // observed: 0.0441 (estimated, floor n = 400 + α + β ≈ 424.3) vs 0.0263 (exact): 1.67 times as wide
    expect(widthEstimated).toBeGreaterThan(widthExact);
    expect(widthEstimated / widthExact).toBeGreaterThan(1.5);
    // both hold the gap value
    for (const g of [e, x]) expect(g.lo! < g.value && g.value < g.hi!).toBe(true);
  });
});
