/**
 * Seeded demo data: an automated optical inspection line where six line cameras photograph solder
 * joints and a classifier labels each joint `good`, `bridge`, `insufficient`, `void` or `lifted`.
 * The scenario and all of its numbers are our own invention; the generator plants known gaps
 * (see {@link DEMO_PLANTS}) so a floorgap report on the output has a known right answer.
 */
import { Random } from './random.js';

export type DemoSplit = 'train' | 'train_dev' | 'dev' | 'test';
export type DemoStation = 'S1' | 'S2' | 'S3' | 'S4' | 'S5' | 'S6';
export type DemoLighting = 'ring' | 'coaxial' | 'dome' | 'low-angle';
export type DemoPackage = '0201' | '0402' | '0603' | 'QFN' | 'BGA' | 'SOIC';
export type DemoFinish = 'HASL' | 'ENIG' | 'OSP';
export type DemoShift = 'day' | 'swing' | 'night';
export type DemoClass = 'good' | 'bridge' | 'insufficient' | 'void' | 'lifted';

/** One row of the demo prediction table, in {@link DEMO_COLUMNS} order. */
export interface DemoRow {
  /** `J` and a zero-padded running number, e.g. `J0000001` */
  readonly id: string;
  readonly split: DemoSplit;
  readonly station: DemoStation;
  readonly lighting: DemoLighting;
  readonly package: DemoPackage;
  readonly finish: DemoFinish;
  readonly shift: DemoShift;
  /** image sharpness in [0, 1], 3 decimals; no planted error effect of its own */
  readonly sharpness: number;
  /** true class */
  readonly label: DemoClass;
  /** predicted class */
  readonly pred: DemoClass;
  /** model confidence in `pred`, in [0, 1], 3 decimals */
  readonly score: number;
}

export interface DemoOptions {
  /** rows to generate (a positive integer) */
  readonly rows: number;
  /** PRNG seed (an integer) */
  readonly seed: number;
}

export const DEMO_DEFAULTS: DemoOptions = Object.freeze({ rows: 20_000, seed: 24 });

/** CSV header of the demo table, in column order. */
export const DEMO_COLUMNS = [
  'id',
  'split',
  'station',
  'lighting',
  'package',
  'finish',
  'shift',
  'sharpness',
  'label',
  'pred',
  'score',
] as const satisfies readonly (keyof DemoRow)[];

export const DEMO_CLASSES: readonly DemoClass[] = ['good', 'bridge', 'insufficient', 'void', 'lifted'];
export const DEMO_PACKAGES: readonly DemoPackage[] = ['0201', '0402', '0603', 'QFN', 'BGA', 'SOIC'];

/**
 * Human-level error per package from the (invented) inspector audit: `floor` is the share of joints
 * the inspectors got wrong, `n` how many joints they audited. These are the floors the generator
 * plants; {@link demoFloorTable} lists them as rows of `inspector-floors.csv`.
 */
export const DEMO_FLOORS: Readonly<Record<DemoPackage, { readonly floor: number; readonly n: number }>> =
  Object.freeze({
    '0201': { floor: 0.12, n: 600 },
    '0402': { floor: 0.04, n: 500 },
    '0603': { floor: 0.03, n: 450 },
    QFN: { floor: 0.03, n: 500 },
    BGA: { floor: 0.05, n: 550 },
    SOIC: { floor: 0.02, n: 400 },
  });

const ALL_SPLITS: readonly DemoSplit[] = ['train', 'train_dev', 'dev', 'test'];

/**
 * The planted truths of the demo data (our own scenario). Every row has an error probability
 * `floor(package) + Σ effects that apply to it`, capped at {@link DEMO_PLANTS.errorCap}; the effects
 * are additive. Apart from the effects below, every slice's train, train_dev, dev and test error
 * equal its rows' floor in expectation.
 *
 * 0201 joints are so small that the model already errs at the inspectors' rate whatever the camera or
 * light, so no effect applies to them: the whole `0201` slice sits at its floor. Because the effects
 * are additive and the slices overlap, other one-column slices pick up a little of the planted effects
 * (e.g. every package but 0201 has ≈ 0.12·(S5 share of dev ≈ 1/6) extra dev error from S5).
 * `sharpness` is lower for 0201 (so it correlates with error through the package) but has no effect.
 */
export const DEMO_PLANTS = Object.freeze({
  /** QFN: avoidable bias. Error = floor + 0.08 in every split, so train ≈ dev ≈ floor + 0.08, no variance. */
  avoidableBias: {
    column: 'package',
    value: 'QFN',
    effect: 0.08,
    splits: ALL_SPLITS,
  },
  /** 0201: at its high floor (0.12); no effect of its own, train = train_dev = dev = test = floor. */
  atFloor: {
    column: 'package',
    value: '0201',
    effect: 0,
    splits: ALL_SPLITS,
  },
  /**
   * S5: a new camera. Rare in the training distribution (train, train_dev), one station in six in the
   * production distribution (dev, test); error = floor in train and train_dev, floor + 0.12 in dev and
   * test: a data mismatch.
   */
  mismatch: {
    column: 'station',
    value: 'S5',
    effect: 0.12,
    splits: ['dev', 'test'] as readonly DemoSplit[],
    trainingShare: 0.05,
    productionShare: 1 / 6,
  },
  /** low-angle lighting: variance. Error = floor in train, floor + 0.06 in train_dev, dev and test. */
  variance: {
    column: 'lighting',
    value: 'low-angle',
    effect: 0.06,
    splits: ['train_dev', 'dev', 'test'] as readonly DemoSplit[],
  },
  /** upper bound on any row's error probability */
  errorCap: 0.95,
});

/** Category shares (weights sum to 1) the generator draws from. */
export const DEMO_DISTRIBUTIONS = Object.freeze({
  split: { train: 0.4, train_dev: 0.2, dev: 0.2, test: 0.2 } as Record<DemoSplit, number>,
  /** station shares in train and train_dev */
  stationTraining: stationShares(DEMO_PLANTS.mismatch.trainingShare),
  /** station shares in dev and test */
  stationProduction: stationShares(DEMO_PLANTS.mismatch.productionShare),
  lighting: { ring: 0.3, coaxial: 0.25, dome: 0.25, 'low-angle': 0.2 } as Record<DemoLighting, number>,
  package: { '0201': 0.25, '0402': 0.18, '0603': 0.15, QFN: 0.15, BGA: 0.12, SOIC: 0.15 } as Record<
    DemoPackage,
    number
  >,
  finish: { HASL: 0.4, ENIG: 0.35, OSP: 0.25 } as Record<DemoFinish, number>,
  shift: { day: 0.45, swing: 0.3, night: 0.25 } as Record<DemoShift, number>,
  label: { good: 0.7, bridge: 0.075, insufficient: 0.075, void: 0.075, lifted: 0.075 } as Record<DemoClass, number>,
  /** sharpness ~ normal(mean, sd) clipped to [0, 1]; 0201 images are softer */
  sharpness: { mean: 0.7, meanFor0201: 0.6, sd: 0.1 },
  /** share of wrong predictions whose score is confident (0.8–0.99) rather than 0.25–0.8 */
  confidentErrorShare: 0.2,
});

function stationShares(s5: number): Record<DemoStation, number> {
  const other = (1 - s5) / 5;
  return { S1: other, S2: other, S3: other, S4: other, S5: s5, S6: other };
}

const PLANT_LIST = [DEMO_PLANTS.avoidableBias, DEMO_PLANTS.atFloor, DEMO_PLANTS.mismatch, DEMO_PLANTS.variance];

/**
 * The planted error probability of a row: its package floor plus the planted effects that apply to
 * its split, capped at {@link DEMO_PLANTS.errorCap}.
 */
export function demoErrorProbability(row: Pick<DemoRow, 'split' | 'station' | 'lighting' | 'package'>): number {
  let p = DEMO_FLOORS[row.package].floor;
  if (row.package === DEMO_PLANTS.atFloor.value) return p;
  for (const plant of PLANT_LIST) {
    if (row[plant.column as 'package' | 'station' | 'lighting'] === plant.value && plant.splits.includes(row.split)) {
      p += plant.effect;
    }
  }
  return Math.min(p, DEMO_PLANTS.errorCap);
}

/** The inspector audit as rows of `inspector-floors.csv` (`package,floor,n`). */
export function demoFloorTable(): Array<{ package: string; floor: number; n: number }> {
  return DEMO_PACKAGES.map((p) => ({ package: p, floor: DEMO_FLOORS[p].floor, n: DEMO_FLOORS[p].n }));
}

/** Checks `options` and throws a RangeError naming the bad value. */
export function checkDemoOptions(options: DemoOptions): void {
  if (!Number.isSafeInteger(options.rows) || options.rows < 1) {
    throw new RangeError(`rows must be a positive integer, got ${options.rows}`);
  }
  if (!Number.isSafeInteger(options.seed)) {
    throw new RangeError(`seed must be an integer, got ${options.seed}`);
  }
}

/** Keys and weights of a share table, in a fixed order, for {@link Random.choice}. */
function table<K extends string>(shares: Record<K, number>): { keys: K[]; weights: number[] } {
  const keys = Object.keys(shares) as K[];
  return { keys, weights: keys.map((k) => shares[k]) };
}

const round3 = (x: number): number => Math.round(x * 1000) / 1000;

/**
 * Generates the demo rows for `options`: the same seed always gives the same rows, on any platform.
 * Lazy, so any number of rows runs in flat memory.
 */
export function* generateDemoRows(options: DemoOptions): Generator<DemoRow> {
  checkDemoOptions(options);
  const d = DEMO_DISTRIBUTIONS;
  const rng = new Random(options.seed);
  const splits = table(d.split);
  const training = table(d.stationTraining);
  const production = table(d.stationProduction);
  const lightings = table(d.lighting);
  const packages = table(d.package);
  const finishes = table(d.finish);
  const shifts = table(d.shift);
  const labels = table(d.label);
  const width = Math.max(7, String(options.rows).length);

  for (let i = 0; i < options.rows; i++) {
    // The draw order is part of the output: changing it changes every seed's rows.
    const split = rng.choice(splits.keys, splits.weights);
    const stations = split === 'train' || split === 'train_dev' ? training : production;
    const station = rng.choice(stations.keys, stations.weights);
    const lighting = rng.choice(lightings.keys, lightings.weights);
    const pkg = rng.choice(packages.keys, packages.weights);
    const finish = rng.choice(finishes.keys, finishes.weights);
    const shift = rng.choice(shifts.keys, shifts.weights);
    const sharpMean = pkg === '0201' ? d.sharpness.meanFor0201 : d.sharpness.mean;
    const sharpness = round3(Math.min(1, Math.max(0, rng.normal(sharpMean, d.sharpness.sd))));
    const label = rng.choice(labels.keys, labels.weights);

    const wrong = rng.chance(demoErrorProbability({ split, station, lighting, package: pkg }));
    let pred: DemoClass = label;
    let score: number;
    if (wrong) {
      const others = DEMO_CLASSES.filter((c) => c !== label);
      pred = others[rng.int(others.length)];
      score = rng.chance(d.confidentErrorShare) ? rng.between(0.8, 0.99) : rng.between(0.25, 0.8);
    } else {
      const u = rng.uniform();
      score = 0.999 - 0.299 * u * u; // (0.7, 0.999], most mass near the top
    }

    yield {
      id: `J${String(i + 1).padStart(width, '0')}`,
      split,
      station,
      lighting,
      package: pkg,
      finish,
      shift,
      sharpness,
      label,
      pred,
      score: round3(score),
    };
  }
}

/**
 * One CSV field: quoted (with inner quotes doubled) when it holds a comma, quote, line break, or
 * leading/trailing space; otherwise as is.
 */
export function csvField(value: string | number): string {
  const s = String(value);
  return /[",\r\n]|^\s|\s$/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** One demo row as a CSV line (no line terminator); sharpness and score with 3 decimals. */
export function demoRowToCsvLine(row: DemoRow): string {
  return [
    csvField(row.id),
    csvField(row.split),
    csvField(row.station),
    csvField(row.lighting),
    csvField(row.package),
    csvField(row.finish),
    csvField(row.shift),
    row.sharpness.toFixed(3),
    csvField(row.label),
    csvField(row.pred),
    row.score.toFixed(3),
  ].join(',');
}

/**
 * CSV lines (no line terminators) for `rows`, starting with the header unless `header` is false.
 * @example [...demoRowsToCsvLines(generateDemoRows({ rows: 2, seed: 7 }))].join('\n')
 */
export function* demoRowsToCsvLines(rows: Iterable<DemoRow>, { header = true } = {}): Generator<string> {
  if (header) yield DEMO_COLUMNS.map(csvField).join(',');
  for (const row of rows) yield demoRowToCsvLine(row);
}

/** `inspector-floors.csv` lines (no line terminators), header first. */
export function* demoFloorCsvLines(): Generator<string> {
  yield 'package,floor,n';
  for (const f of demoFloorTable()) yield [csvField(f.package), String(f.floor), String(f.n)].join(',');
}
