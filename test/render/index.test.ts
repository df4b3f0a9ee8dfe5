import { describe, expect, it } from 'vitest';
import { FORMATS, render, renderCsv, renderJson, renderMarkdown, renderText } from '../../src/render/index.js';
import { FloorgapError } from '../../src/core/errors.js';
import { reportFixture } from '../helpers/report-fixture.js';

// The report is the fixture (hand-built) in test/helpers/report-fixture.ts.

describe('render', () => {
  const report = reportFixture();

  it('dispatches each format to its renderer', () => {
    expect(FORMATS).toEqual(['text', 'md', 'csv', 'json']);
    expect(render(report, 'text', { color: false })).toBe(renderText(report, { color: false }));
    expect(render(report, 'text', { color: true, width: 80 })).toBe(renderText(report, { color: true, width: 80 }));
    expect(render(report, 'md', { color: true })).toBe(renderMarkdown(report));
    expect(render(report, 'csv', { color: true })).toBe(renderCsv(report));
    expect(render(report, 'json', { color: true })).toBe(renderJson(report));
  });

  it('colours only text', () => {
    for (const format of ['md', 'csv', 'json'] as const) {
      expect(render(report, format, { color: true })).not.toContain('\x1b');
    }
  });

  it('rejects an unknown format with a user-facing error', () => {
    expect(() => render(report, 'xml' as never, { color: false })).toThrow(FloorgapError);
    expect(() => render(report, 'xml' as never, { color: false })).toThrow(/"xml": expected one of text, md, csv, json/);
  });
});
