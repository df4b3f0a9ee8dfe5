import { describe, expect, it } from 'vitest';
import { CSV_COLUMNS, neutralizeFormula, quoteField, renderCsv } from '../../src/render/csv.js';
import { reportFixture, withLabel } from '../helpers/report-fixture.js';

// Reports are the fixture (hand-built) in test/helpers/report-fixture.ts or small edits of it.

/**
 * A strict RFC 4180 reader for the test: CRLF records, quoted fields with doubled quotes. Unquoted
 * fields hold TEXTDATA only (RFC 4180 section 2, the grammar: %x20-21 / %x23-2B / %x2D-7E, here any
 * character but a quote, a comma, CR, LF and TAB), so a bare TAB, CR or LF is an error.
 */
function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let record: string[] = [];
  let field = '';
  let i = 0;
  let quoted = false;
  while (i < text.length) {
    const ch = text[i];
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        field += '"';
        i += 2;
      } else if (ch === '"') {
        quoted = false;
        i++;
      } else {
        field += ch;
        i++;
      }
    } else if (ch === '"' && field === '') {
      quoted = true;
      i++;
    } else if (ch === ',') {
      record.push(field);
      field = '';
      i++;
    } else if (ch === '\r' && text[i + 1] === '\n') {
      record.push(field);
      records.push(record);
      record = [];
      field = '';
      i += 2;
    } else {
      if (ch === '"' || ch === '\n' || ch === '\r' || ch === '\t') throw new Error(`bare ${JSON.stringify(ch)} at ${i}`);
      field += ch;
      i++;
    }
  }
  if (field !== '' || record.length > 0) throw new Error('missing final CRLF');
  return records;
}

function asObjects(text: string): Record<string, string>[] {
  const [header, ...rows] = parseCsv(text);
  return rows.map((r) => Object.fromEntries(header.map((h, i) => [h, r[i]])));
}

describe('renderCsv', () => {
  const report = reportFixture();

  it('has the flat header and one row per slice, overall first', () => {
    const records = parseCsv(renderCsv(report));
    expect(records[0]).toEqual(CSV_COLUMNS);
    expect(records[0].slice(0, 12)).toEqual([
      'rank', 'label', 'flagged', 'focus', 'rows_train', 'rows_train_dev', 'rows_dev', 'rows_test',
      'share', 'floor', 'floor_lo', 'floor_hi',
    ]);
    expect(records[0].slice(12, 17)).toEqual(['floor_source', 'floor_raw', 'floor_audited', 'kappa', 'err_train']);
    expect(records[0].slice(-10)).toEqual([
      'dev_overfit_q', 'headroom', 'headroom_bias', 'headroom_variance', 'headroom_mismatch', 'yield',
      'cost', 'labels_to_halve', 'curve_beta', 'curve_source',
    ]);
    expect(records).toHaveLength(1 + 1 + 7);
    for (const r of records) expect(r).toHaveLength(CSV_COLUMNS.length);
    expect(records.slice(1).map((r) => r[1])).toEqual([
      'overall',
      'station=S5 · lighting=dome',
      'station=S2 · lighting=ring',
      'station=S7-rework-line-north · lighting=backlit-polarised',
      'station=S4 · lighting=diffuse',
      'station=S1 · lighting=ring',
      'station=S3 · lighting=dome',
      'station=S9 · lighting=dome',
    ]);
  });

  it('writes fractions as stored and nulls as empty cells', () => {
    const rows = asObjects(renderCsv(report));
    const s5 = rows[1];
    expect(s5).toMatchObject({ rank: '1', flagged: 'true', focus: 'bias', share: '0.2', floor: '0.03', floor_source: 'table' });
    expect(s5).toMatchObject({ err_dev: '0.13', err_dev_lo: '0.105', bias: '0.08', bias_q: '7e-7', headroom: '0.02' });
    expect(rows[0]).toMatchObject({ label: 'overall', floor_source: 'mixed', bias_q: '', variance_lo: '0.003' });
    const thin = rows[7];
    expect(thin).toMatchObject({ focus: 'thin', rows_train_dev: '', err_train_dev: '', bias: '', headroom: '', yield: '' });
    const noTest = rows[3];
    expect(noTest).toMatchObject({ rows_test: '', err_test: '', dev_overfit: '', dev_overfit_q: '' });
    const noTrainDev = rows[4];
    expect(noTrainDev).toMatchObject({ mismatch: '', headroom_mismatch: '', variance: '0.01' });
    expect(rows[6]).toMatchObject({ bias: '-0.03', bias_lo: '-0.039' }); // negative numbers are not neutralised
  });

  it('quotes commas, quotes and newlines (RFC 4180) and reads back the same text', () => {
    const label = 'a,b "c"\nd\r\ne';
    const csv = renderCsv(withLabel(report, 1, label));
    expect(csv).toContain('"a,b ""c""\nd\r\ne"');
    expect(asObjects(csv)[1].label).toBe(label);
  });

  it('quotes a field holding a TAB or a lone CR, and reads back the exact text', () => {
    const labels = ['station=\r X', 'station=B\tY', 'a\tb,c', 'x\ry"z', 'plain'];
    let r = report;
    labels.forEach((label, i) => (r = withLabel(r, i + 1, label)));
    const csv = renderCsv(r);
    expect(csv).toContain('"station=\r X"');
    expect(csv).toContain('"station=B\tY"');
    expect(csv).toContain(',plain,');
    expect(asObjects(csv).slice(1, 6).map((o) => o.label)).toEqual(labels);
  });

  it('neutralises formula-leading text but not numbers', () => {
    let hostile = withLabel(report, 1, '=SUM(A1)');
    hostile = withLabel(hostile, 2, '-0.5');
    hostile = withLabel(hostile, 3, '@cmd');
    hostile = withLabel(hostile, 4, '\tx');
    hostile = withLabel(hostile, 5, '+1');
    const rows = asObjects(renderCsv(hostile));
    expect(rows.slice(1, 6).map((r) => r.label)).toEqual(["'=SUM(A1)", "'-0.5", "'@cmd", "'\tx", "'+1"]);
    expect(rows[6].bias).toBe('-0.03');
  });

  it('escapes terminal controls in text cells', () => {
    const csv = renderCsv(withLabel(report, 1, 'S5\x1b[2J\u202E'));
    expect(csv).toContain('S5\\x1b[2J\\u202e');
    expect(csv).not.toContain('\x1b');
  });

  it('exposes its quoting and neutralising helpers', () => {
    expect(quoteField('plain')).toBe('plain');
    expect(quoteField('a,"b"')).toBe('"a,""b"""');
    expect(quoteField('a\tb')).toBe('"a\tb"');
    expect(quoteField('a\rb')).toBe('"a\rb"');
    expect(neutralizeFormula('=SUM(A1)')).toBe("'=SUM(A1)");
    expect(neutralizeFormula('\rx')).toBe("'\rx");
    expect(neutralizeFormula('S5')).toBe('S5');
  });
});
