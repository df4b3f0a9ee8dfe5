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
  DEMO_PLANTS,
  checkDemoOptions,
  demoErrorProbability,
  demoInspectorErrorProbability,
  demoInteractionEffect,
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
/**
 * The interaction's stream (a run's own interaction stream derives from the run's seed). Any salt plants
 * the same interaction; the shipped sample's overview has several slices near the edge of the FDR step
 * (gaps the QFN and S5 plants leave in every slice), so which of them are flagged depends on the draws:
 * 26, found by trying the salts 3, 13 … 36, is one with which the sample's overview flags the same
 * slices as before the interaction was planted.
 */
const INTERACTION_SALT = 26;
/** The after model's stream ({@link generateDemoAfterRows}); a salt no other stream of a seed uses. */
const AFTER_SALT = 41;

type Prediction = { pred: DemoClass; score: number };

/** A wrong class among the other four, and its score (draw order is fixed). */
function drawWrong(rng: Random, label: DemoClass): Prediction {
  const others = DEMO_CLASSES.filter((c) => c !== label);
  const pred = others[rng.int(others.length)];
  const d = DEMO_DISTRIBUTIONS;
  const score = rng.chance(d.confidentErrorShare) ? rng.between(0.8, 0.99) : rng.between(0.25, 0.8);
  return { pred, score: round3(score) };
}

/** The right class and its score. */
function drawRight(rng: Random, label: DemoClass): Prediction {
  const u = rng.uniform();
  return { pred: label, score: round3(0.999 - 0.299 * u * u) }; // (0.7, 0.999], most mass near the top
}

/** A wrong or right prediction for a row with error probability `p`, with its score (draw order is fixed). */
function drawPrediction(rng: Random, label: DemoClass, p: number): Prediction {
  return rng.chance(p) ? drawWrong(rng, label) : drawRight(rng, label);
}

/**
 * The interaction ({@link demoInteractionEffect}) applied to a prediction that was drawn with error
 * probability `p`, from its own stream, so the stream that drew it draws exactly what it drew without
 * the interaction. For an effect ε > 0 a right prediction turns wrong with probability ε / (1 − p); for
 * ε < 0 a wrong one turns right with probability |ε| / p (ε is bounded so that both are at most 1).
 * Either way the row is wrong with probability p + ε; a turned prediction gets its class and score
 * from this stream as {@link drawPrediction} would draw them.
 */
function withInteraction(rng: Random, row: DemoRow, p: number, drawn: Prediction): Prediction {
  const effect = demoInteractionEffect(row, p);
  if (effect === 0) return drawn;
  const wrong = drawn.pred !== row.label;
  if (effect > 0) return !wrong && rng.chance(effect / (1 - p)) ? drawWrong(rng, row.label) : drawn;
  return wrong && rng.chance(-effect / p) ? drawRight(rng, row.label) : drawn;
}

/**
 * The after model's prediction for a row the first model predicted as `before`, with error probability
 * `p` for the first model and `q` for the after one (each with the interaction), from the after
 * model's own stream (see {@link DEMO_PLANTS.after}). Where q = p the outcome is kept unless, with
 * probability `churn`, it is drawn afresh at rate p: a right one turns wrong with probability churn · p,
 * a wrong one right with churn · (1 − p). Where q > p a right one turns wrong with probability
 * (q − p) / (1 − p); where q < p a wrong one turns right with (p − q) / p. Either way the row is wrong
 * with probability q, and a turned prediction gets its class and score as {@link drawPrediction} would.
 */
function afterPrediction(rng: Random, label: DemoClass, p: number, q: number, before: Prediction): Prediction {
  const wrong = before.pred !== label;
  if (q === p) {
    const churn = DEMO_PLANTS.after.churn;
    if (wrong) return rng.chance(churn * (1 - p)) ? drawRight(rng, label) : before;
    return rng.chance(churn * p) ? drawWrong(rng, label) : before;
  }
  if (q > p) return !wrong && rng.chance((q - p) / (1 - p)) ? drawWrong(rng, label) : before;
  return wrong && rng.chance((p - q) / p) ? drawRight(rng, label) : before;
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
 * stream, the interaction and the audit each from its own stream, so neither changes the other columns
 * of a seed.
 */
function* generateExamples(rows: number, seed: number): Generator<DemoRow> {
  const d = DEMO_DISTRIBUTIONS;
  const rng = new Random(seed);
  const auditRng = new Random(deriveSeed(seed, AUDIT_SALT));
  const interactionRng = new Random(deriveSeed(seed, INTERACTION_SALT));
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
    const p = demoErrorProbability({ split, station, lighting, package: pkg });
    const drawn = drawPrediction(rng, label, p);
    const audit = drawAudit(auditRng, { package: pkg, label });

    const row: DemoRow = {
      id: `J${String(i + 1).padStart(width, '0')}`,
      split,
      station,
      lighting,
      package: pkg,
      finish,
      shift,
      sharpness,
      label,
      pred: drawn.pred,
      score: drawn.score,
      insp_a: audit.insp_a,
      insp_b: audit.insp_b,
      insp_c: audit.insp_c,
    };
    yield { ...row, ...withInteraction(interactionRng, row, p, drawn) };
  }
}

/**
 * Generates the demo rows for `options`: the same seed always gives the same rows, on any platform.
 * Lazy, so any number of rows runs in flat memory (with runs, the dataset is regenerated from the seed
 * once to count its train rows and once per run).
 *
 * With `runs = R ≥ 2` the rows come run-major (all of `r1`, then `r2`, …), in id order within a run;
 * run R's rows equal the `runs = 1` table plus the `run` column, and run r < R draws its predictions
 * from its own stream with the learning-curve variance effect of {@link DEMO_PLANTS.variance}, and its
 * interaction from a stream of its own.
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
    const runSeed = deriveSeed(deriveSeed(seed, RUN_SALT + runs), r);
    const rng = r === runs ? null : { main: new Random(runSeed), interaction: new Random(deriveSeed(runSeed, INTERACTION_SALT)) };
    let trainSeen = 0;
    for (const e of generateExamples(rows, seed)) {
      if (e.split === 'train' && trainSeen++ >= size) continue;
      const p = demoErrorProbability(e, fraction);
      const { pred, score } = rng === null ? e : withInteraction(rng.interaction, e, p, drawPrediction(rng.main, e.label, p));
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

/**
 * The after model's table ({@link DEMO_PLANTS.after}, `--models 2`): the rows of the `runs = 1` table
 * of `options` (same ids, splits, labels, slice and audit columns, in the same order) with the after
 * model's `pred` and `score`, drawn from a stream of its own, so the first table is the same whether or
 * not this one is written. Lazy, as {@link generateDemoRows}.
 */
export function* generateDemoAfterRows(options: DemoOptions): Generator<DemoRow> {
  checkDemoOptions(options);
  if ((options.runs ?? 1) !== 1) throw new RangeError(`the after model is of one training run, got runs ${options.runs}`);
  const rng = new Random(deriveSeed(options.seed, AFTER_SALT));
  for (const row of generateExamples(options.rows, options.seed)) {
    const base = demoErrorProbability(row);
    const p = base + demoInteractionEffect(row, base);
    const afterBase = demoErrorProbability(row, 1, 'after');
    const q = afterBase + demoInteractionEffect(row, afterBase);
    yield { ...row, ...afterPrediction(rng, row.label, p, q, { pred: row.pred, score: row.score }) };
  }
}
