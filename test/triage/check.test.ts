/**
 * compareReports: the unpaired comparison of `check --baseline REPORT.json`. Its Newcombe intervals take
 * the check's --confidence (they were always 95 %).
 */
import { describe, expect, it } from 'vitest';
import { compareReports } from '../../src/triage/check.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { reportFixture } from '../helpers/report-fixture.js';
import { expectClose } from '../stats/expect-close.js';

/** The fixture report with one slice, station=S5, whose dev error is `errors` of `n` rows: fixture (invented counts). */
function withDev(errors: number, n: number, confidence: number): Report {
  const base = reportFixture();
  const s5: SliceReport = { ...base.slices[0], key: { station: 'S5' }, label: 'station=S5', focus: 'bias', error: { ...base.slices[0].error, dev: { value: errors / n, lo: 0, hi: 1, n } } };
  return { ...base, by: ['station'], confidence, overall: { ...base.overall, error: { ...base.overall.error, dev: null } }, slices: [s5] };
}

describe('compareReports', () => {
  it("takes the check's confidence for its Newcombe intervals", () => {
    // now 56/70 wrong, before 48/80: Newcombe 1998 Table II example (a), invented as slice counts
    const at90 = compareReports(withDev(56, 70, 0.9), withDev(48, 80, 0.9), 0.05, 'bh', 0.9).find((c) => c.slice === 'station=S5')!;
    // statsmodels 0.13.5: confint_proportions_2indep(56, 70, 48, 80, method='newcomb', compare='diff', alpha=0.1)
    // -> (0.07656419154407207, 0.31364458358294384), as in test/stats/newcombe-interval.test.ts
    expectClose(at90.lo, 0.07656419154407207, 1e-12);
    expectClose(at90.hi, 0.31364458358294384, 1e-12);
    const at95 = compareReports(withDev(56, 70, 0.95), withDev(48, 80, 0.95), 0.05, 'bh', 0.95).find((c) => c.slice === 'station=S5')!;
    // same call with alpha=0.05 -> (0.05243147240236498, 0.33387265403690614)
    expectClose(at95.lo, 0.05243147240236498, 1e-12);
    expectClose(at95.hi, 0.33387265403690614, 1e-12);
    // hand arithmetic: 56/70 − 48/80 = 0.8 − 0.6
    expectClose(at90.change, 0.2, 1e-12);
  });
});
