/**
 * Property-based tests (fast-check) of the slice report: random small cell sets built with the
 * hand-made cell builders of test/helpers/cells.ts go through the real code path (buildReport: rollup,
 * triage, FDR, ranking); random small prediction tables go through the whole CLI in-process (runMain).
 * Every property uses a fixed seed, so a failure reproduces. Identities are checked against their
 * definition (docs/method.md, "Rows, cells and slices" and "Headroom").
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { CellRecord as Cell } from '../helpers/cell-records.js';
import type { Split } from '../../src/core/split.js';
import { renderJson } from '../../src/render/json.js';
import { buildReport } from '../../src/triage/report.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { CONTEXT, options, sliceCells, type RowsSpec, type SliceSpec } from '../helpers/cells.js';
import { runMain } from '../helpers/run-main.js';
import { cellsOf as tableOf } from '../helpers/cell-records.js';

/** Floor-table entries of a case: entry k has floor floors[k] and sample size ns[k] (null: exact). */
interface Entries {
  readonly defaultFloor: number;
  readonly floors: readonly number[];
  readonly ns: readonly (number | null)[];
}

/** One block of rows as drawn: the floor entry is an index into Entries (−1: the default floor). */
interface Block {
  readonly rows: number;
  readonly errorShare: number;
  readonly weight: number;
  readonly entry: number;
}

/** A block of 1 to 400 rows, some of them errors, with one weight and one floor entry. */
const block = (weights: fc.Arbitrary<number>): fc.Arbitrary<Block> =>
  fc.record({
    rows: fc.integer({ min: 1, max: 400 }),
    errorShare: fc.oneof(fc.constantFrom(0, 1), fc.double({ min: 0, max: 1, noNaN: true })),
    weight: weights,
    entry: fc.integer({ min: -1, max: 2 }),
  });

/** Per split: absent (undefined) or one to three blocks. train and dev are present more often. */
const sliceBlocks = (weights: fc.Arbitrary<number>) => {
  const blocks = fc.array(block(weights), { minLength: 1, maxLength: 3 });
  const often = fc.option(blocks, { freq: 6, nil: undefined });
  const sometimes = fc.option(blocks, { freq: 2, nil: undefined });
  return fc.record({ train: often, train_dev: sometimes, dev: often, test: sometimes });
};

type SliceBlocks = Partial<Record<Split, Block[] | undefined>>;

/** A case: floor entries and 1 to 6 slices `station=S1…`; the first slice always has train and dev rows. */
const cellCase = (weights: fc.Arbitrary<number>, floors: fc.Arbitrary<number>) =>
  fc.record({
    entries: fc.record({
      defaultFloor: floors,
      floors: fc.array(floors, { minLength: 3, maxLength: 3 }),
      ns: fc.array(fc.option(fc.integer({ min: 5, max: 5000 }), { nil: null }), { minLength: 3, maxLength: 3 }),
    }),
    first: fc.record({ train: fc.array(block(weights), { minLength: 1, maxLength: 3 }), dev: fc.array(block(weights), { minLength: 1, maxLength: 3 }) }),
    others: fc.array(sliceBlocks(weights), { minLength: 0, maxLength: 5 }),
  });

/** Weights as a weight column gives them: 1 (no column), small integers, or any positive number. */
const anyWeight = fc.oneof(fc.constant(1), fc.integer({ min: 1, max: 5 }), fc.double({ min: 0.01, max: 100, noNaN: true }));
/** Floors in [0, 0.3]. */
const anyFloor = fc.oneof(fc.constant(0), fc.double({ min: 0, max: 0.3, noNaN: true }));

function toSpec(b: Block, entries: Entries): RowsSpec {
  const errors = Math.round(b.errorShare * b.rows);
  if (b.entry < 0) return { rows: b.rows, errors, weight: b.weight, floor: entries.defaultFloor, entry: -1, floorN: null };
  return { rows: b.rows, errors, weight: b.weight, floor: entries.floors[b.entry], entry: b.entry, floorN: entries.ns[b.entry] };
}

/** The cells of a case, through the hand-made cell builders (test/helpers/cells.ts). */
function cellsOf(c: { entries: Entries; first: SliceBlocks; others: readonly SliceBlocks[] }): Cell[] {
  return [c.first, ...c.others].flatMap((slice, i) => {
    const spec: SliceSpec = Object.fromEntries(
      (Object.entries(slice) as [Split, Block[] | undefined][]).filter(([, b]) => b !== undefined).map(([split, b]) => [split, b!.map((x) => toSpec(x, c.entries))]),
    );
    return sliceCells({ station: `S${i + 1}` }, spec);
  });
}

function describeCase(cells: readonly Cell[]): string {
  return JSON.stringify(cells.map((c) => [c.key.station, c.split, c.rows, c.weight, c.errors, c.floorSum, c.floorEntry, c.floorN]));
}

describe('report properties on random cells (buildReport)', () => {
  /**
   * Definition (docs/method.md, "Headroom"): headroom = share × (train − floor) + share × (train_dev −
   * train) + share × (dev − train_dev), the total being the sum of its parts; each part is the share
   * times its gap, and the sum telescopes to share × (dev − floor).
   */
  it('(a) headroom parts sum to the total, each part is share × its gap, and the total is share × (dev − floor)', () => {
    const seen = { slices: 0, mismatch: 0, uncertainFloor: 0, noHeadroom: 0 };
    fc.assert(
      fc.property(cellCase(anyWeight, anyFloor), (c) => {
        const cells = cellsOf(c);
        const report = buildReport(tableOf(cells), ['station'], [], CONTEXT, options());
        const checked = [report.overall, ...report.slices].filter((s) => s.headroom !== null);
        seen.slices += checked.length;
        seen.noHeadroom += report.slices.length - checked.length + 1;
        seen.mismatch += checked.filter((s) => s.headroom!.mismatch !== null).length;
        seen.uncertainFloor += checked.filter((s) => s.floor.n !== null).length;
        // the first slice has train and dev rows, so the overall slice always has a headroom
        expect(report.overall.headroom, describeCase(cells)).not.toBeNull();
        for (const s of checked) {
          const h = s.headroom!;
          const why = `${s.label}: ${JSON.stringify(h)}; cells ${describeCase(cells)}`;
          // definition: the total is the sum of its parts
          expect(Math.abs(h.bias + h.variance + (h.mismatch ?? 0) - h.total), why).toBeLessThanOrEqual(1e-12);
          // definition: each part is share × its gap
          expect(Math.abs(h.bias - s.share * s.gaps.avoidable_bias!.value), why).toBeLessThanOrEqual(1e-12);
          expect(Math.abs(h.variance - s.share * s.gaps.variance!.value), why).toBeLessThanOrEqual(1e-12);
          if (h.mismatch !== null) expect(Math.abs(h.mismatch - s.share * s.gaps.mismatch!.value), why).toBeLessThanOrEqual(1e-12);
          // definition: the parts telescope to share × (dev − floor)
          expect(Math.abs(h.total - s.share * (s.error.dev!.value - s.floor.value)), why).toBeLessThanOrEqual(1e-12);
        }
      }),
      { seed: 42 },
    );
    // the generator reaches the cases that matter: a mismatch part, a floor with a sample size, no headroom
    expect(seen.mismatch).toBeGreaterThan(0);
    expect(seen.uncertainFloor).toBeGreaterThan(0);
    expect(seen.noHeadroom).toBeGreaterThan(0);
  });

  /**
   * Definition (docs/method.md, "Headroom": share = the slice's weighted dev rows ÷ all weighted dev
   * rows): when the slices of one column partition the rows, overall dev error = Σ_s share_s × dev_s
   * (the weighted mean of a partition; a slice without dev rows has share 0), and the shares sum to 1.
   */
  it('(b) one `by` column: overall dev error is the share-weighted sum of the slice dev errors', () => {
    fc.assert(
      fc.property(cellCase(anyWeight, anyFloor), (c) => {
        const cells = cellsOf(c);
        const report = buildReport(tableOf(cells), ['station'], [], CONTEXT, options());
        const why = describeCase(cells);
        // every station is a slice: the slices partition the cells
        expect(report.slices.map((s) => s.label).sort(), why).toEqual(
          [...new Set(cells.map((x) => `station=${x.key.station}`))].sort(),
        );
        let weighted = 0;
        let shares = 0;
        for (const s of report.slices) {
          shares += s.share;
          if (s.error.dev === null) expect(s.share, why).toBe(0);
          else weighted += s.share * s.error.dev.value;
        }
        expect(Math.abs(shares - 1), why).toBeLessThanOrEqual(1e-9);
        expect(Math.abs(weighted - report.overall.error.dev!.value), why).toBeLessThanOrEqual(1e-9);
      }),
      { seed: 42 },
    );
  });

  /**
   * Definition (docs/method.md, "Rows, cells and slices": the sums are additive, "any slice (a union of cells) is a sum over its cells"):
   * the report is a function of the cells' sums, so their order does not matter. Unit weights and
   * dyadic floors keep every sum exact, so the reports must be equal, not merely close.
   */
  it('(c) reordering the cells never changes the report', () => {
    const dyadicFloor = fc.constantFrom(0, 0.5, 0.25, 0.125, 0.0625, 0.03125, 0.015625);
    const withOrder = cellCase(fc.constant(1), dyadicFloor).chain((c) => {
      const cells = cellsOf(c);
      return fc.tuple(fc.constant(cells), fc.shuffledSubarray(cells, { minLength: cells.length, maxLength: cells.length }));
    });
    fc.assert(
      fc.property(withOrder, ([cells, shuffled]) => {
        const a = buildReport(tableOf(cells), ['station'], [], CONTEXT, options());
        const b = buildReport(tableOf(shuffled), ['station'], [], CONTEXT, options());
        expect(b, describeCase(shuffled)).toEqual(a);
      }),
      { seed: 42 },
    );
  });
});

/** A copy of `value` with every −0 replaced by 0, every other number (NaN and infinities too) kept. */
function withoutNegativeZero(value: unknown): unknown {
  if (Object.is(value, -0)) return 0;
  if (Array.isArray(value)) return value.map(withoutNegativeZero);
  if (value !== null && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, withoutNegativeZero(v)]));
  return value;
}

describe('the JSON of a report over the whole input domain (buildReport → renderJson)', () => {
  /**
   * Contract (docs/method.md, "Weights" and "Labelling cost"; renderJson writes a non-finite number as
   * null): weights of 0 or 1e-100 to 1e100 and costs of 1e-12 to 1e12 keep every computed number finite,
   * so the JSON parses back equal to the report: no number turned into null on the way.
   */
  it('(d) parses back equal to the report: no computed number is NaN or infinite (weights 0, 1e-100 … 1e100; costs 1e-12 … 1e12; flat curves)', () => {
    const extremeWeight = fc.oneof(fc.constantFrom(0, 1e-100, 1e100, 1), fc.double({ min: 1e-100, max: 1e100, noNaN: true }));
    const cost = fc.option(fc.oneof(fc.constantFrom(1e-12, 1e12), fc.double({ min: 1e-12, max: 1e12, noNaN: true })), { nil: undefined });
    // curve exponents down to 1e-4: a curve that flat needs more rows than a double holds to halve a gap
    const beta = fc.oneof(fc.constantFrom(0.5, 1e-4), fc.double({ min: 1e-4, max: 3, noNaN: true }));
    const withCosts = fc.tuple(cellCase(extremeWeight, anyFloor), fc.array(cost, { minLength: 6, maxLength: 6 }), fc.double({ min: 1e-12, max: 1e12, noNaN: true }), beta);
    let reports = 0;
    fc.assert(
      fc.property(withCosts, ([c, costs, labelCost, curveExponent]) => {
        // slice i's rows cost costs[i] (a cost-table entry) or --label-cost
        const cells = cellsOf(c).map((x) => {
          const k = Number(x.key.station!.slice(1)) - 1;
          const perRow = costs[k];
          return perRow === undefined ? x : { ...x, costSum: x.weight * perRow, costWeight: x.weight };
        });
        const total = (split: Split) => cells.filter((x) => x.split === split).reduce((a, x) => a + x.weight, 0);
        // a split whose rows all weigh 0 is an input error (docs/method.md, "Weights")
        fc.pre(total('train') > 0 && total('dev') > 0);
        reports += 1;
        const report = buildReport(tableOf(cells), ['station'], [], CONTEXT, options({ labelCost, curveExponent }));
        // JSON has no −0 (it parses back as 0); every other number must come back as it was
        expect(JSON.parse(renderJson(report)), describeCase(cells)).toEqual(withoutNegativeZero(report));
      }),
      { seed: 42 },
    );
    expect(reports).toBeGreaterThan(50);
  });
});

describe('report properties through the CLI (runMain)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'floorgap-props-'));
  const env = { XDG_CACHE_HOME: join(dir, 'cache') };
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  const CLASSES = ['good', 'void', 'bridge'] as const;
  /** A row: split, station, label, pred (the id is its position in the original table). */
  const row = fc.record({
    split: fc.constantFrom('train', 'dev'),
    station: fc.constantFrom('S1', 'S2', 'S3', 'S4'),
    label: fc.constantFrom(...CLASSES),
    pred: fc.constantFrom(...CLASSES),
  });
  type Row = { split: string; station: string; label: string; pred: string };
  /** 2 to 60 rows, the first a train row and the second a dev row (a table needs both splits). */
  const table = fc
    .tuple(row, row, fc.array(row, { minLength: 0, maxLength: 58 }))
    .map(([a, b, rest]): Row[] => [{ ...a, split: 'train' }, { ...b, split: 'dev' }, ...rest])
    .chain((rows) => {
      const ids = rows.map((_, i) => i);
      return fc.tuple(fc.constant(rows), fc.shuffledSubarray(ids, { minLength: ids.length, maxLength: ids.length }));
    });

  const csv = (rows: readonly Row[], order: readonly number[]) =>
    ['id,split,station,label,pred', ...order.map((i) => `${i + 1},${rows[i].split},${rows[i].station},${rows[i].label},${rows[i].pred}`)].join('\n') + '\n';

  /** The report without `source`, the one field that names the input file (path, size, time). */
  function withoutSource(stdout: string): Omit<Report, 'source'> {
    const { source: _source, ...rest } = JSON.parse(stdout) as Report;
    return rest;
  }

  let runNo = 0;
  let reports = 0;
  /**
   * Definition (docs/method.md, "Rows, cells and slices": every number comes from sums over rows, which are additive):
   * the rows of a table are a multiset, so shuffling the lines of the file never changes the report.
   */
  it(
    '(c) shuffling the rows of a CSV table never changes the JSON report (25 tables)',
    async () => {
      await fc.assert(
        fc.asyncProperty(table, async ([rows, order]) => {
          runNo += 1;
          const original = join(dir, `t${runNo}.csv`);
          const shuffled = join(dir, `t${runNo}-shuffled.csv`);
          writeFileSync(original, csv(rows, rows.map((_, i) => i)));
          writeFileSync(shuffled, csv(rows, order));
          const args = ['--format', 'json', '--no-cache', '--slice-cols', 'station'];
          const a = await runMain(['report', original, ...args], env);
          const b = await runMain(['report', shuffled, ...args], env);
          const why = `original:\n${csv(rows, rows.map((_, i) => i))}\nstderr: ${a.stderr}${b.stderr}`;
          expect(b.code, why).toBe(a.code);
          if (a.code !== 0) {
            // the same failure, naming its own file
            expect(b.stderr.replaceAll(shuffled, 'FILE'), why).toBe(a.stderr.replaceAll(original, 'FILE'));
            return;
          }
          reports += 1;
          const ra = withoutSource(a.stdout);
          expect(ra.slices.length, why).toBeGreaterThan(0);
          expect(withoutSource(b.stdout), why).toEqual(ra);
        }),
        { seed: 42, numRuns: 25 },
      );
      // the tables hold both splits: (nearly) every run gives a report, so the property compares reports
      expect(reports).toBeGreaterThanOrEqual(20);
    },
    60_000,
  );

  it('the generated tables are valid: the first one gives a report (exit 0)', async () => {
    const [[rows]] = fc.sample(table, { seed: 42, numRuns: 1 });
    const path = join(dir, 'first.csv');
    writeFileSync(path, csv(rows, rows.map((_, i) => i)));
    const r = await runMain(['report', path, '--format', 'json', '--no-cache', '--slice-cols', 'station'], env);
    expect(r.code, r.stderr).toBe(0);
    const report = JSON.parse(r.stdout) as Report;
    // fixture (generated): every station present in the rows is a slice
    expect(report.slices.map((s: SliceReport) => s.key.station).sort()).toEqual([...new Set(rows.map((x) => x.station))].sort());
  });
});
