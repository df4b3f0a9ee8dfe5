import { describe, it, expect } from 'vitest';
import * as stats from '../../src/stats/index.js';

describe('src/stats/index.ts', () => {
  it('re-exports the public API', () => {
    // contract (this module): the agreed export list
    const names = [
      'normalQuantile',
      'normalCdf',
      'zForConfidence',
      'kishEffectiveN',
      'wilsonInterval',
      'newcombeInterval',
      'moverInterval',
      'moverLimits',
      'moverPValue',
      'intervalPValue',
      'binomialTestTwoSided',
      'proportionTest',
      'twoProportionTest',
      'mcnemarTest',
      'tangoScoreTest',
      'tangoInterval',
      'pairedMeanInterval',
      'benjaminiHochberg',
      'benjaminiYekutieli',
      'cohensKappa',
      'fleissKappa',
      'fleissItemAgreement',
      'fitBetaPrior',
      'betaPosterior',
      'fitPowerLaw',
      'logGapWeight',
      'chao1',
      'naturalBreaks',
    ];
    for (const name of names) expect(typeof (stats as Record<string, unknown>)[name]).toBe('function');
    expect(Object.keys(stats).sort()).toEqual([...names].sort());
  });

  it('exports the BetaPrior and PowerLawFit types', () => {
    // type-level check (compiled by tsc -p tsconfig.test.json); contract (fitBetaPrior): one group -> Beta(x, n − x), pooled
    const prior: stats.BetaPrior = stats.fitBetaPrior([{ x: 3, n: 10 }]);
    expect(prior).toEqual({ alpha: 3, beta: 7, method: 'pooled' });
    // contract (fitPowerLaw): fewer than two distinct n -> null
    const fit: stats.PowerLawFit | null = stats.fitPowerLaw([{ n: 10, g: 0.1 }]);
    expect(fit).toBeNull();
  });

  it('exports the McNemarResult type', () => {
    // type-level check (compiled by tsc -p tsconfig.test.json); contract (mcnemarTest): no discordant pairs -> p = 1
    const result: stats.McNemarResult = stats.mcnemarTest(0, 0);
    expect(result).toEqual({ statistic: null, p: 1, method: 'exact' });
  });

  it('exports the TangoScoreResult type', () => {
    // type-level check (compiled by tsc -p tsconfig.test.json); contract (tangoScoreTest): no discordant pairs -> z = 0, p = 1
    const result: stats.TangoScoreResult | null = stats.tangoScoreTest(0, 0, 10);
    expect(result).toEqual({ z: 0, statistic: 0, p: 1 });
  });

  it('exports the PairedWeightSums and PairedMean types', () => {
    // type-level check (compiled by tsc -p tsconfig.test.json); contract (pairedMeanInterval): no weight -> null
    const sums: stats.PairedWeightSums = { sumW: 0, sumW2: 0, bSumW: 0, bSumW2: 0, cSumW: 0, cSumW2: 0 };
    const result: stats.PairedMean | null = stats.pairedMeanInterval(sums);
    expect(result).toBeNull();
  });

  it('exports the Interval type', () => {
    // type-level check (compiled by tsc -p tsconfig.test.json): Newcombe 1998 (17:857) Table II, 0/20 -> 0 to 0.1611
    const ci: stats.Interval | null = stats.wilsonInterval(0, 20);
    expect(ci?.lo).toBe(0);
  });
});
