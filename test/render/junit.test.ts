import { XMLParser } from 'fast-xml-parser';
import { describe, expect, it } from 'vitest';
import { renderJunit, xmlEscape } from '../../src/render/junit.js';
import { checkResult } from '../../src/triage/check.js';

describe('xmlEscape', () => {
  it('escapes markup and replaces characters XML 1.0 cannot carry', () => {
    // XML 1.0 §2.2 (allowed characters) and §2.4 (escaping & and <)
    expect(xmlEscape(`a<b>&"c'`)).toBe('a&lt;b&gt;&amp;&quot;c&apos;');
    expect(xmlEscape('S5\x1b[2J\x07')).toBe('S5\uFFFD[2J\uFFFD');
    expect(xmlEscape('tab\tok')).toBe('tab\tok');
  });
});

describe('renderJunit', () => {
  // fixture (hand-built): one failing limit, one thin slice, one regression
  const result = checkResult({
    strict: false,
    fdr: 0.05,
    fdr_method: 'bh',
    limits: { 'max-bias': 0.05 },
    checks: [
      { slice: 'overall', key: {}, limit: 'max-bias', threshold: 0.05, value: 0.01, lo: 0.0, hi: 0.02, status: 'pass' },
      { slice: 'station=<S5>', key: { station: '<S5>' }, limit: 'max-bias', threshold: 0.05, value: 0.09, lo: 0.07, hi: 0.11, status: 'fail' },
      { slice: 'station=S9', key: { station: 'S9' }, limit: 'max-bias', threshold: 0.05, value: 0.2, lo: 0.0, hi: 0.5, status: 'thin' },
    ],
    baseline: { path: 'b.json', kind: 'report' },
    comparisons: [
      { slice: 'station=S3', key: { station: 'S3' }, before: 0.05, after: 0.09, change: 0.04, lo: 0.02, hi: 0.06, p: 0.0001, q: 0.0003, method: 'two-proportion', status: 'regressed' },
    ],
    warnings: [],
    sliceCount: 3,
  });

  it('parses, counts tests, failures and skips, and names each case by slice and limit', () => {
    const xml = new XMLParser({ ignoreAttributes: false }).parse(renderJunit(result));
    const suite = xml.testsuites.testsuite;
    expect(suite['@_tests']).toBe('4'); // 3 limit cases + 1 baseline case (fixture)
    expect(suite['@_failures']).toBe('2');
    expect(suite['@_skipped']).toBe('1');
    const names = (suite.testcase as Array<Record<string, string>>).map((c) => c['@_name']);
    expect(names).toEqual(['overall · max-bias 5.0', 'station=<S5> · max-bias 5.0', 'station=S9 · max-bias 5.0', 'station=S3 · dev error vs baseline']);
    expect(result.passed).toBe(false);
    expect(result.counts).toEqual({ slices: 3, violations: 1, regressions: 1, improvements: 0, thin: 1 });
  });
});
