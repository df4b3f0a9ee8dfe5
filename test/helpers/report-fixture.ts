/**
 * A hand-made slice report for renderer tests: fixture (hand-built). The numbers are invented to look
 * like a plausible inspection classifier; they are not the output of triage and intervals are rounded
 * by hand. Slices cover every focus, a slice without train_dev (mismatch null, variance = dev − train),
 * a slice without test rows (dev overfit null) and a thin slice with null gaps, headroom and yield.
 */
import type { Split } from '../../src/core/split.js';
import type { Focus, Gap, Rate, Report, SliceReport } from '../../src/triage/types.js';

function rate(value: number, lo: number, hi: number, n: number): Rate {
  return { value, lo, hi, n };
}

function gap(value: number, lo: number | null, hi: number | null, p: number | null, q: number | null): Gap {
  return { value, lo, hi, p, q };
}

interface SliceSpec {
  readonly key: Record<string, string>;
  readonly rows: Record<Split, number | null>;
  readonly share: number;
  readonly floor: number;
  readonly error: Record<Split, Rate | null>;
  readonly gaps: SliceReport['gaps'];
  readonly headroom: SliceReport['headroom'];
  readonly yield: number | null;
  readonly focus: Focus;
  readonly flagged: boolean;
  readonly rank: number;
}

function slice(spec: SliceSpec): SliceReport {
  const label = Object.entries(spec.key)
    .map(([k, v]) => `${k}=${v}`)
    .join(' · ');
  return {
    key: spec.key,
    label: label === '' ? 'overall' : label,
    rows: spec.rows,
    share: spec.share,
    floor: { value: spec.floor, dev: spec.floor, lo: null, hi: null, n: null, source: 'table', rule: null, raw: null, audited: null },
    error: spec.error,
    gaps: spec.gaps,
    headroom: spec.headroom,
    yield: spec.yield,
    cost: 1,
    labels_to_halve: null,
    curve: { beta: 0.5, lo: null, hi: null, runs: 0, source: 'default' },
    agreement: null,
    focus: spec.focus,
    flagged: spec.flagged,
    rank: spec.rank,
    hints: [],
  };
}

// fixture (hand-built): overall numbers
const overall: SliceReport = {
  ...slice({
    key: {},
    rows: { train: 12000, train_dev: 2700, dev: 3000, test: 2900 },
    share: 1,
    floor: 0.031,
    error: {
      train: rate(0.048, 0.0443, 0.052, 12000),
      train_dev: rate(0.061, 0.052, 0.07, 2700),
      dev: rate(0.079, 0.07, 0.089, 3000),
      test: rate(0.083, 0.074, 0.094, 2900),
    },
    gaps: {
      avoidable_bias: gap(0.017, 0.013, 0.021, 0.0000001, null),
      variance: gap(0.013, 0.003, 0.023, 0.011, null),
      mismatch: gap(0.018, 0.005, 0.031, 0.006, null),
      dev_overfit: gap(0.004, -0.009, 0.017, 0.54, null),
    },
    headroom: { total: 0.048, bias: 0.017, variance: 0.013, mismatch: 0.018 },
    yield: 0.0042,
    focus: 'mismatch',
    flagged: false,
    rank: 0,
  }),
  floor: { value: 0.031, dev: 0.032, lo: 0.026, hi: 0.037, n: 1400, source: 'mixed' },
};

// fixture (hand-built): one slice per focus, listed out of rank order on purpose
const slices: SliceReport[] = [
  slice({
    key: { station: 'S2', lighting: 'ring' },
    rows: { train: 3000, train_dev: 700, dev: 750, test: 720 },
    share: 0.25,
    floor: 0.02,
    error: {
      train: rate(0.025, 0.02, 0.031, 3000),
      train_dev: rate(0.07, 0.053, 0.092, 700),
      dev: rate(0.075, 0.058, 0.096, 750),
      test: rate(0.08, 0.062, 0.102, 720),
    },
    gaps: {
      avoidable_bias: gap(0.005, -0.001, 0.011, 0.09, 0.16),
      variance: gap(0.045, 0.027, 0.066, 0.00002, 0.0001),
      mismatch: gap(0.005, -0.021, 0.031, 0.7, 0.82),
      dev_overfit: gap(0.005, -0.024, 0.034, 0.74, 0.82),
    },
    headroom: { total: 0.01375, bias: 0.00125, variance: 0.01125, mismatch: 0.00125 },
    yield: 0.0061,
    focus: 'variance',
    flagged: true,
    rank: 2,
  }),
  slice({
    key: { station: 'S5', lighting: 'dome' },
    rows: { train: 2400, train_dev: 540, dev: 600, test: 580 },
    share: 0.2,
    floor: 0.03,
    error: {
      train: rate(0.11, 0.098, 0.123, 2400),
      train_dev: rate(0.12, 0.095, 0.15, 540),
      dev: rate(0.13, 0.105, 0.159, 600),
      test: rate(0.135, 0.109, 0.165, 580),
    },
    gaps: {
      avoidable_bias: gap(0.08, 0.067, 0.093, 0.0000001, 0.0000007),
      variance: gap(0.01, -0.019, 0.04, 0.5, 0.7),
      mismatch: gap(0.01, -0.028, 0.048, 0.61, 0.78),
      dev_overfit: gap(0.005, -0.034, 0.044, 0.8, 0.82),
    },
    headroom: { total: 0.02, bias: 0.016, variance: 0.002, mismatch: 0.002 },
    yield: 0.0031,
    focus: 'bias',
    flagged: true,
    rank: 1,
  }),
  slice({
    key: { station: 'S7-rework-line-north', lighting: 'backlit-polarised' },
    rows: { train: 1800, train_dev: 400, dev: 450, test: null },
    share: 0.15,
    floor: 0.04,
    error: {
      train: rate(0.045, 0.036, 0.056, 1800),
      train_dev: rate(0.05, 0.032, 0.077, 400),
      dev: rate(0.11, 0.084, 0.142, 450),
      test: null,
    },
    gaps: {
      avoidable_bias: gap(0.005, -0.005, 0.016, 0.31, 0.48),
      variance: gap(0.005, -0.016, 0.031, 0.62, 0.78),
      mismatch: gap(0.06, 0.026, 0.094, 0.0008, 0.0028),
      dev_overfit: null,
    },
    headroom: { total: 0.0105, bias: 0.00075, variance: 0.00075, mismatch: 0.009 },
    yield: 0.0019,
    focus: 'mismatch',
    flagged: true,
    rank: 3,
  }),
  slice({
    key: { station: 'S4', lighting: 'diffuse' },
    rows: { train: 1150, train_dev: 0, dev: 288, test: 280 },
    share: 0.096,
    floor: 0.03,
    error: {
      train: rate(0.04, 0.03, 0.053, 1150),
      train_dev: null,
      dev: rate(0.05, 0.029, 0.084, 288),
      test: rate(0.054, 0.032, 0.089, 280),
    },
    gaps: {
      avoidable_bias: gap(0.01, -0.001, 0.023, 0.08, 0.16),
      variance: gap(0.01, -0.013, 0.043, 0.41, 0.6),
      mismatch: null,
      dev_overfit: gap(0.004, -0.032, 0.041, 0.83, 0.83),
    },
    headroom: { total: 0.00192, bias: 0.00096, variance: 0.00096, mismatch: null },
    yield: 0.0012,
    focus: 'unclear',
    flagged: false,
    rank: 4,
  }),
  slice({
    key: { station: 'S1', lighting: 'ring' },
    rows: { train: 2400, train_dev: 540, dev: 600, test: 590 },
    share: 0.2,
    floor: 0.03,
    error: {
      train: rate(0.031, 0.025, 0.039, 2400),
      train_dev: rate(0.033, 0.02, 0.052, 540),
      dev: rate(0.034, 0.022, 0.051, 600),
      test: rate(0.036, 0.023, 0.054, 590),
    },
    gaps: {
      avoidable_bias: gap(0.001, -0.006, 0.008, 0.79, 0.83),
      variance: gap(0.002, -0.013, 0.02, 0.81, 0.83),
      mismatch: gap(0.001, -0.019, 0.021, 0.92, 0.92),
      dev_overfit: gap(0.002, -0.019, 0.023, 0.86, 0.86),
    },
    headroom: { total: 0.0008, bias: 0.0002, variance: 0.0004, mismatch: 0.0002 },
    yield: 0.0002,
    focus: 'at-floor',
    flagged: false,
    rank: 5,
  }),
  slice({
    key: { station: 'S3', lighting: 'dome' },
    rows: { train: 1200, train_dev: 270, dev: 300, test: 290 },
    share: 0.1,
    floor: 0.05,
    error: {
      train: rate(0.02, 0.013, 0.03, 1200),
      train_dev: rate(0.022, 0.01, 0.048, 270),
      dev: rate(0.025, 0.012, 0.051, 300),
      test: rate(0.028, 0.014, 0.054, 290),
    },
    gaps: {
      avoidable_bias: gap(-0.03, -0.039, -0.02, 0.00001, 0.00005),
      variance: gap(0.002, -0.015, 0.028, 0.87, 0.87),
      mismatch: gap(0.003, -0.024, 0.029, 0.86, 0.86),
      dev_overfit: gap(0.003, -0.024, 0.03, 0.85, 0.86),
    },
    headroom: { total: 0, bias: 0, variance: 0, mismatch: 0 },
    yield: 0,
    focus: 'below-floor',
    flagged: false,
    rank: 6,
  }),
  slice({
    key: { station: 'S9', lighting: 'dome' },
    rows: { train: 40, train_dev: null, dev: 12, test: null },
    share: 0.004,
    floor: 0.03,
    error: {
      train: rate(0.05, 0.014, 0.165, 40),
      train_dev: null,
      dev: rate(0.0833, 0.015, 0.354, 12),
      test: null,
    },
    gaps: { avoidable_bias: null, variance: null, mismatch: null, dev_overfit: null },
    headroom: null,
    yield: null,
    focus: 'thin',
    flagged: false,
    rank: 7,
  }),
];

/**
 * The renderer fixture (hand-built): grouping `station, lighting`, seven slices, one per focus.
 * @returns a fresh copy each call, safe to modify
 */
export function reportFixture(): Report {
  const report: Report = {
    schema: 'floorgap.report/1',
    by: ['station', 'lighting'],
    confidence: 0.95,
    fdr: 0.05,
    fdr_method: 'bh',
    source: {
      inputs: [
        { path: 'runs/2024-06-03/preds.csv', bytes: 1_482_113, modified: '2024-06-03T09:41:27.000Z' },
      ],
      roles: { label: 'defect', prediction: 'pred', split: 'split', weight: null },
      annotators: [],
      where: null,
      version: '0.1.0',
    },
    run: null,
    runs: [],
    overall,
    slices,
    warnings: ['floor table covers 6 of 7 slices; S9 took the default floor 3.0'],
  };
  return structuredClone(report);
}

/** Replaces the label (and key) of the slice ranked `rank` in a fixture copy: fixture (hand-built). */
export function withLabel(report: Report, rank: number, label: string): Report {
  return {
    ...report,
    slices: report.slices.map((s) => (s.rank === rank ? { ...s, label, key: { station: label } } : s)),
  };
}
