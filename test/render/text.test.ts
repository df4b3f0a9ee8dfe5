import { describe, expect, it } from 'vitest';
import { stripAnsi } from '../../src/terminal/ansi.js';
import { displayWidth } from '../../src/terminal/width.js';
import { renderText } from '../../src/render/text/report.js';
import type { Report } from '../../src/triage/types.js';
import { reportFixture, withLabel } from '../helpers/report-fixture.js';

// All reports here are the fixture (hand-built) in test/helpers/report-fixture.ts or small edits of it.

function lines(text: string): string[] {
  return text.replace(/\n$/, '').split('\n');
}

/** The table row of a slice: the line holding its label cell (unique in the fixture). */
function rowOf(text: string, label: string): string {
  const found = lines(text).filter((l) => l.includes(label) && /\d/.test(l) && !l.includes('!'));
  expect(found, `one row for ${label}`).toHaveLength(1);
  return found[0];
}

describe('renderText', () => {
  const report = reportFixture();

  it.each([100, 80, 60, 40])('keeps every line within %i columns, with and without colour', (width) => {
    for (const color of [false, true]) {
      const text = renderText(report, { color, width });
      for (const line of lines(stripAnsi(text))) expect(displayWidth(line), line).toBeLessThanOrEqual(width);
    }
  });

  it('defaults to 100 columns and uses them for the table rule', () => {
    const text = renderText(report, { color: false });
    const widths = lines(text).map(displayWidth);
    expect(Math.max(...widths)).toBeLessThanOrEqual(100);
    expect(lines(text)).toContain('─'.repeat(100));
  });

  it('writes the header block: inputs, grouping, settings, overall rows, errors and gaps', () => {
    const text = renderText(report, { color: false, width: 100 });
    expect(text).toContain('floorgap slice report · 7 slices · 3 flagged');
    expect(text).toMatch(/^inputs {4}runs\/2024-06-03\/preds\.csv, 1\.5 MB, modified 2024-06-03 09:41 UTC$/m);
    expect(text).toMatch(/^grouping {2}by station, lighting$/m);
    expect(text).toContain('95% intervals');
    expect(text).toContain('Benjamini-Hochberg');
    // overall rows per split and error with interval
    expect(text).toMatch(/^ {2}train +12,000 +4\.8 {2}\[4\.4, 5\.2\]$/m);
    expect(text).toMatch(/^ {2}train_dev +2,700 +6\.1/m);
    expect(text).toMatch(/^ {2}test +2,900 +8\.3/m);
    expect(text).toMatch(/^ {2}floor +3\.1 {2}\[2\.6, 3\.7\] +floor table and default floor; 3\.2 on dev rows$/m);
    // overall gaps, signed, with p-value
    expect(text).toMatch(/^ {2}avoidable bias +\+1\.7 {2}\[\+1\.3, \+2\.1\] {2}p <0\.001$/m);
    expect(text).toMatch(/^ {2}mismatch +\+1\.8/m);
    expect(text).toMatch(/^ {2}dev overfit +\+0\.4 {2}\[-0\.9, \+1\.7\] {2}p 0\.540$/m);
    expect(text).toMatch(/^warnings {2}! floor table covers 6 of 7 slices/m);
  });

  it('says when the grouping is the overview of one-column slices, and then shows full labels', () => {
    // fixture (hand-built): the same numbers as one-column slices of an overview
    const overview: Report = {
      ...report,
      by: null,
      slices: report.slices.map((s, i) => {
        const [column, value] = i === 1 ? ['lighting', s.key.lighting] : ['station', s.key.station];
        return { ...s, key: { [column]: value }, label: `${column}=${value}` };
      }),
    };
    const text = renderText(overview, { color: false, width: 100 });
    expect(text).toMatch(/^grouping {2}overview: one-column slices$/m);
    expect(text).toMatch(/^#\s+slice\s+rows/m);
    expect(rowOf(text, 'lighting=dome')).toMatch(/^1 \* lighting=dome +600 /);
    expect(rowOf(text, 'station=S2')).toMatch(/^2 \* station=S2 +750 /);
  });

  it('puts the grouping columns in the header and only values in cells when slices share `by`', () => {
    const text = renderText(report, { color: false, width: 100 });
    expect(lines(text).some((l) => /^#\s+station · lighting\s+rows share floor train\s+dev bias\s+var mism headroom yield focus$/.test(l))).toBe(
      true,
    );
    const s5 = rowOf(text, 'S5 · dome');
    expect(s5).toMatch(/^1 \* S5 · dome +600 20\.0% +3\.0 +11\.0 +13\.0 \+8\.0 \+1\.0 \+1\.0 +2\.00 +0\.31 bias$/);
  });

  it('lists the overall row first, then slices by rank, each focus spelled out', () => {
    const text = renderText(report, { color: false, width: 100 });
    const body = lines(text).filter((l) => /^(\d+ | {4}overall)/.test(l));
    expect(body.map((l) => l.match(/(\S+)$/)?.[1])).toEqual([
      'mismatch', // overall
      'bias',
      'variance',
      'mismatch',
      'unclear',
      'at-floor',
      'below-floor',
      'thin',
    ]);
    expect(body[0]).toMatch(/^ {4}overall +3,000 +3\.1 +4\.8 +7\.9 \+1\.7 \+1\.3 \+1\.8 +4\.80 +0\.42 mismatch$/);
  });

  it('marks flagged slices with * and no other row', () => {
    const text = renderText(report, { color: false, width: 100 });
    for (const label of ['S5 · dome', 'S2 · ring', 'S7-rework']) expect(rowOf(text, label)).toMatch(/^\d+ \* /);
    for (const label of ['S4 · diffuse', 'S1 · ring', 'S3 · dome', 'S9 · dome']) {
      expect(rowOf(text, label)).toMatch(/^\d+ {3}\S/);
    }
  });

  it('shows the thin slice with — for what it cannot estimate', () => {
    const text = renderText(report, { color: false, width: 100 });
    const thin = rowOf(text, 'S9 · dome');
    expect(thin).toMatch(/^7 {3}S9 · dome +12 +0\.4% +3\.0 +5\.0 +8\.3 +— +— +— +— +— thin$/);
  });

  it('shows — for a null mismatch and drops the column when no slice has one', () => {
    const text = renderText(report, { color: false, width: 100 });
    expect(rowOf(text, 'S4 · diffuse')).toMatch(/\+1\.0 +\+1\.0 +— +0\.19/);
    const noMismatch: Report = {
      ...report,
      overall: { ...report.overall, gaps: { ...report.overall.gaps, mismatch: null } },
      slices: report.slices.map((s) => ({ ...s, gaps: { ...s.gaps, mismatch: null } })),
    };
    const without = renderText(noMismatch, { color: false, width: 100 });
    expect(without).not.toMatch(/\bmism\b/);
    expect(text).toMatch(/\bmism\b/);
  });

  it('truncates long slice labels with … at 100 columns', () => {
    const text = renderText(report, { color: false, width: 100 });
    expect(rowOf(text, 'S7-rework')).toMatch(/S7-rework-line-north · b…/);
  });

  it('hides low-priority columns at 80 columns and says so in the legend', () => {
    const text = renderText(report, { color: false, width: 80 });
    expect(text).not.toMatch(/\bshare\b.*\bfloor\b/);
    expect(text).toContain('hidden to fit 80 columns: share, train');
    expect(rowOf(text, 'S5 · dome')).toMatch(/^1 \* S5 · dome +600 +3\.0 +13\.0 \+8\.0/);
  });

  it('ends with a legend that explains the columns and units', () => {
    const text = renderText(report, { color: false, width: 100 });
    const legend = lines(text).slice(-5).join(' ');
    expect(legend).toContain('points of error (7.0 = 7%)');
    expect(legend).toContain('bias = train - floor');
    expect(legend).toContain('mism = dev - train_dev');
    expect(legend).toContain('* = flagged');
    expect(legend).toContain('headroom');
    expect(legend).toContain('yield');
  });

  it('emits no escape codes without colour', () => {
    const text = renderText(report, { color: false, width: 100 });
    expect(text).not.toContain('\x1b');
  });

  it('emits SGR codes with colour and reads the same once they are stripped', () => {
    const plain = renderText(report, { color: false, width: 100 });
    const colored = renderText(report, { color: true, width: 100 });
    expect(colored).toContain('\x1b[');
    expect(stripAnsi(colored)).toBe(plain);
    const coloredLines = lines(colored);
    const line = (label: string): string => coloredLines.find((l) => stripAnsi(l).includes(label) && /^\S*\d/.test(stripAnsi(l))) ?? '';
    expect(line('S5 · dome').startsWith('\x1b[1m')).toBe(true); // flagged: bold
    expect(line('S9 · dome').startsWith('\x1b[2m')).toBe(true); // thin: dim
    expect(line('S5 · dome')).toContain('\x1b[31mbias\x1b[39m'); // focus coloured
    expect(line('S1 · ring')).toContain('\x1b[32mat-floor\x1b[39m');
    expect(line('S1 · ring').startsWith('\x1b[')).toBe(false); // neither flagged nor thin
  });

  it('sanitizes hostile labels, paths and warnings (fixture (hand-built) strings)', () => {
    let hostile = withLabel(report, 1, 'S5\x1b[2J');
    hostile = withLabel(hostile, 2, '\x1b]52;c;ZXZpbA==\x07');
    hostile = withLabel(hostile, 3, 'evil\u202Etxt.exe');
    hostile = {
      ...hostile,
      source: { ...hostile.source, inputs: [{ path: 'runs/\x1b[31mred.csv', bytes: 10, modified: 'x\x9b' }] },
      warnings: ['column "a\nb" has\ttabs'],
    };
    for (const color of [false, true]) {
      const text = renderText(hostile, { color, width: 100 });
      const withoutSgr = stripAnsi(text);
      // no raw control (other than the line feeds between lines), no C1, no bidi character
      expect(withoutSgr).not.toMatch(/[\x00-\x09\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069\u200e\u200f\u061c]/);
      expect(withoutSgr).toContain('S5\\x1b[2J');
      expect(withoutSgr).toContain('\\x1b]52;c;ZXZpbA==\\x07');
      expect(withoutSgr).toContain('evil\\u202etxt.exe');
      expect(withoutSgr).toContain('runs/\\x1b[31mred.csv');
      expect(withoutSgr).toContain('column "a\\nb" has\\ttabs');
    }
  });

  it('survives a tiny width without exceeding it', () => {
    const text = renderText(report, { color: false, width: 12 });
    for (const line of lines(text)) expect(displayWidth(line)).toBeLessThanOrEqual(12);
  });
});
