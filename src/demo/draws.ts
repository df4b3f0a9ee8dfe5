/**
 * Drawing the demo rows from the scenario (scenario.ts) with the seeded generator: predictions and
 * scores, the inspector audit, and the training runs. The draw order is part of the output: the same
 * seed gives the same rows on any platform, and changing the order changes every seed's rows.
 */
import { Random, deriveSeed } from './random.js';
import {
  DEMO_AUDIT,
  DEMO_CLASSES,
  DEMO_DISTRIBUTIONS,
  DEMO_INSPECTORS,
  checkDemoOptions,
  demoErrorProbability,
  demoInspectorErrorProbability,
  demoRunTrainRows,
  type DemoClass,
  type DemoInspector,
  type DemoOptions,
  type DemoRow,
} from './scenario.js';


/** Keys and weights of a share table, in a fixed order, for {@link Random.choice}. */
function table<K extends string>(shares: Record<K, number>): { keys: K[]; weights: number[] } {
  const keys = Object.keys(shares) as K[];
  return { keys, weights: keys.map((k) => shares[k]) };
}

const round3 = (x: number): number => Math.round(x * 1000) / 1000;

/** Salts of the side streams ({@link deriveSeed}); the main stream is `new Random(seed)`. */
const AUDIT_SALT = 1;
const RUN_SALT = 2;

/** A wrong or right prediction for a row with error probability `p`, with its score (draw order is fixed). */
function drawPrediction(rng: Random, label: DemoClass, p: number): { pred: DemoClass; score: number } {
  if (rng.chance(p)) {
    const others = DEMO_CLASSES.filter((c) => c !== label);
    const pred = others[rng.int(others.length)];
    const d = DEMO_DISTRIBUTIONS;
    const score = rng.chance(d.confidentErrorShare) ? rng.between(0.8, 0.99) : rng.between(0.25, 0.8);
    return { pred, score: round3(score) };
  }
  const u = rng.uniform();
  return { pred: label, score: round3(0.999 - 0.299 * u * u) }; // (0.7, 0.999], most mass near the top
}

type Audit = Pick<DemoRow, DemoInspector>;
const NOT_AUDITED: Audit = Object.freeze({ insp_a: null, insp_b: null, insp_c: null });

/** One row's audit from the audit stream (see {@link DEMO_AUDIT}); the number of draws varies. */
function drawAudit(rng: Random, row: Pick<DemoRow, 'package' | 'label'>): Audit {
  const { share, skipShare, sharedErrorShare: s } = DEMO_AUDIT;
  if (!rng.chance(share)) return NOT_AUDITED;
  let skips: boolean[];
  do skips = DEMO_INSPECTORS.map(() => rng.chance(skipShare));
  while (skips.every(Boolean));
  const others = DEMO_CLASSES.filter((c) => c !== row.label);
  const u = rng.uniform(); // how hard the joint is to read: lower is harder, the same for the whole panel
  const labels = DEMO_INSPECTORS.map((inspector, j): DemoClass | null => {
    if (skips[j]) return null;
    const p = demoInspectorErrorProbability(inspector, row);
    const wrong = u < s * p || (s < 1 && rng.chance(((1 - s) * p) / (1 - s * p)));
    return wrong ? others[rng.int(others.length)] : row.label;
  });
  return { insp_a: labels[0], insp_b: labels[1], insp_c: labels[2] };
}

/**
 * The run-independent dataset: every example once, with the (last) run's predictions from the main
 * stream and the audit from its own stream, so the audit leaves the other columns of a seed unchanged.
 */
function* generateExamples(rows: number, seed: number): Generator<DemoRow> {
  const d = DEMO_DISTRIBUTIONS;
  const rng = new Random(seed);
  const auditRng = new Random(deriveSeed(seed, AUDIT_SALT));
  const splits = table(d.split);
  const training = table(d.stationTraining);
  const production = table(d.stationProduction);
  const lightings = table(d.lighting);
  const packages = table(d.package);
  const finishes = table(d.finish);
  const shifts = table(d.shift);
  const labels = table(d.label);
  const width = Math.max(7, String(rows).length);

  for (let i = 0; i < rows; i++) {
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
    const { pred, score } = drawPrediction(rng, label, demoErrorProbability({ split, station, lighting, package: pkg }));
    const audit = drawAudit(auditRng, { package: pkg, label });

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
      score,
      insp_a: audit.insp_a,
      insp_b: audit.insp_b,
      insp_c: audit.insp_c,
    };
  }
}

/**
 * Generates the demo rows for `options`: the same seed always gives the same rows, on any platform.
 * Lazy, so any number of rows runs in flat memory (with runs, the dataset is regenerated from the seed
 * once to count its train rows and once per run).
 *
 * With `runs = R ≥ 2` the rows come run-major (all of `r1`, then `r2`, …), in id order within a run;
 * run R's rows equal the `runs = 1` table plus the `run` column, and run r < R draws its predictions
 * from its own stream with the learning-curve variance effect of {@link DEMO_PLANTS.variance}.
 */
export function* generateDemoRows(options: DemoOptions): Generator<DemoRow> {
  checkDemoOptions(options);
  const { rows, seed } = options;
  const runs = options.runs ?? 1;
  if (runs === 1) {
    yield* generateExamples(rows, seed);
    return;
  }
  let nTrain = 0;
  for (const e of generateExamples(rows, seed)) if (e.split === 'train') nTrain++;
  const sizes = demoRunTrainRows(nTrain, runs);
  for (let r = 1; r <= runs; r++) {
    const run = `r${r}`;
    const size = sizes[r - 1];
    const fraction = nTrain === 0 ? 2 ** (r - runs) : size / nTrain;
    const rng = r === runs ? null : new Random(deriveSeed(deriveSeed(seed, RUN_SALT + runs), r));
    let trainSeen = 0;
    for (const e of generateExamples(rows, seed)) {
      if (e.split === 'train' && trainSeen++ >= size) continue;
      const { pred, score } = rng === null ? e : drawPrediction(rng, e.label, demoErrorProbability(e, fraction));
      yield {
        id: e.id,
        split: e.split,
        run,
        station: e.station,
        lighting: e.lighting,
        package: e.package,
        finish: e.finish,
        shift: e.shift,
        sharpness: e.sharpness,
        label: e.label,
        pred,
        score,
        insp_a: e.insp_a,
        insp_b: e.insp_b,
        insp_c: e.insp_c,
      };
    }
  }
}
