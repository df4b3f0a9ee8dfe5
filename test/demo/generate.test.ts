import { describe, expect, it } from 'vitest';
import {
  DEMO_CLASSES,
  DEMO_COLUMNS,
  DEMO_DEFAULTS,
  DEMO_FLOORS,
  DEMO_PACKAGES,
  DEMO_PLANTS,
  csvField,
  demoErrorProbability,
  demoFloorCsvLines,
  demoFloorTable,
  demoRowsToCsvLines,
  generateDemoRows,
  type DemoRow,
  type DemoSplit,
} from '../../src/demo/generate.js';
import { Random } from '../../src/demo/random.js';

const take = (rows: number, seed: number): DemoRow[] => [...generateDemoRows({ rows, seed })];

// One large sample shared by the statistical checks below.
const BIG = take(100_000, 11);

type Filter = (r: DemoRow) => boolean;
const inSplit = (split: DemoSplit, f: Filter = () => true) => BIG.filter((r) => r.split === split && f(r));
const errorRate = (rows: DemoRow[]) => rows.filter((r) => r.pred !== r.label).length / rows.length;
/** mean planted error probability of the rows: the exact expectation of errorRate given their mix */
const expectedRate = (rows: DemoRow[]) => rows.reduce((s, r) => s + demoErrorProbability(r), 0) / rows.length;
/** binomial standard error of an observed error rate */
const se = (rows: DemoRow[]) => {
  const p = errorRate(rows);
  return Math.sqrt((p * (1 - p)) / rows.length);
};

const is0201: Filter = (r) => r.package === '0201';
const isQFN: Filter = (r) => r.package === 'QFN';
const isS5: Filter = (r) => r.station === 'S5';
const isLowAngle: Filter = (r) => r.lighting === 'low-angle';
/** outside the S5 and low-angle plants */
const clean: Filter = (r) => !isS5(r) && !isLowAngle(r);

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
    let hits = 0;
    for (let i = 0; i < 20_000; i++) if (r.choice(['a', 'b'], [3, 1]) === 'a') hits++;
    expect(hits / 20_000).toBeCloseTo(0.75, 1);
    let sum = 0;
    let sq = 0;
    for (let i = 0; i < 20_000; i++) {
      const x = r.normal(2, 0.5);
      sum += x;
      sq += x * x;
    }
    const mean = sum / 20_000;
    expect(mean).toBeCloseTo(2, 1);
    expect(Math.sqrt(sq / 20_000 - mean * mean)).toBeCloseTo(0.5, 1);
  });
});

describe('generateDemoRows: shape', () => {
  it('has the documented defaults', () => {
    expect(DEMO_DEFAULTS).toEqual({ rows: 20_000, seed: 7 });
  });

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
    for (const r of BIG.slice(0, 2000)) {
      expect(Object.keys(r)).toEqual([...DEMO_COLUMNS]);
      expect(r.id).toMatch(/^J\d{7}$/);
      expect(['train', 'train_dev', 'dev', 'test']).toContain(r.split);
      expect(['S1', 'S2', 'S3', 'S4', 'S5', 'S6']).toContain(r.station);
      expect(['ring', 'coaxial', 'dome', 'low-angle']).toContain(r.lighting);
      expect(DEMO_PACKAGES).toContain(r.package);
      expect(['HASL', 'ENIG', 'OSP']).toContain(r.finish);
      expect(['day', 'swing', 'night']).toContain(r.shift);
      expect(DEMO_CLASSES).toContain(r.label);
      expect(DEMO_CLASSES).toContain(r.pred);
      expect(r.sharpness).toBeGreaterThanOrEqual(0);
      expect(r.sharpness).toBeLessThanOrEqual(1);
      expect(r.score).toBeGreaterThanOrEqual(0);
      expect(r.score).toBeLessThanOrEqual(1);
      expect(Math.round(r.score * 1000) / 1000).toBe(r.score);
    }
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
      expect(f.n).toBeGreaterThanOrEqual(400);
      expect(f.n).toBeLessThanOrEqual(600);
    }
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

describe('generateDemoRows: distributions', () => {
  it('draws splits about 50/10/20/20', () => {
    const share = (s: DemoSplit) => inSplit(s).length / BIG.length;
    expect(Math.abs(share('train') - 0.5)).toBeLessThan(0.01);
    expect(Math.abs(share('train_dev') - 0.1)).toBeLessThan(0.01);
    expect(Math.abs(share('dev') - 0.2)).toBeLessThan(0.01);
    expect(Math.abs(share('test') - 0.2)).toBeLessThan(0.01);
  });

  it('gives the planted slices sizable shares and good ~70 % of labels', () => {
    const share = (f: Filter) => BIG.filter(f).length / BIG.length;
    expect(Math.abs(share(is0201) - 0.25)).toBeLessThan(0.01);
    expect(Math.abs(share(isQFN) - 0.15)).toBeLessThan(0.01);
    expect(Math.abs(share(isLowAngle) - 0.2)).toBeLessThan(0.01);
    expect(Math.abs(share((r) => r.label === 'good') - 0.7)).toBeLessThan(0.01);
  });

  it('scores correct predictions high and leaves a tail of confident errors', () => {
    const right = BIG.filter((r) => r.pred === r.label);
    const wrong = BIG.filter((r) => r.pred !== r.label);
    expect(Math.min(...right.map((r) => r.score))).toBeGreaterThanOrEqual(0.7);
    const confident = wrong.filter((r) => r.score >= 0.8).length / wrong.length;
    expect(confident).toBeGreaterThan(0.1);
    expect(confident).toBeLessThan(0.3);
    const meanScore = (rows: DemoRow[]) => rows.reduce((s, r) => s + r.score, 0) / rows.length;
    expect(meanScore(right) - meanScore(wrong)).toBeGreaterThan(0.2);
  });

  it('makes sharpness continuous, lower for 0201, and free of its own error effect', () => {
    expect(new Set(BIG.map((r) => r.sharpness)).size).toBeGreaterThan(300);
    const mean = (rows: DemoRow[]) => rows.reduce((s, r) => s + r.sharpness, 0) / rows.length;
    expect(mean(BIG.filter(is0201))).toBeLessThan(mean(BIG.filter((r) => !is0201(r))) - 0.05);
    // Within one package and outside the plants, blurry and sharp images have the same error.
    const rows = BIG.filter((r) => r.package === '0402' && clean(r));
    const sorted = rows.map((r) => r.sharpness).sort((a, b) => a - b);
    const median = sorted[Math.floor(sorted.length / 2)];
    const low = rows.filter((r) => r.sharpness < median);
    const high = rows.filter((r) => r.sharpness >= median);
    expect(Math.abs(errorRate(low) - errorRate(high))).toBeLessThan(0.015);
  });
});

// The expected values below are planted by the demo generator (our own scenario): see DEMO_PLANTS.
describe('generateDemoRows: planted structure (100,000 rows, seed 11)', () => {
  it('computes row error probabilities as floor + additive effects', () => {
    const base = { station: 'S1', lighting: 'ring', package: '0603' } as const;
    expect(demoErrorProbability({ ...base, split: 'dev' })).toBeCloseTo(0.03, 10);
    expect(demoErrorProbability({ ...base, package: 'QFN', split: 'train' })).toBeCloseTo(0.11, 10);
    expect(demoErrorProbability({ ...base, station: 'S5', split: 'train_dev' })).toBeCloseTo(0.03, 10);
    expect(demoErrorProbability({ ...base, station: 'S5', split: 'test' })).toBeCloseTo(0.13, 10);
    expect(demoErrorProbability({ ...base, lighting: 'low-angle', split: 'train' })).toBeCloseTo(0.03, 10);
    expect(demoErrorProbability({ ...base, lighting: 'low-angle', split: 'train_dev' })).toBeCloseTo(0.09, 10);
    expect(
      demoErrorProbability({ station: 'S5', lighting: 'low-angle', package: 'QFN', split: 'dev' }),
    ).toBeCloseTo(0.03 + 0.08 + 0.1 + 0.06, 10);
    expect(DEMO_PLANTS.errorCap).toBe(0.95);
  });

  it('QFN: avoidable bias of +0.08 in train and dev, no variance', () => {
    const floor = DEMO_FLOORS.QFN.floor;
    expect(Math.abs(errorRate(inSplit('train', isQFN)) - floor - 0.08)).toBeLessThan(0.015);
    expect(Math.abs(errorRate(inSplit('dev', (r) => isQFN(r) && clean(r))) - floor - 0.08)).toBeLessThan(0.015);
    // train_dev − train: only the low-angle plant's share (≈ 0.2 · 0.06) on top of noise
    const variance = errorRate(inSplit('train_dev', isQFN)) - errorRate(inSplit('train', isQFN));
    const expected = expectedRate(inSplit('train_dev', isQFN)) - expectedRate(inSplit('train', isQFN));
    expect(Math.abs(variance - expected)).toBeLessThan(3 * Math.hypot(se(inSplit('train_dev', isQFN)), se(inSplit('train', isQFN))));
  });

  it('0201: sits at its high floor of 0.12', () => {
    const floor = DEMO_FLOORS['0201'].floor;
    for (const split of ['train', 'train_dev', 'dev', 'test'] as const) {
      const rows = inSplit(split, (r) => is0201(r) && clean(r));
      expect(Math.abs(errorRate(rows) - floor)).toBeLessThan(3 * se(rows) + 0.002);
    }
    expect(Math.abs(errorRate(inSplit('train', is0201)) - floor)).toBeLessThan(0.01);
    // The whole 0201 slice in dev also carries the S5 and low-angle plants' shares (≈ +0.03).
    const dev = inSplit('dev', is0201);
    expect(Math.abs(errorRate(dev) - expectedRate(dev))).toBeLessThan(0.015);
    expect(expectedRate(dev) - floor).toBeGreaterThan(0.02);
    expect(expectedRate(dev) - floor).toBeLessThan(0.04);
  });

  it('S5: rare in training, 1/6 of production, +0.10 mismatch', () => {
    for (const split of ['train', 'train_dev'] as const) {
      expect(inSplit(split, isS5).length / inSplit(split).length).toBeLessThan(0.03);
    }
    for (const split of ['dev', 'test'] as const) {
      expect(Math.abs(inSplit(split, isS5).length / inSplit(split).length - 1 / 6)).toBeLessThan(0.01);
    }
    const trainDev = inSplit('train_dev', isS5);
    const dev = inSplit('dev', isS5);
    // only ~170 S5 train_dev rows at this size, so allow three standard errors (≈ 0.05)
    expect(Math.abs(errorRate(dev) - errorRate(trainDev) - 0.1)).toBeLessThan(3 * Math.hypot(se(dev), se(trainDev)));
    // against the other stations' dev rows (same mix otherwise) the gap is tight
    expect(Math.abs(errorRate(dev) - errorRate(inSplit('dev', (r) => !isS5(r))) - 0.1)).toBeLessThan(0.015);
    // train and train_dev at the floor
    const train = inSplit('train', isS5);
    expect(Math.abs(errorRate(train) - expectedRate(train))).toBeLessThan(3 * se(train));
  });

  it('low-angle: +0.06 variance from train to train_dev', () => {
    const train = inSplit('train', isLowAngle);
    const trainDev = inSplit('train_dev', isLowAngle);
    expect(Math.abs(errorRate(train) - expectedRate(train))).toBeLessThan(0.01);
    expect(Math.abs(errorRate(trainDev) - errorRate(train) - 0.06)).toBeLessThan(0.02);
    const dev = inSplit('dev', (r) => isLowAngle(r) && !isS5(r));
    expect(Math.abs(errorRate(dev) - errorRate(train) - 0.06)).toBeLessThan(0.02);
  });

  it('a clean slice (0603 outside S5 and low-angle) has train ≈ train_dev ≈ dev ≈ floor', () => {
    const floor = DEMO_FLOORS['0603'].floor;
    const is0603: Filter = (r) => r.package === '0603' && clean(r);
    expect(Math.abs(errorRate(inSplit('train', is0603)) - floor)).toBeLessThan(0.01);
    expect(Math.abs(errorRate(inSplit('train_dev', is0603)) - floor)).toBeLessThan(0.015);
    expect(Math.abs(errorRate(inSplit('dev', is0603)) - floor)).toBeLessThan(0.01);
    expect(Math.abs(errorRate(inSplit('test', is0603)) - floor)).toBeLessThan(0.01);
  });
});
