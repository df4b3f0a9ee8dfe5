import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { demoFloorCsvLines, demoRowToCsvLine, demoRowsToCsvLines } from '../../src/demo/csv.js';
import { generateDemoRows } from '../../src/demo/draws.js';
import {
  DEMO_AUDIT,
  DEMO_CLASSES,
  DEMO_COLUMNS,
  DEMO_DEFAULTS,
  DEMO_DISTRIBUTIONS,
  DEMO_FLOORS,
  DEMO_INSPECTORS,
  DEMO_MAX_RUNS,
  DEMO_PACKAGES,
  DEMO_PLANTS,
  demoColumns,
  demoErrorProbability,
  demoFloorTable,
  demoInspectorErrorProbability,
  demoInteractionEffect,
  demoRunTrainRows,
  type DemoClass,
  type DemoInspector,
  type DemoLighting,
  type DemoPackage,
  type DemoRow,
  type DemoSplit,
  type DemoStation,
} from '../../src/demo/scenario.js';
import { Random, deriveSeed } from '../../src/demo/random.js';
import { quoteField } from '../../src/render/csv.js';

const take = (rows: number, seed: number): DemoRow[] => [...generateDemoRows({ rows, seed })];

const SPLITS: readonly DemoSplit[] = ['train', 'train_dev', 'dev', 'test'];
const STATIONS: readonly DemoStation[] = ['S1', 'S2', 'S3', 'S4', 'S5', 'S6'];
const LIGHTINGS: readonly DemoLighting[] = ['ring', 'coaxial', 'dome', 'low-angle'];

// One large sample for tight statistical checks, and the shipped sample (DEMO_DEFAULTS; write-demo.test.ts
// checks that data-samples/solder-joints.csv is exactly these rows).
const BIG_ROWS = 200_000;
const BIG_SEED = 11;
const BIG = take(BIG_ROWS, BIG_SEED);
const SHIPPED = take(DEMO_DEFAULTS.rows, DEMO_DEFAULTS.seed);

/**
 * Tolerance of the statistical checks, in binomial standard errors. The samples are seeded, so the checks
 * are deterministic; 4 SE keeps them from breaking on a change of seed or sample size, while a missing or
 * misplaced plant (wrong slice, wrong split, wrong station mix) is still many SE away at BIG_ROWS. Effect
 * sizes are read from the constants here and pinned by the literal checks.
 */
const Z = 4;

type Filter = (r: DemoRow) => boolean;
const all: Filter = () => true;
const inSplit = (rows: readonly DemoRow[], split: DemoSplit, f: Filter = all) =>
  rows.filter((r) => r.split === split && f(r));
const errorRate = (rows: readonly DemoRow[]) => rows.filter((r) => r.pred !== r.label).length / rows.length;
/** binomial standard error of a share `p` estimated from `n` rows */
const binomialSe = (p: number, n: number) => Math.sqrt((p * (1 - p)) / n);

type EffectPlant = 'avoidableBias' | 'mismatch' | 'variance' | 'interaction';
type PlantedRow = Pick<DemoRow, 'split' | 'station' | 'lighting' | 'package'>;

/**
 * The interaction's four cells as DEMO_PLANTS.interaction documents them (independently of
 * demoInteractionEffect, which writes it as a product): +effect on the pair, −effect · P(b) / (1 − P(b))
 * on the rest of its station, −effect · P(a) / (1 − P(a)) on the rest of its lighting, +effect · P(a) P(b)
 * / ((1 − P(a)) (1 − P(b))) elsewhere; P the training shares; 0 on 0201; `p + it` kept within [0, cap].
 */
function plantedInteraction(r: PlantedRow, p: number): number {
  const { columns, values, effect, splits } = DEMO_PLANTS.interaction;
  if (r.package === DEMO_PLANTS.atFloor.value || !splits.includes(r.split)) return 0;
  const pa = DEMO_DISTRIBUTIONS.stationTraining[values[0]];
  const pb = DEMO_DISTRIBUTIONS.lighting[values[1]];
  const inA = r[columns[0]] === values[0];
  const inB = r[columns[1]] === values[1];
  const e = inA && inB ? effect : inA ? (-effect * pb) / (1 - pb) : inB ? (-effect * pa) / (1 - pa) : (effect * pa * pb) / ((1 - pa) * (1 - pb));
  return Math.min(Math.max(p + e, 0), DEMO_PLANTS.errorCap) - p;
}

/**
 * A row's planted error probability, rebuilt from the exported constants as DEMO_PLANTS documents it
 * (independently of demoErrorProbability): the package floor, plus each effect whose column value and
 * split match, none at all for the at-floor package, capped, plus the interaction (taken on the row's
 * probability with every other effect). `omit` leaves one effect out; `fraction` is the run's n_r / n_R,
 * which scales the variance effect along its learning curve.
 */
function planted(r: PlantedRow, omit?: EffectPlant, fraction = 1): number {
  const full = withoutInteraction(r, undefined, fraction);
  if (omit === 'interaction') return full;
  return withoutInteraction(r, omit, fraction) + plantedInteraction(r, full);
}

/** {@link planted} without the interaction: what the main stream draws with. */
function withoutInteraction(r: PlantedRow, omit?: EffectPlant, fraction = 1): number {
  const { avoidableBias, atFloor, mismatch, variance, errorCap } = DEMO_PLANTS;
  const floor = DEMO_FLOORS[r.package].floor;
  if (r.package === atFloor.value) return floor;
  let p = floor;
  if (omit !== 'avoidableBias' && r.package === avoidableBias.value && avoidableBias.splits.includes(r.split)) {
    p += avoidableBias.effect;
  }
  if (omit !== 'mismatch' && r.station === mismatch.value && mismatch.splits.includes(r.split)) p += mismatch.effect;
  if (omit !== 'variance' && r.lighting === variance.value && variance.splits.includes(r.split)) {
    p += variance.effect * Math.pow(fraction, -variance.curveExponent);
  }
  return Math.min(p, errorCap);
}

/**
 * The rows' planted expectation: `mean` is their mean planted error probability (without `omit`), the
 * expectation of their error rate; `se` the standard error of that rate (independent Bernoulli draws with
 * their full planted probabilities).
 */
function plantedStats(rows: readonly DemoRow[], omit?: EffectPlant): { mean: number; se: number } {
  let sum = 0;
  let variance = 0;
  for (const r of rows) {
    const p = planted(r);
    sum += omit === undefined ? p : planted(r, omit);
    variance += p * (1 - p);
  }
  return { mean: sum / rows.length, se: Math.sqrt(variance) / rows.length };
}

/** The rows' error rate is within Z SE of `expected` (at least `minRows` rows, so the check means something). */
function expectRate(rows: readonly DemoRow[], expected: number, se: number, label: string, minRows = 100): void {
  expect(rows.length, `${label}: rows`).toBeGreaterThanOrEqual(minRows);
  const rate = errorRate(rows);
  expect(Math.abs(rate - expected), `${label}: error ${rate} vs ${expected} ± ${Z}·${se}`).toBeLessThan(Z * se);
}

/** The rows' error rate minus their planted rate without `plant` is within Z SE of `effect`. */
function expectEffect(rows: readonly DemoRow[], plant: EffectPlant, effect: number, label: string): void {
  const { mean, se } = plantedStats(rows, plant);
  expectRate(rows, mean + effect, se, label);
}

/** Groups rows by `key`, keeping the groups in first-seen order. */
function groupBy(rows: readonly DemoRow[], key: (r: DemoRow) => string): Map<string, DemoRow[]> {
  const groups = new Map<string, DemoRow[]>();
  for (const r of rows) {
    const k = key(r);
    const group = groups.get(k);
    if (group) group.push(r);
    else groups.set(k, [r]);
  }
  return groups;
}

/** The share of rows matching `f` is within Z binomial SE of `p`. */
function expectShare(rows: readonly DemoRow[], f: Filter, p: number, label: string): void {
  const share = rows.filter(f).length / rows.length;
  expect(Math.abs(share - p), `${label}: share ${share} vs ${p}`).toBeLessThan(Z * binomialSe(p, rows.length));
}

const isAtFloorPackage: Filter = (r) => r.package === DEMO_PLANTS.atFloor.value;
const isBiasPackage: Filter = (r) => r.package === DEMO_PLANTS.avoidableBias.value;
const isMismatchStation: Filter = (r) => r.station === DEMO_PLANTS.mismatch.value;
const isVarianceLighting: Filter = (r) => r.lighting === DEMO_PLANTS.variance.value;
/** outside the station and lighting plants */
const clean: Filter = (r) => !isMismatchStation(r) && !isVarianceLighting(r);

describe('Random', () => {
  it('repeats a stream for a seed and differs across seeds', () => {
    const a = new Random(7);
    const b = new Random(7);
    const c = new Random(8);
    const xa = Array.from({ length: 5 }, () => a.uniform());
    expect(Array.from({ length: 5 }, () => b.uniform())).toEqual(xa);
    expect(Array.from({ length: 5 }, () => c.uniform())).not.toEqual(xa);
    for (const x of xa) expect(x >= 0 && x < 1).toBe(true);
  });

  it('gives sane choice and normal draws', () => {
    const r = new Random(3);
    const n = 20_000;
    let hits = 0;
    for (let i = 0; i < n; i++) if (r.choice(['a', 'b'], [3, 1]) === 'a') hits++;
    expect(Math.abs(hits / n - 0.75)).toBeLessThan(Z * binomialSe(0.75, n));
    let sum = 0;
    let sq = 0;
    for (let i = 0; i < n; i++) {
      const x = r.normal(2, 0.5);
      sum += x;
      sq += x * x;
    }
    const mean = sum / n;
    expect(Math.abs(mean - 2)).toBeLessThan((Z * 0.5) / Math.sqrt(n));
    expect(Math.sqrt(sq / n - mean * mean)).toBeCloseTo(0.5, 1);
  });
});

describe('generateDemoRows: shape', () => {
  it('is deterministic for a seed and differs across seeds', () => {
    const a = take(500, 7);
    expect(take(500, 7)).toEqual(a);
    const b = take(500, 8);
    expect(b).not.toEqual(a);
    expect(b.filter((r, i) => r.label === a[i].label && r.package === a[i].package).length).toBeLessThan(400);
  });

  it('yields the requested number of rows with running ids', () => {
    const rows = take(1234, 5);
    expect(rows).toHaveLength(1234);
    expect(rows[0].id).toBe('J0000001');
    expect(rows[1233].id).toBe('J0001234');
    expect(new Set(rows.map((r) => r.id)).size).toBe(1234);
    expect(SHIPPED).toHaveLength(DEMO_DEFAULTS.rows);
    expect(SHIPPED.at(-1)?.id).toBe(`J${String(DEMO_DEFAULTS.rows).padStart(7, '0')}`);
  });

  it('rejects bad options', () => {
    expect(() => take(0, 7)).toThrow(/rows/);
    expect(() => take(1.5, 7)).toThrow(/rows/);
    expect(() => take(10, Number.NaN)).toThrow(/seed/);
    for (const runs of [0, 1.5, DEMO_MAX_RUNS + 1]) {
      expect(() => [...generateDemoRows({ rows: 10, seed: 7, runs })]).toThrow(/runs/);
    }
  });

  it('has exactly the documented columns with values in their domains', () => {
    expect([...DEMO_COLUMNS]).toEqual([
      'id', 'split', 'station', 'lighting', 'package', 'finish', 'shift', 'sharpness', 'label', 'pred', 'score',
      'insp_a', 'insp_b', 'insp_c',
    ]);
    expect(demoColumns()).toEqual(DEMO_COLUMNS);
    expect(demoColumns(1)).toEqual(DEMO_COLUMNS);
    expect(demoColumns(3)).toEqual([
      'id', 'split', 'run', 'station', 'lighting', 'package', 'finish', 'shift', 'sharpness', 'label', 'pred',
      'score', 'insp_a', 'insp_b', 'insp_c',
    ]);
    const inspOk = (r: DemoRow): boolean => {
      const labels = [r.insp_a, r.insp_b, r.insp_c];
      return labels.every((l) => l === null || DEMO_CLASSES.includes(l));
    };
    // plain checks over every row, one assertion at the end (an expect per cell would be slow)
    const inDomain = (r: DemoRow): boolean =>
      Object.keys(r).join() === DEMO_COLUMNS.join() &&
      /^J\d{7}$/.test(r.id) &&
      SPLITS.includes(r.split) &&
      STATIONS.includes(r.station) &&
      LIGHTINGS.includes(r.lighting) &&
      DEMO_PACKAGES.includes(r.package) &&
      ['HASL', 'ENIG', 'OSP'].includes(r.finish) &&
      ['day', 'swing', 'night'].includes(r.shift) &&
      DEMO_CLASSES.includes(r.label) &&
      DEMO_CLASSES.includes(r.pred) &&
      r.sharpness >= 0 &&
      r.sharpness <= 1 &&
      Math.round(r.sharpness * 1000) / 1000 === r.sharpness &&
      r.score >= 0 &&
      r.score <= 1 &&
      Math.round(r.score * 1000) / 1000 === r.score &&
      inspOk(r);
    expect(BIG.filter((r) => !inDomain(r)).slice(0, 3)).toEqual([]);
    expect(SHIPPED.filter((r) => !inDomain(r)).slice(0, 3)).toEqual([]);
  });

  it('serialises to CSV with the header first and no weight column', () => {
    const lines = [...demoRowsToCsvLines(take(3, 7))];
    expect(lines).toHaveLength(4);
    expect(lines[0]).toBe('id,split,station,lighting,package,finish,shift,sharpness,label,pred,score,insp_a,insp_b,insp_c');
    for (const line of lines.slice(1)) {
      const cells = line.split(',');
      expect(cells).toHaveLength(14);
      expect(cells[7]).toMatch(/^[01]\.\d{3}$/);
      expect(cells[10]).toMatch(/^[01]\.\d{3}$/);
    }
    expect([...demoRowsToCsvLines(take(3, 7), { header: false })]).toEqual(lines.slice(1));
    expect([...demoRowsToCsvLines([])]).toEqual([lines[0]]);
  });

  it('writes inspector labels as classes or empty fields, and the run column after split', () => {
    const audited = SHIPPED.find((r) => r.insp_a !== null && r.insp_b === null)!;
    const plain = SHIPPED.find((r) => r.insp_a === null && r.insp_b === null && r.insp_c === null)!;
    const [, a, b] = [...demoRowsToCsvLines([plain, audited])];
    expect(a.endsWith(',,,')).toBe(true);
    expect(b.split(',').slice(11)).toEqual([audited.insp_a, '', audited.insp_c ?? '']);
    const runs = [...demoRowsToCsvLines(generateDemoRows({ rows: 3, seed: 7, runs: 2 }))];
    expect(runs[0]).toBe(demoColumns(2).join(','));
    for (const line of runs.slice(1)) expect(line.split(',')[2]).toMatch(/^r[12]$/);
    // a table mixes no run and run rows
    expect(() => [...demoRowsToCsvLines([plain, { ...plain, run: 'r1' }])]).toThrow(/run/);
  });

  it("quotes CSV fields by the report's one rule (quoteField), which leaves every value of the scenario as is", () => {
    const { finish, shift } = DEMO_DISTRIBUTIONS;
    const values = [
      ...demoColumns(2),
      ...SPLITS,
      ...STATIONS,
      ...LIGHTINGS,
      ...DEMO_PACKAGES,
      ...Object.keys(finish),
      ...Object.keys(shift),
      ...DEMO_CLASSES,
      'J0000001',
      `r${DEMO_MAX_RUNS}`,
      '',
    ];
    for (const value of values) expect(quoteField(value), value).toBe(value);
    // values the scenario never draws: a TAB is quoted as in the report's CSV, and quotes are doubled
    const row: DemoRow = { ...SHIPPED[0], station: 'S\t1' as DemoStation, lighting: 'dome, "soft"' as DemoLighting };
    const start = `${row.id},${row.split},"S\t1","dome, ""soft""",${row.package},`;
    expect(demoRowToCsvLine(row).slice(0, start.length)).toBe(start);
  });

  it('lists the inspector floors', () => {
    const table = demoFloorTable();
    expect(table.map((f) => f.package)).toEqual([...DEMO_PACKAGES]);
    for (const f of table) {
      expect(f.floor).toBe(DEMO_FLOORS[f.package as keyof typeof DEMO_FLOORS].floor);
      expect(f.n).toBe(DEMO_FLOORS[f.package as keyof typeof DEMO_FLOORS].n);
    }
    // planted by the demo generator (our own scenario)
    expect([...demoFloorCsvLines()]).toEqual([
      'package,floor,n',
      '0201,0.12,600',
      '0402,0.04,500',
      '0603,0.03,450',
      'QFN,0.03,500',
      'BGA,0.05,550',
      'SOIC,0.02,400',
    ]);
  });
});

describe(`generateDemoRows: distributions (${BIG_ROWS} rows, seed ${BIG_SEED})`, () => {
  it('has share tables whose weights sum to 1', () => {
    const { split, stationTraining, stationProduction, lighting, package: pkg, finish, shift, label } =
      DEMO_DISTRIBUTIONS;
    for (const shares of [split, stationTraining, stationProduction, lighting, pkg, finish, shift, label]) {
      const weights: number[] = Object.values(shares);
      expect(weights.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
      for (const w of weights) expect(w).toBeGreaterThan(0);
    }
    expect(Object.keys(split)).toEqual([...SPLITS]);
    expect(Object.keys(stationTraining)).toEqual([...STATIONS]);
    expect(Object.keys(stationProduction)).toEqual([...STATIONS]);
    expect(Object.keys(pkg)).toEqual([...DEMO_PACKAGES]);
  });

  it('draws every column with its DEMO_DISTRIBUTIONS shares', () => {
    const d = DEMO_DISTRIBUTIONS;
    const tables = [
      ['split', d.split],
      ['lighting', d.lighting],
      ['package', d.package],
      ['finish', d.finish],
      ['shift', d.shift],
      ['label', d.label],
    ] as const;
    for (const [column, shares] of tables) {
      for (const [value, p] of Object.entries(shares)) {
        expectShare(BIG, (r) => r[column] === value, p as number, `${column} ${value}`);
      }
    }
    const training = BIG.filter((r) => r.split === 'train' || r.split === 'train_dev');
    const production = BIG.filter((r) => r.split === 'dev' || r.split === 'test');
    for (const s of STATIONS) {
      expectShare(training, (r) => r.station === s, d.stationTraining[s], `training station ${s}`);
      expectShare(production, (r) => r.station === s, d.stationProduction[s], `production station ${s}`);
    }
  });

  it('scores correct predictions high and leaves a tail of confident errors', () => {
    const right = BIG.filter((r) => r.pred === r.label);
    const wrong = BIG.filter((r) => r.pred !== r.label);
    const minScore = (rows: DemoRow[]) => rows.reduce((m, r) => Math.min(m, r.score), Infinity);
    expect(minScore(right)).toBeGreaterThanOrEqual(0.7);
    expect(minScore(wrong)).toBeGreaterThanOrEqual(0.25);
    expectShare(wrong, (r) => r.score >= 0.8, DEMO_DISTRIBUTIONS.confidentErrorShare, 'confident errors');
    const meanScore = (rows: DemoRow[]) => rows.reduce((s, r) => s + r.score, 0) / rows.length;
    expect(meanScore(right) - meanScore(wrong)).toBeGreaterThan(0.2);
  });

  it('makes sharpness continuous, lower for 0201, and free of its own error effect', () => {
    const { mean: sharpMean, meanFor0201, sd } = DEMO_DISTRIBUTIONS.sharpness;
    expect(new Set(BIG.map((r) => r.sharpness)).size).toBeGreaterThan(300);
    const mean = (rows: DemoRow[]) => rows.reduce((s, r) => s + r.sharpness, 0) / rows.length;
    const small = BIG.filter((r) => r.package === '0201');
    const rest = BIG.filter((r) => r.package !== '0201');
    expect(Math.abs(mean(small) - meanFor0201)).toBeLessThan((Z * sd) / Math.sqrt(small.length));
    expect(Math.abs(mean(rest) - sharpMean)).toBeLessThan((Z * sd) / Math.sqrt(rest.length));
    // Within one package and outside the plants, blurry and sharp images have the same error.
    const rows = BIG.filter((r) => r.package === '0402' && clean(r));
    const sorted = rows.map((r) => r.sharpness).sort((a, b) => a - b);
    const median = sorted[Math.floor(sorted.length / 2)];
    const low = rows.filter((r) => r.sharpness < median);
    const high = rows.filter((r) => r.sharpness >= median);
    const floor = DEMO_FLOORS['0402'].floor;
    const se = Math.hypot(binomialSe(floor, low.length), binomialSe(floor, high.length));
    expect(Math.abs(errorRate(low) - errorRate(high))).toBeLessThan(Z * se);
  });
});

describe('generateDemoRows: planted parameters', () => {
  // Literal values: planted by the demo generator (our own scenario). The statistical checks below read
  // DEMO_PLANTS, DEMO_FLOORS and DEMO_DISTRIBUTIONS, so they follow any change to them; these literals are
  // what make a silent parameter change fail.
  it('pins the defaults, split shares, plants and floors', () => {
    expect(DEMO_DEFAULTS).toEqual({ rows: 20_000, seed: 24, runs: 1, models: 1 });
    expect(DEMO_DISTRIBUTIONS.split).toEqual({ train: 0.4, train_dev: 0.2, dev: 0.2, test: 0.2 });
    expect(DEMO_PLANTS.avoidableBias).toEqual({
      column: 'package',
      value: 'QFN',
      effect: 0.08,
      splits: ['train', 'train_dev', 'dev', 'test'],
    });
    expect(DEMO_PLANTS.atFloor).toEqual({
      column: 'package',
      value: '0201',
      effect: 0,
      splits: ['train', 'train_dev', 'dev', 'test'],
    });
    expect(DEMO_PLANTS.mismatch).toEqual({
      column: 'station',
      value: 'S5',
      effect: 0.12,
      splits: ['dev', 'test'],
      trainingShare: 0.05,
      productionShare: 1 / 6,
    });
    expect(DEMO_PLANTS.variance).toEqual({
      column: 'lighting',
      value: 'low-angle',
      effect: 0.06,
      splits: ['train_dev', 'dev', 'test'],
      curveExponent: 0.5,
    });
    expect(DEMO_PLANTS.interaction).toEqual({
      columns: ['station', 'lighting'],
      values: ['S6', 'dome'],
      effect: 0.12,
      splits: ['train', 'train_dev', 'dev', 'test'],
    });
    expect(DEMO_PLANTS.errorCap).toBe(0.95);
    expect(DEMO_DISTRIBUTIONS.stationTraining.S5).toBe(0.05);
    expect(DEMO_DISTRIBUTIONS.stationProduction.S5).toBe(1 / 6);
    expect(DEMO_FLOORS['0201'].floor).toBe(0.12);
    expect(DEMO_FLOORS.QFN.floor).toBe(0.03);
  });

  it('computes row error probabilities as floor + additive effects, none for 0201', () => {
    // planted by the demo generator (our own scenario)
    const base = { station: 'S1', lighting: 'ring', package: '0603' } as const;
    expect(demoErrorProbability({ ...base, split: 'dev' })).toBeCloseTo(0.03, 10);
    expect(demoErrorProbability({ ...base, package: 'QFN', split: 'train' })).toBeCloseTo(0.11, 10);
    expect(demoErrorProbability({ ...base, station: 'S5', split: 'train_dev' })).toBeCloseTo(0.03, 10);
    expect(demoErrorProbability({ ...base, station: 'S5', split: 'test' })).toBeCloseTo(0.15, 10);
    expect(demoErrorProbability({ ...base, lighting: 'low-angle', split: 'train' })).toBeCloseTo(0.03, 10);
    expect(demoErrorProbability({ ...base, lighting: 'low-angle', split: 'train_dev' })).toBeCloseTo(0.09, 10);
    expect(
      demoErrorProbability({ station: 'S5', lighting: 'low-angle', package: 'QFN', split: 'dev' }),
    ).toBeCloseTo(0.03 + 0.08 + 0.12 + 0.06, 10);
    expect(demoErrorProbability({ station: 'S5', lighting: 'low-angle', package: '0201', split: 'test' })).toBe(0.12);
    // learning curve: a run on a quarter of the training rows has 0.06 · 4^0.5 = 0.12 variance excess
    expect(demoErrorProbability({ ...base, lighting: 'low-angle', split: 'dev' }, 0.25)).toBeCloseTo(0.03 + 0.12, 10);
    expect(demoErrorProbability({ ...base, lighting: 'low-angle', split: 'train' }, 0.25)).toBeCloseTo(0.03, 10);
    expect(demoErrorProbability({ ...base, station: 'S5', split: 'dev' }, 0.25)).toBeCloseTo(0.15, 10);
    expect(demoErrorProbability({ ...base, package: 'QFN', split: 'dev' }, 0.125)).toBeCloseTo(0.11, 10);
    expect(demoErrorProbability({ ...base, lighting: 'low-angle', split: 'test' }, 2 ** -20)).toBe(0.95);
    expect(() => demoErrorProbability({ ...base, split: 'dev' }, 0)).toThrow(RangeError);
    expect(() => demoErrorProbability({ ...base, split: 'dev' }, 1.5)).toThrow(RangeError);
  });

  it('adds the S6 · dome interaction in its four cells, stopping at 0, none for 0201', () => {
    // planted by the demo generator (our own scenario); hand arithmetic with P(S6) = 0.95 / 5 = 0.19 and
    // P(dome) = 0.25: the rest of S6 −0.12 · 0.25 / 0.75 = −0.04, the rest of dome −0.12 · 0.19 / 0.81 =
    // −0.028148…, elsewhere +0.12 · 0.19 · 0.25 / (0.81 · 0.75) = +0.009382…
    const effect = (row: Omit<PlantedRow, 'split'>, split: DemoSplit = 'train') => {
      const r = { ...row, split };
      return demoInteractionEffect(r, demoErrorProbability(r));
    };
    expect(effect({ station: 'S6', lighting: 'dome', package: 'BGA' })).toBeCloseTo(0.12, 12);
    expect(effect({ station: 'S6', lighting: 'dome', package: 'QFN' }, 'test')).toBeCloseTo(0.12, 12);
    expect(effect({ station: 'S6', lighting: 'ring', package: 'BGA' })).toBeCloseTo(-0.04, 12);
    expect(effect({ station: 'S6', lighting: 'low-angle', package: 'BGA' }, 'dev')).toBeCloseTo(-0.04, 12);
    expect(effect({ station: 'S1', lighting: 'dome', package: 'BGA' })).toBeCloseTo(-0.0228 / 0.81, 12);
    expect(effect({ station: 'S5', lighting: 'dome', package: '0402' }, 'dev')).toBeCloseTo(-0.0228 / 0.81, 12);
    expect(effect({ station: 'S3', lighting: 'coaxial', package: 'SOIC' })).toBeCloseTo(0.0057 / 0.6075, 12);
    // where the error probability would go below 0 it stops there: SOIC (0.02) and 0603 (0.03) lose only
    // their floor on the rest of S6, SOIC on the rest of dome; with low-angle's +0.06 in dev, nothing stops
    expect(effect({ station: 'S6', lighting: 'coaxial', package: 'SOIC' })).toBeCloseTo(-0.02, 12);
    expect(effect({ station: 'S6', lighting: 'ring', package: '0603' })).toBeCloseTo(-0.03, 12);
    expect(effect({ station: 'S2', lighting: 'dome', package: 'SOIC' })).toBeCloseTo(-0.02, 12);
    expect(effect({ station: 'S6', lighting: 'low-angle', package: 'SOIC' }, 'dev')).toBeCloseTo(-0.04, 12);
    expect(effect({ station: 'S6', lighting: 'dome', package: '0201' })).toBe(0);
    expect(effect({ station: 'S1', lighting: 'ring', package: '0201' }, 'dev')).toBe(0);
    // below the cap: a probability already at 0.95 gains nothing, and 0.9 gains 0.05 of 0.12
    const pair = { split: 'dev', station: 'S6', lighting: 'dome', package: 'BGA' } as const;
    expect(demoInteractionEffect(pair, 0.95)).toBe(0);
    expect(demoInteractionEffect(pair, 0.9)).toBeCloseTo(0.05, 12);
  });

  it('pins the inspector audit and the run sizes', () => {
    // planted by the demo generator (our own scenario)
    expect(DEMO_AUDIT).toEqual({
      share: 0.05,
      skipShare: 0.05,
      harshness: 1.5,
      harshInspector: 'insp_c',
      sharedErrorShare: 1,
    });
    expect(DEMO_INSPECTORS).toEqual(['insp_a', 'insp_b', 'insp_c']);
    expect(demoInspectorErrorProbability('insp_a', { package: '0201', label: 'good' })).toBe(0.12);
    expect(demoInspectorErrorProbability('insp_b', { package: 'SOIC', label: 'void' })).toBe(0.02);
    expect(demoInspectorErrorProbability('insp_c', { package: '0201', label: 'good' })).toBeCloseTo(0.18, 12);
    expect(demoInspectorErrorProbability('insp_c', { package: '0201', label: 'bridge' })).toBe(0.12);
    expect(demoInspectorErrorProbability('insp_c', { package: 'SOIC', label: 'good' })).toBeCloseTo(0.03, 12);
    // hand arithmetic: ceil(8000 / 4), ceil(8000 / 2), 8000; ceil(5 / 4) = 2, ceil(5 / 2) = 3
    expect(demoRunTrainRows(8000, 3)).toEqual([2000, 4000, 8000]);
    expect(demoRunTrainRows(5, 3)).toEqual([2, 3, 5]);
    expect(demoRunTrainRows(1234, 1)).toEqual([1234]);
    expect(DEMO_MAX_RUNS).toBe(10);
  });

  it('agrees with the plants as documented for every split, station, lighting and package', () => {
    let combos = 0;
    for (const split of SPLITS) {
      for (const station of STATIONS) {
        for (const lighting of LIGHTINGS) {
          for (const pkg of DEMO_PACKAGES) {
            const row = { split, station, lighting, package: pkg };
            const p = demoErrorProbability(row);
            expect(p, JSON.stringify(row)).toBeCloseTo(planted(row, 'interaction'), 12);
            expect(p + demoInteractionEffect(row, p), JSON.stringify(row)).toBeCloseTo(planted(row), 12);
            if (pkg === DEMO_PLANTS.atFloor.value) {
              expect(p, JSON.stringify(row)).toBe(DEMO_FLOORS[pkg].floor);
              expect(demoInteractionEffect(row, p), JSON.stringify(row)).toBe(0);
            }
            combos++;
          }
        }
      }
    }
    expect(combos).toBe(4 * 6 * 4 * 6);
  });
});

describe.each([
  [`${BIG_ROWS} rows, seed ${BIG_SEED}`, BIG],
  [`shipped sample: ${DEMO_DEFAULTS.rows} rows, seed ${DEMO_DEFAULTS.seed}`, SHIPPED],
] as const)('generateDemoRows: planted structure (%s)', (_name, rows) => {
  it('draws errors with the planted probability in every one-column slice of every split', () => {
    // finish and shift carry no effect, so they too must match the planted mix of their rows
    const columns = ['station', 'lighting', 'package', 'finish', 'shift'] as const;
    for (const [split, splitRows] of groupBy(rows, (r) => r.split)) {
      const whole = plantedStats(splitRows);
      expectRate(splitRows, whole.mean, whole.se, split);
      for (const column of columns) {
        for (const [value, slice] of groupBy(splitRows, (r) => r[column])) {
          const { mean, se } = plantedStats(slice);
          // only the rare training-distribution S5 slices may be small
          expectRate(slice, mean, se, `${split} ${column}=${value}`, 50);
        }
      }
    }
    expect([...groupBy(rows, (r) => r.split).keys()].sort()).toEqual([...SPLITS].sort());
  });

  it('0201: the whole slice sits at its floor in every split, whatever the station or lighting', () => {
    const floor = DEMO_FLOORS[DEMO_PLANTS.atFloor.value as '0201'].floor;
    expect(rows.filter((r) => isAtFloorPackage(r) && demoErrorProbability(r) !== floor).slice(0, 3)).toEqual([]);
    for (const split of SPLITS) {
      const slice = inSplit(rows, split, isAtFloorPackage);
      expectRate(slice, floor, binomialSe(floor, slice.length), `0201 ${split}`);
    }
    // the station and lighting plants pass it by
    const { mismatch, variance } = DEMO_PLANTS;
    const s5 = rows.filter((r) => isAtFloorPackage(r) && isMismatchStation(r) && mismatch.splits.includes(r.split));
    expectRate(s5, floor, binomialSe(floor, s5.length), `0201 ${mismatch.value} in ${mismatch.splits.join('/')}`);
    const low = rows.filter((r) => isAtFloorPackage(r) && isVarianceLighting(r) && variance.splits.includes(r.split));
    expectRate(low, floor, binomialSe(floor, low.length), `0201 ${variance.value} in ${variance.splits.join('/')}`);
  });

  it('QFN: avoidable bias in every split, no variance', () => {
    const { effect, splits } = DEMO_PLANTS.avoidableBias;
    for (const split of SPLITS) {
      expectEffect(inSplit(rows, split, isBiasPackage), 'avoidableBias', splits.includes(split) ? effect : 0, `QFN ${split}`);
    }
    // outside the station and lighting plants, train_dev and dev are no worse than train
    const [train, trainDev, dev] = (['train', 'train_dev', 'dev'] as const).map((s) =>
      inSplit(rows, s, (r) => isBiasPackage(r) && clean(r)),
    );
    const p = DEMO_FLOORS.QFN.floor + effect;
    for (const other of [trainDev, dev]) {
      const se = Math.hypot(binomialSe(p, train.length), binomialSe(p, other.length));
      expect(Math.abs(errorRate(other) - errorRate(train))).toBeLessThan(Z * se);
    }
  });

  it('S5: rare in training, its production share in dev and test, a data mismatch there', () => {
    const { effect, splits, trainingShare, productionShare } = DEMO_PLANTS.mismatch;
    const training = rows.filter((r) => r.split === 'train' || r.split === 'train_dev');
    const production = rows.filter((r) => r.split === 'dev' || r.split === 'test');
    expectShare(training, isMismatchStation, trainingShare, 'S5 training share');
    expectShare(production, isMismatchStation, productionShare, 'S5 production share');
    for (const split of SPLITS) {
      const slice = inSplit(rows, split, (r) => isMismatchStation(r) && !isAtFloorPackage(r));
      expectEffect(slice, 'mismatch', splits.includes(split) ? effect : 0, `S5 ${split}`);
    }
  });

  it('low-angle: floor in train, a variance effect from train_dev on', () => {
    const { effect, splits } = DEMO_PLANTS.variance;
    for (const split of SPLITS) {
      const slice = inSplit(rows, split, (r) => isVarianceLighting(r) && !isAtFloorPackage(r));
      expectEffect(slice, 'variance', splits.includes(split) ? effect : 0, `low-angle ${split}`);
    }
  });

  it('clean slices (outside S5 and low-angle) sit at their floor in every split, QFN at floor + its bias', () => {
    for (const pkg of DEMO_PACKAGES) {
      const bias = pkg === DEMO_PLANTS.avoidableBias.value ? DEMO_PLANTS.avoidableBias.effect : 0;
      for (const split of SPLITS) {
        const slice = inSplit(rows, split, (r) => r.package === pkg && clean(r));
        // net of the interaction, which averages to about 0 over a package (a few tenths of a point
        // where its negative cells stop at 0: SOIC, 0603)
        const interaction = plantedStats(slice).mean - plantedStats(slice, 'interaction').mean;
        expect(Math.abs(interaction), `${pkg} ${split} interaction`).toBeLessThan(0.006);
        const p = DEMO_FLOORS[pkg].floor + bias + interaction;
        expectRate(slice, p, binomialSe(p, slice.length), `${pkg} clean ${split}`);
      }
    }
  });

  it('S6 · dome: the pair errs at p + 0.12 in every split, its station and its lighting at about p', () => {
    const { columns, values, effect } = DEMO_PLANTS.interaction;
    const inA: Filter = (r) => r[columns[0]] === values[0] && !isAtFloorPackage(r);
    const inB: Filter = (r) => r[columns[1]] === values[1] && !isAtFloorPackage(r);
    for (const split of SPLITS) {
      // the pair is never near 0 or the cap, so it gets the whole effect: planted (our own scenario)
      expectEffect(inSplit(rows, split, (r) => inA(r) && inB(r)), 'interaction', effect, `S6 · dome ${split}`);
      // the rest of S6 and the rest of dome at p plus their cells' (partly stopped) effects
      for (const [name, f] of [
        ['rest of S6', (r: DemoRow) => inA(r) && !inB(r)],
        ['rest of dome', (r: DemoRow) => inB(r) && !inA(r)],
        ['elsewhere', (r: DemoRow) => !inA(r) && !inB(r) && !isAtFloorPackage(r)],
      ] as const) {
        const slice = inSplit(rows, split, f);
        const cell = plantedStats(slice).mean - plantedStats(slice, 'interaction').mean;
        expectEffect(slice, 'interaction', cell, `${name} ${split}`);
      }
    }
    // the singles: their planted interaction is the stops at 0 only in train (hand arithmetic over the
    // shares: S6 +0.0034, dome +0.0010), and in dev dome's is ≈ −0.0018 (S6 1/6 of dev rows, not 0.19)
    for (const split of SPLITS) {
      for (const [name, f] of [
        ['S6', (r: DemoRow) => r.station === values[0]],
        ['dome', (r: DemoRow) => r.lighting === values[1]],
      ] as const) {
        const slice = inSplit(rows, split, f);
        const main = plantedStats(slice).mean - plantedStats(slice, 'interaction').mean;
        expect(Math.abs(main), `${name} ${split}: main effect ${main}`).toBeLessThan(0.006);
      }
    }
  });
});

// ---------------------------------------------------------------------------------------------------
// The inspector audit (DEMO_AUDIT). Checks rebuild the planted rates from the constants.

/** the labels an inspector panel gave a row, in inspector order, skips left out */
const labelsOf = (r: DemoRow): DemoClass[] =>
  DEMO_INSPECTORS.map((k) => r[k]).filter((l): l is DemoClass => l !== null);
const isAudited: Filter = (r) => labelsOf(r).length > 0;

/**
 * An inspector's planted error probability, rebuilt from the constants as DEMO_AUDIT documents it: the
 * package floor, times the harshness for the harsh inspector on `good` joints.
 */
const plantedInspector = (k: DemoInspector, r: Pick<DemoRow, 'package' | 'label'>): number =>
  DEMO_FLOORS[r.package].floor * (k === DEMO_AUDIT.harshInspector && r.label === 'good' ? DEMO_AUDIT.harshness : 1);

/** Error rate of inspector `k` over the rows she labelled, with its planted mean and standard error. */
function inspectorStats(rows: readonly DemoRow[], k: DemoInspector): { n: number; rate: number; mean: number; se: number } {
  let n = 0;
  let wrong = 0;
  let sum = 0;
  let variance = 0;
  for (const r of rows) {
    const l = r[k];
    if (l === null) continue;
    n++;
    if (l !== r.label) wrong++;
    const p = plantedInspector(k, r);
    sum += p;
    variance += p * (1 - p);
  }
  return { n, rate: wrong / n, mean: sum / n, se: Math.sqrt(variance) / n };
}

/** Majority vote's error as the engine counts it: among the k labels tied for most votes, the share that is wrong. */
function majorityError(labels: readonly DemoClass[], truth: DemoClass): number {
  const counts = new Map<DemoClass, number>();
  for (const l of labels) counts.set(l, (counts.get(l) ?? 0) + 1);
  const most = Math.max(...counts.values());
  const top = [...counts].filter(([, c]) => c === most);
  return top.filter(([l]) => l !== truth).length / top.length;
}

/** Simple pairwise agreement of a row: the share of inspector pairs that gave the same label. */
function pairwiseAgreement(labels: readonly DemoClass[]): number {
  let pairs = 0;
  let same = 0;
  for (let i = 0; i < labels.length; i++) {
    for (let j = i + 1; j < labels.length; j++) {
      pairs++;
      if (labels[i] === labels[j]) same++;
    }
  }
  return same / pairs;
}

/** Mean and standard error of a per-row statistic over the panel rows (≥ 2 labels) of `rows`. */
function panelMean(rows: readonly DemoRow[], stat: (r: DemoRow, labels: DemoClass[]) => number): { mean: number; se: number; n: number } {
  const xs = rows.map((r) => [r, labelsOf(r)] as const).filter(([, l]) => l.length >= 2).map(([r, l]) => stat(r, l));
  const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
  const sd = Math.sqrt(xs.reduce((a, x) => a + (x - mean) ** 2, 0) / (xs.length - 1));
  return { mean, se: sd / Math.sqrt(xs.length), n: xs.length };
}

const byPackage = (rows: readonly DemoRow[], pkg: DemoPackage) => rows.filter((r) => r.package === pkg);

describe('deriveSeed', () => {
  it('gives repeatable, distinct 32-bit side seeds', () => {
    expect(deriveSeed(24, 1)).toBe(deriveSeed(24, 1));
    const seeds = new Set([deriveSeed(24, 1), deriveSeed(24, 2), deriveSeed(25, 1), deriveSeed(24, 0)]);
    expect(seeds.size).toBe(4);
    for (const s of seeds) expect(Number.isInteger(s) && s >= 0 && s < 2 ** 32).toBe(true);
  });
});

describe('generateDemoRows: inspector audit, planted parameters', () => {
  it('agrees with the audit as documented for every inspector, package and class', () => {
    for (const k of DEMO_INSPECTORS) {
      for (const pkg of DEMO_PACKAGES) {
        for (const label of DEMO_CLASSES) {
          expect(demoInspectorErrorProbability(k, { package: pkg, label }), `${k} ${pkg} ${label}`).toBeCloseTo(
            plantedInspector(k, { package: pkg, label }),
            12,
          );
        }
      }
    }
  });

  it('leaves the audit out of the main stream: a shorter table is a prefix of a longer one', () => {
    expect(take(300, 9)).toEqual(take(1000, 9).slice(0, 300));
  });
});

describe('generateDemoRows: the interaction has a stream of its own', () => {
  /** sha256 of the rows as JSON lines (`JSON.stringify(row)` and a newline each) */
  const sha256 = (rows: readonly object[]) => {
    const h = createHash('sha256');
    for (const r of rows) h.update(JSON.stringify(r) + '\n');
    return h.digest('hex');
  };
  const withoutPrediction = ({ pred: _pred, score: _score, ...rest }: DemoRow) => rest;

  it('changes pred and score only, and only where it applies: every other column as before it was planted', () => {
    // The hashes were computed the same way from the generator of commit 6e4a4e2, the last before the
    // interaction (dist/demo/draws.js built there, the rows of generateDemoRows hashed with node:crypto).
    // Every column but pred and score, for the shipped sample and a three-run table:
    expect(sha256(SHIPPED.map(withoutPrediction))).toBe('c73cc5a1345c55baa70e4d405c99c3ed7ea168e8dea7f2824a8239d4badeb272');
    expect(sha256(MULTI.map(withoutPrediction))).toBe('fa8e6a5382fc28c813a288b341c5c026e6c18c2276140954eb4e25a6ddf9fa7b');
    // the 0201 rows (no interaction), whole: their predictions too are those of the main stream
    const rows0201 = SHIPPED.filter(isAtFloorPackage);
    expect(rows0201.length).toBe(5077);
    expect(sha256(rows0201)).toBe('7515b1ee9d89d0808cd8eeae4c86e1cc59cc86bb0c02df889c6f3c108f75ccf3');
    expect(sha256(MULTI.filter(isAtFloorPackage))).toBe('7cb95c74bde809612d4b30a1d59505ecc7b73bcada248bdf484092a36688f7e3');
    // and the whole sample is not what it was (sha256 of the same rows at commit 6e4a4e2: ae835124…)
    expect(sha256(SHIPPED)).not.toBe('ae835124e125029d01b39290736097da5973131daa31e8fc2ac5f080085b6d6d');
  });
});

describe.each([
  [`${BIG_ROWS} rows, seed ${BIG_SEED}`, BIG],
  [`shipped sample: ${DEMO_DEFAULTS.rows} rows, seed ${DEMO_DEFAULTS.seed}`, SHIPPED],
] as const)('generateDemoRows: inspector audit (%s)', (_name, rows) => {
  const audited = rows.filter(isAudited);

  it('audits about DEMO_AUDIT.share of the rows in every split; skips leave 3, 2 or rarely 1 label', () => {
    const { share, skipShare: s } = DEMO_AUDIT;
    expectShare(rows, isAudited, share, 'audited');
    for (const [split, splitRows] of groupBy(rows, (r) => r.split)) expectShare(splitRows, isAudited, share, `audited ${split}`);
    // skips are redrawn when all three come up: P(k labels) = C(3,k)(1−s)^k s^(3−k) / (1 − s³)
    const kept = 1 - s ** 3;
    const p3 = (1 - s) ** 3 / kept;
    const p2 = (3 * (1 - s) ** 2 * s) / kept;
    expectShare(audited, (r) => labelsOf(r).length === 3, p3, '3 labels');
    expectShare(audited, (r) => labelsOf(r).length === 2, p2, '2 labels');
    expect(audited.filter((r) => labelsOf(r).length === 1).length).toBeLessThan(audited.length * 0.02);
    for (const k of DEMO_INSPECTORS) expectShare(audited, (r) => r[k] === null, (s - s ** 3) / kept, `${k} skips`);
  });

  it('single inspectors err at the planted rate in every package', () => {
    for (const pkg of DEMO_PACKAGES) {
      for (const k of DEMO_INSPECTORS) {
        const { n, rate, mean, se } = inspectorStats(byPackage(audited, pkg), k);
        expect(n, `${pkg} ${k}: rows`).toBeGreaterThanOrEqual(80);
        expect(Math.abs(rate - mean), `${pkg} ${k}: error ${rate} vs ${mean} ± ${Z}·${se}`).toBeLessThan(Z * se);
      }
    }
  });

  it('draws wrong labels among the other classes', () => {
    // the harsh inspector's wrong labels on good joints spread evenly over the four defects
    const wrongOnGood = audited.filter((r) => r.label === 'good' && r.insp_c !== null && r.insp_c !== 'good');
    expect(wrongOnGood.length).toBeGreaterThan(10);
    for (const c of DEMO_CLASSES.filter((x) => x !== 'good')) {
      expectShare(wrongOnGood, (r) => r.insp_c === c, 1 / 4, `insp_c calls good ${c}`);
    }
  });

  it('the panel majority vote errs near the floor: between sharedErrorShare · floor and the floor', () => {
    for (const pkg of DEMO_PACKAGES) {
      const floor = DEMO_FLOORS[pkg].floor;
      const { mean, n } = panelMean(byPackage(audited, pkg), (r, l) => majorityError(l, r.label));
      const se = binomialSe(floor, n);
      expect(mean, `${pkg} majority ${mean}`).toBeGreaterThan(DEMO_AUDIT.sharedErrorShare * floor - Z * se);
      expect(mean, `${pkg} majority ${mean}`).toBeLessThan(floor + Z * se);
    }
  });

  it('0201 is the noisy slice: its pairwise agreement is the lowest, well below SOIC', () => {
    const agreement = new Map(DEMO_PACKAGES.map((pkg) => [pkg, panelMean(byPackage(audited, pkg), (_r, l) => pairwiseAgreement(l))]));
    const lowest = [...agreement].sort((a, b) => a[1].mean - b[1].mean)[0][0];
    expect(lowest).toBe('0201');
    const a0201 = agreement.get('0201')!;
    const soic = agreement.get('SOIC')!;
    expect(soic.mean - a0201.mean).toBeGreaterThan(Z * Math.hypot(a0201.se, soic.se));
  });
});

describe(`generateDemoRows: the harsh inspector (${BIG_ROWS} rows, seed ${BIG_SEED})`, () => {
  it('insp_c calls defects on good joints about DEMO_AUDIT.harshness times as often as the others', () => {
    const audited = BIG.filter(isAudited);
    const good = audited.filter((r) => r.label === 'good');
    const defects = audited.filter((r) => r.label !== 'good');
    const c = inspectorStats(good, 'insp_c');
    const a = inspectorStats(good, 'insp_a');
    const b = inspectorStats(good, 'insp_b');
    for (const other of [a, b]) {
      const se = Math.hypot(c.se, other.se);
      // significantly harsher, by the planted difference (harshness − 1) × the rows' floors
      expect(c.rate - other.rate, `${c.rate} vs ${other.rate}`).toBeGreaterThan(Z * se);
      expect(Math.abs(c.rate - other.rate - (c.mean - other.mean))).toBeLessThan(Z * se);
      expect(Math.abs(c.rate / other.rate - DEMO_AUDIT.harshness)).toBeLessThan(0.3);
    }
    // on defects she is no harsher
    const cd = inspectorStats(defects, 'insp_c');
    const ad = inspectorStats(defects, 'insp_a');
    expect(Math.abs(cd.rate - ad.rate)).toBeLessThan(Z * Math.hypot(cd.se, ad.se));
  });
});

// ---------------------------------------------------------------------------------------------------
// Multi-run mode.

const MULTI_OPTIONS = { rows: 3000, seed: 7, runs: 3 } as const;
const MULTI = [...generateDemoRows(MULTI_OPTIONS)];
const MULTI_BASE = take(MULTI_OPTIONS.rows, MULTI_OPTIONS.seed);

/** A row without its run and its predictions: the example itself. */
const example = ({ run: _run, pred: _pred, score: _score, ...rest }: DemoRow) => rest;
const inRun = (rows: readonly DemoRow[], run: number) => rows.filter((r) => r.run === `r${run}`);

describe('generateDemoRows: runs', () => {
  it('is deterministic for a seed, differs across seeds, and runs: 1 is the plain table', () => {
    expect([...generateDemoRows(MULTI_OPTIONS)]).toEqual(MULTI);
    const other = [...generateDemoRows({ ...MULTI_OPTIONS, seed: 8 })];
    expect(other.slice(0, 500)).not.toEqual(MULTI.slice(0, 500));
    expect([...generateDemoRows({ rows: 500, seed: 7, runs: 1 })]).toEqual(take(500, 7));
  });

  it('adds the run column after split, run-major, r1 … rR', () => {
    const columns = demoColumns(MULTI_OPTIONS.runs).join();
    expect(MULTI.filter((r) => Object.keys(r).join() !== columns).slice(0, 3)).toEqual([]);
    const order = MULTI.map((r) => Number(r.run!.slice(1)));
    expect(order.every((x, i) => i === 0 || x >= order[i - 1])).toBe(true);
    expect([...new Set(MULTI.map((r) => r.run))]).toEqual(['r1', 'r2', 'r3']);
  });

  it('trains run r on the first ceil(N_train · 2^(r−R)) train rows: sizes double, the last run has all', () => {
    const baseTrain = MULTI_BASE.filter((r) => r.split === 'train');
    const sizes = demoRunTrainRows(baseTrain.length, MULTI_OPTIONS.runs);
    expect(sizes.at(-1)).toBe(baseTrain.length);
    for (let r = 1; r <= MULTI_OPTIONS.runs; r++) {
      const train = inRun(MULTI, r).filter((x) => x.split === 'train');
      expect(train.length).toBe(sizes[r - 1]);
      if (r > 1) expect([0, 1]).toContain(2 * sizes[r - 2] - train.length);
      // the same examples (ids, metadata, labels, inspector labels) as the first train rows of the dataset
      expect(train.map(example)).toEqual(baseTrain.slice(0, train.length).map(example));
    }
  });

  it('repeats the same train_dev, dev and test examples in every run, each run with its own predictions', () => {
    const baseOther = MULTI_BASE.filter((r) => r.split !== 'train').map(example);
    const preds: string[][] = [];
    for (let r = 1; r <= MULTI_OPTIONS.runs; r++) {
      const other = inRun(MULTI, r).filter((x) => x.split !== 'train');
      expect(other.map(example)).toEqual(baseOther);
      preds.push(other.map((x) => x.pred));
    }
    const dev = (r: number) => inRun(MULTI, r).filter((x) => x.split === 'dev');
    expect(dev(1).map((x) => [x.id, x.label, x.insp_a, x.insp_b, x.insp_c])).toEqual(
      dev(3).map((x) => [x.id, x.label, x.insp_a, x.insp_b, x.insp_c]),
    );
    expect(preds[0]).not.toEqual(preds[1]);
    expect(preds[1]).not.toEqual(preds[2]);
    // the last run is the one-run table
    expect(inRun(MULTI, MULTI_OPTIONS.runs)).toEqual(MULTI_BASE.map(({ id, split, ...rest }) => ({ id, split, run: 'r3', ...rest })));
  });
});

describe('generateDemoRows: the learning curve of the variance plant (80,000 rows × 4 runs, seed 14)', () => {
  // Streamed, not kept: per run, split and group, the rows, errors, planted mean without the variance and
  // mismatch effects, and the planted binomial variance.
  // Seed 14: with seed 13 run 1's 582 QFN train rows erred at 6.2 %, 3.7 SE below their planted 11 %,
  // before the interaction (chance: seeds 14–18 give −0.7 … +2.0 SE there), and 4.0 SE below once its
  // independent draws were added, past Z.
  const OPTIONS = { rows: 80_000, seed: 14, runs: 4 } as const;
  type Acc = { n: number; errors: number; p: number; noVariance: number; noMismatch: number; noInteraction: number; variance: number };
  const { columns, values } = DEMO_PLANTS.interaction;
  const groups = {
    lowAngle: (r: DemoRow) => isVarianceLighting(r) && !isAtFloorPackage(r) && !isMismatchStation(r),
    s5: (r: DemoRow) => isMismatchStation(r) && !isAtFloorPackage(r),
    qfn: isBiasPackage,
    '0201': isAtFloorPackage,
    pair: (r: DemoRow) => r[columns[0]] === values[0] && r[columns[1]] === values[1] && !isAtFloorPackage(r),
  } as const;
  type Group = keyof typeof groups;
  const GROUP_NAMES = Object.keys(groups) as Group[];
  const acc = new Map<string, Acc>();
  const trainRows: number[] = new Array(OPTIONS.runs).fill(0);
  let nTrain = 0;
  for (const r of generateDemoRows({ rows: OPTIONS.rows, seed: OPTIONS.seed })) if (r.split === 'train') nTrain++;
  const sizes = demoRunTrainRows(nTrain, OPTIONS.runs);
  for (const r of generateDemoRows(OPTIONS)) {
    const run = Number(r.run!.slice(1));
    if (r.split === 'train') trainRows[run - 1]++;
    const fraction = sizes[run - 1] / nTrain;
    for (const name of GROUP_NAMES) {
      if (!groups[name](r)) continue;
      const key = `${run} ${r.split} ${name}`;
      const a = acc.get(key) ?? { n: 0, errors: 0, p: 0, noVariance: 0, noMismatch: 0, noInteraction: 0, variance: 0 };
      const p = planted(r, undefined, fraction);
      a.n++;
      if (r.pred !== r.label) a.errors++;
      a.p += p;
      a.noVariance += planted(r, 'variance', fraction);
      a.noMismatch += planted(r, 'mismatch', fraction);
      a.noInteraction += planted(r, 'interaction', fraction);
      a.variance += p * (1 - p);
      acc.set(key, a);
    }
  }
  const get = (run: number, split: DemoSplit, group: Group): Acc => acc.get(`${run} ${split} ${group}`)!;
  const rate = (a: Acc) => a.errors / a.n;
  const se = (a: Acc) => Math.sqrt(a.variance) / a.n;

  it('has doubling train sizes', () => {
    expect(trainRows).toEqual(sizes);
    expect(sizes.at(-1)).toBe(nTrain);
  });

  it('plants low-angle excess error effect · (n_r / n_R)^(−β) in each run: the dev − train gap follows it', () => {
    const { effect, curveExponent } = DEMO_PLANTS.variance;
    // planted by the demo generator (our own scenario): β = 0.5, effect 0.06 at the largest run
    expect(curveExponent).toBe(0.5);
    const gaps: number[] = [];
    for (let run = 1; run <= OPTIONS.runs; run++) {
      const expected = effect * Math.pow(sizes[run - 1] / nTrain, -curveExponent);
      const train = get(run, 'train', 'lowAngle');
      // the gap net of the rows' other planted effects (package floors and bias), so only the variance is left
      const net = (a: Acc) => rate(a) - a.noVariance / a.n;
      for (const split of ['dev', 'train_dev'] as const) {
        const other = get(run, split, 'lowAngle');
        const gap = net(other) - net(train);
        const tolerance = Z * Math.hypot(se(other), se(train));
        expect(Math.abs(gap - expected), `run ${run} ${split} − train: ${gap} vs ${expected} ± ${tolerance}`).toBeLessThan(tolerance);
        if (split === 'dev') gaps.push(gap);
      }
      // raw dev − train gap, too (same package mix in both splits in expectation)
      const rawTolerance = Z * Math.hypot(se(get(run, 'dev', 'lowAngle')), se(train)) + 0.01;
      expect(Math.abs(rate(get(run, 'dev', 'lowAngle')) - rate(train) - expected)).toBeLessThan(rawTolerance);
    }
    // the gap shrinks with more training data: run 1 (1/8 of the rows) ≈ 2.8 × the last run's
    expect(gaps[0]).toBeGreaterThan(2 * gaps.at(-1)!);
  });

  it('keeps the other plants in every run: S5 mismatch, QFN bias, 0201 at its floor, S6 · dome', () => {
    for (let run = 1; run <= OPTIONS.runs; run++) {
      for (const split of SPLITS) {
        for (const group of GROUP_NAMES) {
          const a = get(run, split, group);
          expect(Math.abs(rate(a) - a.p / a.n), `run ${run} ${split} ${group}: ${rate(a)} vs ${a.p / a.n}`).toBeLessThan(Z * se(a));
        }
      }
      // the new camera's dev excess does not shrink with more training data
      const s5 = get(run, 'dev', 's5');
      const mismatch = rate(s5) - s5.noMismatch / s5.n;
      expect(Math.abs(mismatch - DEMO_PLANTS.mismatch.effect), `run ${run} S5 mismatch ${mismatch}`).toBeLessThan(Z * se(s5));
      const floor0201 = get(run, 'dev', '0201');
      expect(floor0201.p / floor0201.n).toBeCloseTo(DEMO_FLOORS['0201'].floor, 12);
      // each run draws the interaction from a stream of its own: the pair's whole effect in every run
      // (planted, our own scenario; its rows are far from 0 and from the cap, so nothing stops it)
      for (const split of ['train_dev', 'dev', 'test'] as const) {
        const pair = get(run, split, 'pair');
        const excess = rate(pair) - pair.noInteraction / pair.n;
        expect(Math.abs(excess - DEMO_PLANTS.interaction.effect), `run ${run} ${split} S6 · dome ${excess}`).toBeLessThan(Z * se(pair));
      }
    }
  });
});
