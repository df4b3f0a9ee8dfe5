import { describe, expect, it } from 'vitest';
import { escapeMarkdown, renderMarkdown } from '../../src/render/markdown.js';
import { reportFixture, withLabel } from '../helpers/report-fixture.js';

// Reports are the fixture (hand-built) in test/helpers/report-fixture.ts or small edits of it.

/** Splits a GFM table row into cells, honouring `\|` escapes (as GFM does). */
function cells(row: string): string[] {
  return row
    .slice(2, -2)
    .split(/(?<!\\) \| /)
    .map((c) => c.trim());
}

function tableRows(md: string): string[] {
  return md.split('\n').filter((l) => l.startsWith('| '));
}

describe('escapeMarkdown', () => {
  it('escapes table and inline markup characters', () => {
    expect(escapeMarkdown('a|b')).toBe('a\\|b');
    expect(escapeMarkdown('`code` *em* _u_ <b> [x]')).toBe('\\`code\\` \\*em\\* \\_u\\_ \\<b\\> \\[x\\]');
    expect(escapeMarkdown('back\\slash')).toBe('back\\\\slash');
  });

  it('turns newlines and controls into visible escapes so a row stays on one line', () => {
    expect(escapeMarkdown('a\nb\r\x1b[2J')).toBe('a\\\\nb\\\\r\\\\x1b\\[2J');
  });

  it('escapes a leading block marker', () => {
    expect(escapeMarkdown('# not a heading')).toBe('\\# not a heading');
    expect(escapeMarkdown('-0.5')).toBe('\\-0.5');
  });
});

describe('renderMarkdown', () => {
  const report = reportFixture();

  it('has a heading, an overall summary and warnings', () => {
    const md = renderMarkdown(report);
    expect(md.startsWith('# floorgap slice report\n')).toBe(true);
    expect(md).toContain('7 slices by station, lighting; **3 flagged**');
    expect(md).toContain('floor 3.1 (2.6 to 3.7) from floor table and default floor');
    expect(md).toContain('dev 7.9 (7.0 to 8.9) on 3,000 rows');
    expect(md).toContain('avoidable bias +1.7 (+1.3 to +2.1)');
    expect(md).toContain('- floor table covers 6 of 7 slices');
  });

  it('writes a table with one row per slice plus overall, ranked, with equal cell counts', () => {
    const md = renderMarkdown(report);
    const rows = tableRows(md);
    expect(rows).toHaveLength(2 + 1 + 7);
    const header = cells(rows[0]);
    expect(header).toEqual([
      'rank', 'flagged', 'slice', 'dev rows', 'share', 'floor', 'train', 'train_dev', 'dev', 'test',
      'bias', 'variance', 'mismatch', 'dev overfit', 'headroom', 'yield', 'focus',
    ]);
    for (const row of rows) expect(cells(row)).toHaveLength(header.length);
    expect(cells(rows[2]).slice(0, 3)).toEqual(['', '', '**overall**']);
    expect(cells(rows[3])).toEqual([
      '1', 'yes', 'station=S5 · lighting=dome', '600', '20.0%', '3.0', '11.0', '12.0', '13.0', '13.5',
      '+8.0', '+1.0', '+1.0', '+0.5', '2.00', '0.31', 'bias',
    ]);
    expect(cells(rows[9]).slice(-3)).toEqual(['—', '—', 'thin']);
  });

  it('keeps the table intact when labels hold |, backticks, *, _, <, > and newlines', () => {
    // fixture (hand-built) hostile labels
    let hostile = withLabel(report, 1, 'a|b `c` *d* _e_ <script>');
    hostile = withLabel(hostile, 2, 'line\nbreak|x');
    const md = renderMarkdown(hostile);
    const rows = tableRows(md);
    expect(rows).toHaveLength(10);
    const width = cells(rows[0]).length;
    for (const row of rows) expect(cells(row)).toHaveLength(width);
    expect(cells(rows[3])[2]).toBe('a\\|b \\`c\\` \\*d\\* \\_e\\_ \\<script\\>');
    expect(cells(rows[4])[2]).toBe('line\\\\nbreak\\|x');
    expect(md).not.toContain('<script>');
  });

  it('sanitizes data strings in the summary and warnings too', () => {
    const md = renderMarkdown({ ...report, by: ['st|ation\u202E'], warnings: ['bad\x1b]52;c;ZXZpbA==\x07'] });
    expect(md).toContain('by st\\|ation\\\\u202e');
    expect(md).toContain('- bad\\\\x1b\\]52;c;ZXZpbA==\\\\x07');
    expect(md).not.toMatch(/[\x00-\x09\x0b-\x1f\u202e]/);
  });
});

describe('renderMarkdown grouping', () => {
  it('names the overview of one-column slices', () => {
    const md = renderMarkdown({ ...reportFixture(), by: null });
    expect(md).toContain('7 slices (overview: one-column slices); **3 flagged**');
  });
});
