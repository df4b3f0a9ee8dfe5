/**
 * The demo's scenario: an automated optical inspection line where six line cameras photograph solder
 * joints and a classifier labels each joint `good`, `bridge`, `insufficient`, `void` or `lifted`.
 * The scenario and all of its numbers are our own invention; it plants known gaps (see
 * {@link DEMO_PLANTS}) so a floorgap report on the demo table has a known right answer.
 *
 * About one row in twenty is also audited by three human inspectors (columns `insp_a`, `insp_b`,
 * `insp_c`, see {@link DEMO_AUDIT}), and with `runs ≥ 2` the table holds several training runs of the
 * same model on doubling training sets (column `run`, see {@link DemoOptions.runs}).
 *
 * This file describes the scenario (columns, classes, floors, planted effects, shares); draws.ts draws
 * rows from it and csv.ts writes them.
 */
import { DEFAULTS } from '../core/defaults.js';

export type DemoSplit = 'train' | 'train_dev' | 'dev' | 'test';
export type DemoStation = 'S1' | 'S2' | 'S3' | 'S4' | 'S5' | 'S6';
export type DemoLighting = 'ring' | 'coaxial' | 'dome' | 'low-angle';
export type DemoPackage = '0201' | '0402' | '0603' | 'QFN' | 'BGA' | 'SOIC';
export type DemoFinish = 'HASL' | 'ENIG' | 'OSP';
export type DemoShift = 'day' | 'swing' | 'night';
export type DemoClass = 'good' | 'bridge' | 'insufficient' | 'void' | 'lifted';
/** The three inspectors of the audit, named by their columns. */
export type DemoInspector = 'insp_a' | 'insp_b' | 'insp_c';

/** One row of the demo prediction table, in {@link demoColumns} order (`run` only with `runs ≥ 2`). */
export interface DemoRow {
  /** `J` and a zero-padded running number, e.g. `J0000001`; with runs, the same example keeps its id in every run */
  readonly id: string;
  readonly split: DemoSplit;
  /** training run, `r1` … `rR`; present only when the table holds `runs ≥ 2` runs */
  readonly run?: string;
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
  /** inspector A's class on an audited row; null (an empty CSV field) when not audited or skipped */
  readonly insp_a: DemoClass | null;
  /** inspector B's class, as `insp_a` */
  readonly insp_b: DemoClass | null;
  /** inspector C's class, as `insp_a`; she is the harsh one (see {@link DEMO_AUDIT.harshness}) */
  readonly insp_c: DemoClass | null;
}

export interface DemoOptions {
  /**
   * Rows of the run-independent dataset (a positive integer): every example drawn once, with its split.
   * With `runs = 1` that is exactly the table. With `runs = R ≥ 2` it is the last run's block; run r
   * repeats all of its train_dev, dev and test rows but only the first `ceil(N_train · 2^(r−R))` of its
   * N_train train rows, so the table holds about `rows · (0.6·R + 0.4·(2 − 2^(1−R)))` rows.
   */
  readonly rows: number;
  /** PRNG seed (an integer; its low 32 bits are used) */
  readonly seed: number;
  /**
   * Training runs, an integer in 1 … {@link DEMO_MAX_RUNS}; default 1 (no `run` column). With R ≥ 2 the
   * table gains a `run` column after `split` and holds R runs of the same model, run-major: run r was
   * trained on the first `ceil(N_train · 2^(r−R))` train rows (sizes doubling, the last run uses them
   * all) and predicts the same train_dev, dev and test examples (same ids, metadata, true labels and
   * inspector labels) with its own predictions. The last run's rows are the `runs = 1` table.
   */
  readonly runs?: number;
  /**
   * Models, 1 or {@link DEMO_MAX_MODELS}; default 1. With 2 the demo also writes the after model's
   * predictions for the same rows ({@link DEMO_PLANTS.after}); only with `runs = 1`. The first table
   * is the same either way.
   */
  readonly models?: number;
}

export const DEMO_DEFAULTS: DemoOptions = Object.freeze({
  rows: DEFAULTS.demoRows,
  seed: DEFAULTS.demoSeed,
  runs: DEFAULTS.demoRuns,
  models: DEFAULTS.demoModels,
});

/** Largest accepted `runs` (run 1 then trains on 1/512 of the train rows). */
export const DEMO_MAX_RUNS = 10;

/** Largest accepted `models`: the first model and the after model. */
export const DEMO_MAX_MODELS = 2;

/** The demo's models: the first (`before`, the table of every demo) and the retrained `after` one. */
export type DemoModel = 'before' | 'after';

/** CSV header of the demo table (one run, no `run` column), in column order; see {@link demoColumns}. */
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
  'insp_a',
  'insp_b',
  'insp_c',
] as const satisfies readonly (keyof DemoRow)[];

/** The run column's name, inserted right after `split` when the table holds several runs. */
const DEMO_RUN_COLUMN = 'run' as const satisfies keyof DemoRow;

/** The demo table's columns for `runs` training runs: {@link DEMO_COLUMNS}, plus `run` after `split` when runs ≥ 2. */
export function demoColumns(runs = 1): ReadonlyArray<keyof DemoRow> {
  if (runs < 2) return DEMO_COLUMNS;
  const at = DEMO_COLUMNS.indexOf('split') + 1;
  return [...DEMO_COLUMNS.slice(0, at), DEMO_RUN_COLUMN, ...DEMO_COLUMNS.slice(at)];
}

export const DEMO_CLASSES: readonly DemoClass[] = ['good', 'bridge', 'insufficient', 'void', 'lifted'];
export const DEMO_PACKAGES: readonly DemoPackage[] = ['0201', '0402', '0603', 'QFN', 'BGA', 'SOIC'];
export const DEMO_INSPECTORS: readonly DemoInspector[] = ['insp_a', 'insp_b', 'insp_c'];

/**
 * Human-level error per package from an earlier (invented) inspector audit: `floor` is the share of
 * joints a single inspector got wrong, `n` how many joints that audit covered. These are the floors the
 * generator plants, both for the model and for the inspector columns of the table (see
 * {@link DEMO_AUDIT}); {@link demoFloorTable} lists them as rows of `inspector-floors.csv`.
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
 * `floor(package) + Σ effects that apply to it`, kept within [0, {@link DEMO_PLANTS.errorCap}]; the
 * effects are additive. Apart from the effects below, every slice's train, train_dev, dev and test error
 * equal its rows' floor in expectation; the interaction (S6 under dome light) shows in the pair only.
 * With several training runs ({@link DemoOptions.runs}) only the variance effect depends on the run (a
 * learning curve); the other plants are the same in every run.
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
  /**
   * low-angle lighting: variance. Error = floor in train, floor + 0.06 in train_dev, dev and test of the
   * only (or the last, largest) training run. With several runs the excess follows a power-law learning
   * curve: in run r, trained on n_r train rows, it is `effect · (n_r / n_R)^(−curveExponent)`, so each
   * halving of the training set multiplies it by 2^0.5 ≈ 1.41 (n_R: the last run's train rows).
   */
  variance: {
    column: 'lighting',
    value: 'low-angle',
    effect: 0.06,
    splits: ['train_dev', 'dev', 'test'] as readonly DemoSplit[],
    /** β of the learning curve `effect · (n_r / n_R)^(−β)` */
    curveExponent: 0.5,
  },
  /**
   * S6 under dome light: a pure two-column interaction, with no main effect of its own. S6's camera was
   * recalibrated for the brighter ring and coaxial lights, so under the dim dome light its images are
   * underexposed and the model misses defects there, while under the other lights it does a little
   * better than the line; the dome light in turn serves the other cameras a little better than average.
   * As in a two-way analysis of variance, the effect on a row is
   * `κ · (1[station = S6] − P(S6)) · (1[lighting = dome] − P(dome))`, `κ = effect / ((1 − P(S6)) (1 − P(dome)))`,
   * with P the training shares (0.19 and 0.25), in every split (an avoidable bias), none on 0201 (the
   * shares among the other packages are the same, as the columns are drawn independently). So S6 · dome
   * gets `+effect`, the rest of S6 `−effect · P(dome) / (1 − P(dome))` (−0.04), the rest of dome
   * `−effect · P(S6) / (1 − P(S6))` (≈ −0.028) and every other row `+effect · P(S6) P(dome) / ((1 − P(S6))
   * (1 − P(dome)))` (≈ +0.0094): each station and each lighting averages to 0 over the training
   * distribution, so the gap shows only in the pair (`--by station,lighting`).
   *
   * Two things leave the singles a little off 0. Where a negative effect would take a row's error
   * probability below 0 (SOIC, floor 0.02, and 0603, 0.03, outside the dome light; SOIC under it) it
   * stops at 0, so in train S6 keeps +0.34 points, SOIC +0.45, 0603 +0.14, dome +0.10 and the whole
   * table +0.09 (expected values, hand arithmetic over the shares). And in dev and test, where S6 is 1/6
   * of the rows rather than 0.19, dome's rows average κ · (1 − P(dome)) · (1/6 − 0.19) ≈ −0.35 points
   * (−0.18 with the stops at 0). The interaction changes `pred` and `score` only: it is drawn from a
   * stream of its own (draws.ts), the same in every run.
   */
  interaction: {
    columns: ['station', 'lighting'] as const,
    values: ['S6', 'dome'] as const,
    effect: 0.12,
    splits: ALL_SPLITS,
  },
  /**
   * The after model (`--models 2`, the file `solder-joints-after.csv`): the line retrained with a
   * stronger augmentation for low-angle light (training images relit with long, raking shadows). The
   * same rows, with the after model's `pred` and `score`; every other plant (QFN, S5, 0201, S6 · dome)
   * as in the first model, and two changes:
   * - `fix`: the low-angle variance is gone. Low-angle joints err in train_dev, dev and test as in
   *   train (floor, plus the other plants that apply); their train error, and so their bias, unchanged.
   * - `regression`: the same augmentation washed out the flat, shadowless coaxial images the model had
   *   learnt from, so it now misreads coaxial joints: +`effect` in every split (an avoidable bias that
   *   shows in dev error), none on 0201 as for every plant; the whole `lighting=coaxial` slice, whose
   *   rows are a quarter 0201, rises by 0.75 · 0.048 = 3.6 points (hand arithmetic on the shares).
   * Both changes are in the lighting column, so no other lighting slice picks up either, and the effect
   * is sized so that they cancel over every other column: per row off 0201, the fix takes 0.2 · 0.06 =
   * 0.012 in train_dev, dev and test and the regression adds 0.25 · 0.048 = 0.012 (the lighting shares;
   * hand arithmetic), so a slice of another column (drawn independently of lighting) and the whole
   * table keep their dev and test error in expectation (a little off where the interaction stops at 0);
   * only their train error rises, by 0.75 · 0.012 = 0.9 points (no fix in train).
   *
   * Everywhere else the after model is the first one: it keeps the first model's outcome (right or
   * wrong) unless its side stream, with probability `churn`, draws the outcome afresh at the same rate
   * p; so a row turns wrong with probability churn · p(1 − p), as often as one turns right, and its
   * error probability stays p (about 1 % of rows each way at p ≈ 0.05). Where a change applies the
   * outcomes turn only its way, as the interaction does (draws.ts), so the row errs with the after
   * model's probability exactly. A kept outcome keeps its class and score.
   */
  after: {
    fix: { column: 'lighting', value: 'low-angle', removes: 'variance' },
    regression: { column: 'lighting', value: 'coaxial', effect: 0.048, splits: ALL_SPLITS },
    churn: 0.2,
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
/** The after model's plants: the fix takes the variance plant out, the regression comes in. */
const AFTER_PLANT_LIST = [DEMO_PLANTS.avoidableBias, DEMO_PLANTS.atFloor, DEMO_PLANTS.mismatch, DEMO_PLANTS.after.regression];

/**
 * The planted error probability of a row without the interaction ({@link demoInteractionEffect} adds
 * it): its package floor plus the planted effects that apply to its split, capped at
 * {@link DEMO_PLANTS.errorCap}. The main stream draws each prediction with this probability.
 * @param trainFraction n_r / n_R, the row's run's training rows over the last run's (1, the default,
 *   for the last or only run); it scales the variance effect to `effect · trainFraction^(−β)`
 * @param model `after`: the after model's plants ({@link DEMO_PLANTS.after}: no variance plant, the
 *   regression added)
 * @example demoErrorProbability({ split: 'dev', station: 'S1', lighting: 'low-angle', package: '0603' }, 0.25) // 0.03 + 0.06·2
 * @example demoErrorProbability({ split: 'dev', station: 'S1', lighting: 'coaxial', package: '0603' }, 1, 'after') // 0.03 + 0.08
 */
export function demoErrorProbability(
  row: Pick<DemoRow, 'split' | 'station' | 'lighting' | 'package'>,
  trainFraction = 1,
  model: DemoModel = 'before',
): number {
  if (!(trainFraction > 0 && trainFraction <= 1)) {
    throw new RangeError(`trainFraction must be in (0, 1], got ${trainFraction}`);
  }
  let p = DEMO_FLOORS[row.package].floor;
  if (row.package === DEMO_PLANTS.atFloor.value) return p;
  for (const plant of model === 'after' ? AFTER_PLANT_LIST : PLANT_LIST) {
    if (row[plant.column as 'package' | 'station' | 'lighting'] === plant.value && plant.splits.includes(row.split)) {
      p +=
        plant === DEMO_PLANTS.variance && trainFraction !== 1
          ? plant.effect * trainFraction ** -DEMO_PLANTS.variance.curveExponent
          : plant.effect;
    }
  }
  return Math.min(p, DEMO_PLANTS.errorCap);
}

/**
 * The interaction's change to a row's error probability `p` (see {@link DEMO_PLANTS.interaction}):
 * `κ · (1[station = S6] − P(S6)) · (1[lighting = dome] − P(dome))` in its splits, 0 on 0201, bounded
 * so that `p` plus it stays in [0, {@link DEMO_PLANTS.errorCap}]. P are the training shares of
 * {@link DEMO_DISTRIBUTIONS}.
 * @param p the row's error probability without the interaction ({@link demoErrorProbability})
 * @example demoInteractionEffect({ split: 'dev', station: 'S6', lighting: 'dome', package: 'BGA' }, 0.05) // +0.12
 * @example demoInteractionEffect({ split: 'train', station: 'S6', lighting: 'ring', package: 'SOIC' }, 0.02) // −0.02, not −0.12/3
 */
export function demoInteractionEffect(row: Pick<DemoRow, 'split' | 'station' | 'lighting' | 'package'>, p: number): number {
  const { columns, values, effect, splits } = DEMO_PLANTS.interaction;
  if (row.package === DEMO_PLANTS.atFloor.value || !splits.includes(row.split)) return 0;
  const pa = DEMO_DISTRIBUTIONS.stationTraining[values[0]];
  const pb = DEMO_DISTRIBUTIONS.lighting[values[1]];
  const kappa = effect / ((1 - pa) * (1 - pb));
  const e = kappa * (Number(row[columns[0]] === values[0]) - pa) * (Number(row[columns[1]] === values[1]) - pb);
  return Math.min(Math.max(p + e, 0), DEMO_PLANTS.errorCap) - p;
}

/**
 * The inspector audit of the demo (our own scenario). A share of the rows, in every split, is audited
 * by three inspectors, each of whom labels the joint's class; labels are compared with the true class.
 *
 * Each inspector is wrong with probability {@link demoInspectorErrorProbability}: the package floor of
 * {@link DEMO_FLOORS} (0201 high, SOIC low), and for the harsh inspector `harshness ×` that on `good`
 * joints (she calls defects on good joints more often). So a single inspector's error sits at the
 * floor (the harsh one above it), and the 0201 panel agrees least, SOIC most.
 *
 * Errors are mostly shared: a share s = `sharedErrorShare` of each inspector's error probability comes
 * from hard joints that the whole panel misreads (per audited row one uniform u, its legibility:
 * inspector j errs when u < s · p_j), the rest from her own slips (otherwise, with probability
 * (1 − s)·p_j / (1 − s·p_j)), so her marginal error stays p_j. Every wrong label is drawn uniformly
 * among the other four classes, independently per inspector: on a hard joint the inspectors are all
 * wrong but rarely agree on the wrong class. So the panel's majority vote is wrong about s · floor of
 * the time (hard joints; a little more from coinciding slips): with s = 1 exactly at the floor, while the pairwise agreement drops by about (3s/4 + 2(1 − s)) · floor (a little
 * more from the harsh inspector): lowest on 0201, highest on SOIC.
 */
export const DEMO_AUDIT = Object.freeze({
  /** share of rows audited, in every split */
  share: 0.05,
  /**
   * share of audited rows each inspector skips, independently; an audited row keeps at least one label
   * (the skips are redrawn when all three come up), so ≈ 85.7 % of audited rows have 3 labels,
   * 13.5 % have 2 and 0.7 % have 1
   */
  skipShare: 0.05,
  /** the harsh inspector's error on `good` joints, as a multiple of the package floor */
  harshness: 1.5,
  /** the inspector who is harsh on `good` joints */
  harshInspector: 'insp_c' as DemoInspector,
  /**
   * share of each inspector's error probability that comes from hard joints the whole panel misreads;
   * 1: every error is on a hard joint, so the panel's majority vote errs at the floor, as the model does
   * on 0201 (the joints are ambiguous, not the people careless)
   */
  sharedErrorShare: 1,
});

/**
 * The planted probability that `inspector`'s label of an audited row is wrong: the row's package floor,
 * times {@link DEMO_AUDIT.harshness} for the harsh inspector on `good` joints, capped at
 * {@link DEMO_PLANTS.errorCap}. The same for every split, station, lighting and run.
 * @example demoInspectorErrorProbability('insp_c', { package: '0201', label: 'good' }) // 0.18
 */
export function demoInspectorErrorProbability(
  inspector: DemoInspector,
  row: Pick<DemoRow, 'package' | 'label'>,
): number {
  const base = DEMO_FLOORS[row.package].floor;
  const harsh = inspector === DEMO_AUDIT.harshInspector && row.label === 'good';
  return Math.min(harsh ? base * DEMO_AUDIT.harshness : base, DEMO_PLANTS.errorCap);
}

/**
 * Train rows of each run for `runs` runs over `nTrain` train rows: run r (1-based, index r − 1) uses the
 * first `ceil(nTrain · 2^(r−runs))`, so the sizes double (±1) and the last run uses all `nTrain`.
 * @example demoRunTrainRows(8000, 3) // [2000, 4000, 8000]
 */
export function demoRunTrainRows(nTrain: number, runs: number): number[] {
  return Array.from({ length: runs }, (_, i) => Math.ceil(nTrain * 2 ** (i + 1 - runs)));
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
  const runs = options.runs ?? 1;
  if (!Number.isSafeInteger(runs) || runs < 1 || runs > DEMO_MAX_RUNS) {
    throw new RangeError(`runs must be an integer from 1 to ${DEMO_MAX_RUNS}, got ${options.runs}`);
  }
  const models = options.models ?? 1;
  if (!Number.isSafeInteger(models) || models < 1 || models > DEMO_MAX_MODELS) {
    throw new RangeError(`models must be 1 or ${DEMO_MAX_MODELS}, got ${options.models}`);
  }
  if (models === 2 && runs !== 1) {
    throw new RangeError(`models 2 needs runs 1 (the after model is of one training run), got runs ${runs}`);
  }
}
