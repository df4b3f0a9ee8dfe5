import { describe, expect, it } from 'vitest';
import {
  DEMO_CLASSES,
  DEMO_COLUMNS,
  DEMO_DEFAULTS,
  DEMO_DISTRIBUTIONS,
  DEMO_FLOORS,
  DEMO_PACKAGES,
  DEMO_PLANTS,
  csvField,
  demoErrorProbability,
  demoFloorCsvLines,
  demoFloorTable,
  demoRowsToCsvLines,
  generateDemoRows,
  type DemoLighting,
  type DemoRow,
  type DemoSplit,
  type DemoStation,
} from '../../src/demo/generate.js';
import { Random } from '../../src/demo/random.js';

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

type EffectPlant = 'avoidableBias' | 'mismatch' | 'variance';

/**
 * A row's planted error probability, rebuilt from the exported constants as DEMO_PLANTS documents it
 * (independently of demoErrorProbability): the package floor, plus each effect whose column value and
 * split match, none at all for the at-floor package, capped. `omit` leaves one effect out.
 */
function planted(r: Pick<DemoRow, 'split' | 'station' | 'lighting' | 'package'>, omit?: EffectPlant): number {
  const { avoidableBias, atFloor, mismatch, variance, errorCap } = DEMO_PLANTS;
  const floor = DEMO_FLOORS[r.package].floor;
  if (r.package === atFloor.value) return floor;
  let p = floor;
  if (omit !== 'avoidableBias' && r.package === avoidableBias.value && avoidableBias.splits.includes(r.split)) {
    p += avoidableBias.effect;
  }
  if (omit !== 'mismatch' && r.station === mismatch.value && mismatch.splits.includes(r.split)) p += mismatch.effect;
  if (omit !== 'variance' && r.lighting === variance.value && variance.splits.includes(r.split)) p += variance.effect;
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
  });

  it('has exactly the documented columns with values in their domains', () => {
    expect([...DEMO_COLUMNS]).toEqual([
      'id', 'split', 'station', 'lighting', 'package', 'finish', 'shift', 'sharpness', 'label', 'pred', 'score',
    ]);
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
      Math.round(r.score * 1000) / 1000 === r.score;
    expect(BIG.filter((r) => !inDomain(r)).slice(0, 3)).toEqual([]);
    expect(SHIPPED.filter((r) => !inDomain(r)).slice(0, 3)).toEqual([]);
  });

  it('serialises to CSV with the header first and no weight column', () => {
    const lines = [...demoRowsToCsvLines(take(3, 7))];
    expect(lines).toHaveLength(4);
    expect(lines[0]).toBe('id,split,station,lighting,package,finish,shift,sharpness,label,pred,score');
    for (const line of lines.slice(1)) {
      const cells = line.split(',');
      expect(cells).toHaveLength(11);
      expect(cells[7]).toMatch(/^[01]\.\d{3}$/);
      expect(cells[10]).toMatch(/^[01]\.\d{3}$/);
    }
    expect([...demoRowsToCsvLines(take(3, 7), { header: false })]).toEqual(lines.slice(1));
  });

  it('quotes CSV fields only when needed', () => {
    expect(csvField('QFN')).toBe('QFN');
    expect(csvField(0.5)).toBe('0.5');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField(' padded')).toBe('" padded"');
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
    expect(DEMO_DEFAULTS).toEqual({ rows: 20_000, seed: 24 });
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
  });

  it('agrees with the plants as documented for every split, station, lighting and package', () => {
    let combos = 0;
    for (const split of SPLITS) {
      for (const station of STATIONS) {
        for (const lighting of LIGHTINGS) {
          for (const pkg of DEMO_PACKAGES) {
            const row = { split, station, lighting, package: pkg };
            const p = demoErrorProbability(row);
            expect(p, JSON.stringify(row)).toBeCloseTo(planted(row), 12);
            if (pkg === DEMO_PLANTS.atFloor.value) expect(p, JSON.stringify(row)).toBe(DEMO_FLOORS[pkg].floor);
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
      const p = DEMO_FLOORS[pkg].floor + bias;
      for (const split of SPLITS) {
        const slice = inSplit(rows, split, (r) => r.package === pkg && clean(r));
        expectRate(slice, p, binomialSe(p, slice.length), `${pkg} clean ${split}`);
      }
    }
  });
});
