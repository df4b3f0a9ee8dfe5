import { describe, expect, it } from 'vitest';
import { renderJson } from '../../src/render/json.js';
import type { Report } from '../../src/triage/types.js';
import { reportFixture, withLabel } from '../helpers/report-fixture.js';

// Reports are the fixture (hand-built) in test/helpers/report-fixture.ts or small edits of it.

describe('renderJson', () => {
  it('parses back equal to the report, with two-space indent and a final newline', () => {
    const report = reportFixture();
    const json = renderJson(report);
    expect(json.endsWith('}\n')).toBe(true);
    expect(json).toContain('\n  "schema": "floorgap.report/1",');
    expect(JSON.parse(json)).toEqual(report);
  });

  it('turns NaN and infinities into null', () => {
    const report = reportFixture();
    const broken: Report = {
      ...report,
      overall: { ...report.overall, yield: Number.NaN, share: Number.POSITIVE_INFINITY },
      slices: report.slices.map((s, i) => (i === 0 ? { ...s, headroom: { ...s.headroom!, total: Number.NEGATIVE_INFINITY } } : s)),
    };
    const parsed = JSON.parse(renderJson(broken)) as Report;
    expect(parsed.overall.yield).toBeNull();
    expect(parsed.overall.share).toBeNull();
    expect(parsed.slices[0].headroom?.total).toBeNull();
    expect(renderJson(broken)).not.toMatch(/NaN|Infinity/);
  });

  it('writes C1 and bidi characters as \\u escapes that parse back to the same label', () => {
    const label = 'S5\x1b[2J\u202e\u009b';
    const json = renderJson(withLabel(reportFixture(), 1, label));
    expect(json).not.toMatch(/[\x00-\x09\x0b-\x1f\x7f-\x9f\u202e]/);
    expect(json).toContain('S5\\u001b[2J\\u202e\\u009b');
    const parsed = JSON.parse(json) as Report;
    expect(parsed.slices.find((s) => s.rank === 1)?.label).toBe(label);
  });
});
