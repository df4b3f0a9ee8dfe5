/**
 * The changes of a comparison from hand-built paired sums and rates: each split's change, a change of
 * two splits by MOVER of their Tango intervals, q-values over every slice × measure, verdicts, --margin
 * and the reading. The reports are the renderer fixture's slices with their keys and focus replaced:
 * only their keys, focus and (unpaired) error rates are read.
 */
import { describe, expect, it } from 'vitest';
import { compareSides, pairedChange, reading } from '../../src/compare/changes.js';
import type { PairedSlices, PairedSplitSums } from '../../src/compare/paired-rollup.js';
import type { CompareOptions, SplitPairingInfo } from '../../src/compare/types.js';
import type { Split } from '../../src/core/split.js';
import { newcombeInterval } from '../../src/stats/index.js';
import { sliceId } from '../../src/triage/report.js';
import type { Rate, Report, SliceReport } from '../../src/triage/types.js';
import { reportFixture } from '../helpers/report-fixture.js';
import { expectClose } from '../stats/expect-close.js';

const OPTIONS: CompareOptions = { confidence: 0.95, fdr: 0.05, fdrMethod: 'bh', margin: null };

/** Unit-weight sums of n pairs, b of them wrong before and right after, c right before and wrong after. */
function unit(n: number, b: number, c: number): PairedSplitSums {
  return { pairs: n, sumW: n, sumW2: n, bSumW: b, bSumW2: b, cSumW: c, cSumW2: c };
}

function reportOf(slices: { key: Record<string, string>; error?: Partial<Record<Split, Rate>> }[]): Report {
  const base = reportFixture();
  const make = (key: Record<string, string>, error: Partial<Record<Split, Rate>> = {}): SliceReport => ({
    ...base.overall,
    key,
    label: Object.keys(key).length ? Object.entries(key).map(([k, v]) => `${k}=${v}`).join(' · ') : 'overall',
    focus: 'bias',
    error: { train: null, train_dev: null, dev: null, test: null, ...error },
  });
  const [first, ...rest] = slices;
  return { ...base, by: ['station'], overall: make(first.key, first.error), slices: rest.map((s) => make(s.key, s.error)) };
}

function pairingAll(method: 'paired' | 'unpaired', present: readonly Split[]): Record<Split, SplitPairingInfo> {
  const info = (s: Split): SplitPairingInfo => ({ method: present.includes(s) ? method : 'absent', pairs: 0, before_rows: 0, after_rows: 0 });
  return { train: info('train'), train_dev: info('train_dev'), dev: info('dev'), test: info('test') };
}

describe('paired changes', () => {
  // invented counts: train 400 pairs (b 30, c 10), train_dev and dev 300 pairs (b 12, c 20), no test
  const sums = { train: unit(400, 30, 10), train_dev: unit(300, 12, 20), dev: unit(300, 12, 20) };
  const paired: PairedSlices = new Map([
    [sliceId({}), sums],
    [sliceId({ station: 'S1' }), sums],
  ]);
  const sides = reportOf([{ key: {} }, { key: { station: 'S1' } }]);
  const pairing = pairingAll('paired', ['train', 'train_dev', 'dev']);

  it('each measure: value, interval, p, q and verdict', () => {
    const c = compareSides(sides, sides, paired, pairing, OPTIONS, []);
    const s = c.slices[0].change;
    // hand arithmetic: d_dev = (20 − 12)/300
    expectClose(s.dev_error!.value, 8 / 300, 1e-15);
    // independent scipy 1.17.1 inversion of Tango's score statistic (constrained MLE by minimize_scalar,
    // ends by brentq; the script is in docs/method.md, "Comparing two models"): [-0.010836894766, 0.066043145092]
    expectClose(s.dev_error!.lo, -0.010836894766382525, 1e-8);
    expectClose(s.dev_error!.hi, 0.06604314509217657, 1e-8);
    // scipy 1.17.1: chi2.sf((20 − 12)**2 / 32, 1) → 0.15729920705028105 (32 discordant pairs: the score test)
    expectClose(s.dev_error!.p, 0.15729920705028105, 1e-9);
    expect(s.dev_error!.verdict).toBe('no-clear-change');
    // hand arithmetic: d_train = (10 − 30)/400 = −0.05; scipy 1.17.1: chi2.sf(400 / 40, 1) → 0.001565402258002549
    expectClose(s.avoidable_bias!.value, -0.05, 1e-15);
    expectClose(s.avoidable_bias!.p, 0.001565402258002549, 1e-10);
    expect(s.avoidable_bias!.verdict).toBe('fell');
    // Δvariance = d_train_dev − d_train = 8/300 + 0.05 (hand arithmetic); its MOVER interval of the two
    // Tango intervals and the level at which its lower end reaches 0, from the same scipy 1.17.1 inversion
    // and brentq over the level: [0.028631034847, 0.128124430882], p 0.0026026436460675484
    expectClose(s.variance!.value, 8 / 300 + 0.05, 1e-15);
    expectClose(s.variance!.lo, 0.02863103484671719, 1e-8);
    expectClose(s.variance!.hi, 0.1281244308822082, 1e-8);
    expectClose(s.variance!.p, 0.0026026436460675484, 1e-8);
    expect(s.variance!.verdict).toBe('rose');
    // Δmismatch = d_dev − d_train_dev = 0: p 1
    expect(s.mismatch!.value).toBe(0);
    expect(s.mismatch!.p).toBe(1);
    expect(s.dev_overfit).toBeNull();
    // BH over 8 p-values (overall and S1 alike: 0.00157 ×2, 0.0026 ×2, 0.157 ×2, 1 ×2), hand arithmetic:
    // q = min over ranks ≥ r of p·8/rank = 0.0026026·8/4 for bias and variance
    expectClose(s.avoidable_bias!.q, (0.0026026436460675484 * 8) / 4, 1e-8);
    expectClose(s.variance!.q, (0.0026026436460675484 * 8) / 4, 1e-8);
    expect(s.variance!.paired).toBe(true);
    expect(c.slices[0].reading).toBe('bias fell 5.0 pts but variance rose 7.7: dev error no clear change');
  });

  it('--margin: an unclear change whose interval lies within ±M reads within margin', () => {
    const c = compareSides(sides, sides, paired, pairing, { ...OPTIONS, margin: 0.1 }, []);
    expect(c.slices[0].change.dev_error!.verdict).toBe('within-margin');
    // MOVER of an interval with itself (hand arithmetic): ±√(0.0375² + 0.0394²) ≈ ±0.054, inside ±0.1
    expect(c.slices[0].change.mismatch!.verdict).toBe('within-margin');
    expect(c.slices[0].change.variance!.verdict).toBe('rose');
    expect(c.slices[0].reading).toBe('bias fell 5.0 pts but variance rose 7.7: dev error within ±10.0 pts');
    // a margin narrower than the interval leaves it unclear
    const narrow = compareSides(sides, sides, paired, pairing, { ...OPTIONS, margin: 0.01 }, []);
    expect(narrow.slices[0].change.dev_error!.verdict).toBe('no-clear-change');
  });

  it('improved dev error with a part that fell calls the lever working; a regressed slice sorts first', () => {
    // invented counts: S2 dev 500 pairs b 40 c 10 (improved), train 500 pairs b 40 c 10; S3 dev b 10 c 40 (regressed)
    const good = { train: unit(500, 40, 10), dev: unit(500, 40, 10) };
    const bad = { train: unit(500, 20, 20), dev: unit(500, 10, 40) };
    const map: PairedSlices = new Map([
      [sliceId({}), { train: unit(1000, 60, 30), dev: unit(1000, 50, 50) }],
      [sliceId({ station: 'S2' }), good],
      [sliceId({ station: 'S3' }), bad],
    ]);
    const r = reportOf([{ key: {} }, { key: { station: 'S2' } }, { key: { station: 'S3' } }]);
    const c = compareSides(r, r, map, pairingAll('paired', ['train', 'dev']), OPTIONS, []);
    expect(c.slices.map((s) => s.label)).toEqual(['station=S3', 'station=S2']);
    const s2 = c.slices[1];
    // scipy 1.17.1: chi2.sf(30**2 / 50, 1) → 2.2090496998585475e-05
    expectClose(s2.change.dev_error!.p, 2.2090496998585475e-5, 1e-12);
    expect(s2.change.dev_error!.verdict).toBe('improved');
    // without train_dev, Δvariance = d_dev − d_train = 0 (hand arithmetic)
    expect(s2.change.variance!.value).toBe(0);
    expect(s2.change.mismatch).toBeNull();
    expect(s2.reading).toBe('bias fell 6.0 pts: dev error improved 6.0 pts (bias lever working)');
    expect(c.slices[0].change.dev_error!.verdict).toBe('regressed');
    expect(c.slices[0].reading).toBe('variance rose 6.0 pts: dev error regressed 6.0 pts');
    expect(c.overall.change.dev_error!.verdict).toBe('no-clear-change');
  });

  it('below 25 discordant pairs the p-value is the exact binomial test, as check does', () => {
    // scipy 1.17.1: binomtest(3, 12, 0.5).pvalue → 0.14599609375
    expectClose(pairedChange(unit(32, 3, 9))!.p, 0.14599609375, 1e-12);
    // weighted: effective counts (hand arithmetic: weights 2 on every pair, Σw = 64, Σw² = 128 → n_eff 32, b 3, c 9)
    expectClose(pairedChange({ pairs: 32, sumW: 64, sumW2: 128, bSumW: 6, bSumW2: 12, cSumW: 18, cSumW2: 36 })!.p, 0.14599609375, 1e-12);
  });

  it('a thin slice is not judged and leaves the test family', () => {
    const r = reportOf([{ key: {} }, { key: { station: 'S1' } }]);
    const thin = { ...r, slices: r.slices.map((s) => ({ ...s, focus: 'thin' as const })) };
    const c = compareSides(r, thin, paired, pairing, OPTIONS, []);
    expect(c.slices[0].change.dev_error!.verdict).toBe('thin');
    expect(c.slices[0].change.dev_error!.q).toBeNull();
    expect(c.slices[0].reading).toBe('thin on one side: not judged');
    // the family is the overall slice's 4 p-values: bias q = 0.0026026·4/2 (hand arithmetic: BH, ranks 1–2 take the rank-2 value)
    expectClose(c.overall.change.avoidable_bias!.q, (0.0026026436460675484 * 4) / 2, 1e-8);
  });
});

describe('unpaired changes', () => {
  it("a split that does not pair: the difference of the two rates with Newcombe's interval", () => {
    // Newcombe 1998 (Stat. Med. 17:873), Table II, 56/70 − 48/80: method 10 gives [0.0524, 0.3339]
    const before = reportOf([{ key: {}, error: { dev: { value: 48 / 80, lo: 0, hi: 1, n: 80 }, train: { value: 0.1, lo: 0, hi: 1, n: 100 } } }]);
    const after = reportOf([{ key: {}, error: { dev: { value: 56 / 70, lo: 0, hi: 1, n: 70 }, train: { value: 0.1, lo: 0, hi: 1, n: 100 } } }]);
    const c = compareSides(before, after, null, pairingAll('unpaired', ['train', 'dev']), OPTIONS, []);
    const dev = c.overall.change.dev_error!;
    expectClose(dev.value, 0.2, 1e-12);
    expectClose(dev.lo, 0.0524, 1e-4);
    expectClose(dev.hi, 0.3339, 1e-4);
    expect(dev.lo).toBe(newcombeInterval(56, 70, 48, 80, 0.95)!.lo);
    // the p-value inverts the same interval (moverPValue's example, to 1e-4): 0.0081
    expectClose(dev.p, 0.0081, 1e-4);
    expect(dev.paired).toBe(false);
    expect(c.overall.change.avoidable_bias!.value).toBe(0);
  });
});

describe('reading', () => {
  it('names the parts that fell, then those that rose, then dev error', () => {
    const ch = (value: number, verdict: 'fell' | 'rose' | 'no-clear-change') => ({ value, lo: null, hi: null, p: null, q: null, verdict, paired: true });
    // the example: variance −4.1 points, bias +3.9 points
    const text = reading(
      { dev_error: ch(0.002, 'no-clear-change'), avoidable_bias: ch(0.039, 'rose'), variance: ch(-0.041, 'fell'), mismatch: null, dev_overfit: null },
      null,
    );
    expect(text).toBe('variance fell 4.1 pts but bias rose 3.9: dev error no clear change');
  });
});
