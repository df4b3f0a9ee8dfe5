/**
 * Telling a saved report from a prediction table (`check --baseline B`), and checking a report's shape.
 * The documents are invented in the test; the corpus's baseline-*.json files go through the CLI in
 * test/e2e/bad-input.test.ts.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkReport, readBaseline } from '../../src/app/baseline.js';
import { failure } from '../helpers/failure.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

let dir: string;
const file = (name: string, text: string) => {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
};

const rate = { value: 0.25, lo: 0.1, hi: 0.4, n: 40 };
const slice = (key: Record<string, string>, label: string) => ({ key, label, focus: 'unclear', error: { train: { ...rate }, train_dev: null, dev: { ...rate }, test: null } });
const report = { schema: 'floorgap.report/1', by: ['station'], overall: slice({}, 'overall'), slices: [slice({ station: 'S1' }, 'station=S1')] };
const { schema: _schema, ...withoutSchema } = report;
const EXPECTED = "expected a report saved with floorgap report --format json (schema floorgap.report/1) or the baseline model's prediction table";

beforeAll(() => {
  dir = makeTempDir();
});
afterAll(() => removeTempDir(dir));

describe('readBaseline: a report or a table', () => {
  it('a report, pretty-printed or on one line (with or without a final newline)', async () => {
    for (const [name, text] of [
      ['pretty.json', JSON.stringify(report, null, 2) + '\n'],
      ['line.json', JSON.stringify(report) + '\n'],
      ['bare.json', JSON.stringify(report)],
      ['schema-last.json', JSON.stringify({ ...withoutSchema, extra: 1, schema: report.schema }, null, 2)], // the key order does not matter
    ] as const) {
      const b = await readBaseline(file(name, text));
      expect(b.kind, name).toBe('report');
      expect(b.kind === 'report' && b.report.slices[0].label).toBe('station=S1');
    }
  });

  it('a JSON Lines table (one object a line) and a CSV table are tables', async () => {
    const jsonl = '{"id": "a", "label": "x", "pred": "x"}\n{"id": "b", "label": "x", "pred": "y"}\n';
    expect(await readBaseline(file('preds.jsonl', jsonl))).toEqual({ kind: 'table' });
    expect(await readBaseline(file('preds.json', jsonl))).toEqual({ kind: 'table' });
    expect(await readBaseline(file('preds.csv', 'id,label,pred\na,x,x\n'))).toEqual({ kind: 'table' });
    // a JSON Lines table whose first row happens to have a "schema" column is still a table
    expect(await readBaseline(file('schema-col.jsonl', '{"schema": "floorgap.report/1", "id": "a"}\n{"schema": "x", "id": "b"}\n'))).toEqual({ kind: 'table' });
  });

  it('JSON documents that are not reports are named, never read as tables', async () => {
    const cases: [string, string, string][] = [
      ['check.json', JSON.stringify({ schema: 'floorgap.check/1', passed: true }, null, 2), `a JSON document with schema "floorgap.check/1"; ${EXPECTED}`],
      ['export.json', JSON.stringify({ schema: 'floorgap.export/1' }), `a JSON document with schema "floorgap.export/1"; ${EXPECTED}`],
      ['array.json', '[]\n', `a JSON document (an array); ${EXPECTED}`],
      ['rows-array.json', '[\n  {"id": "a"}\n]\n', `a JSON document (an array); ${EXPECTED}`],
      ['null.json', 'null\n', `a JSON document (null); ${EXPECTED}`],
      ['number.json', ' 3 ', `a JSON document (number); ${EXPECTED}`],
      ['empty-object.json', '{}\n', `a JSON document (an object without a "schema" key); ${EXPECTED}`],
      ['one-row.jsonl', '{"id": "a", "label": "x", "pred": "x"}\n', `a JSON document (an object without a "schema" key); ${EXPECTED}`],
    ];
    for (const [name, text, message] of cases) {
      const path = file(name, text);
      expect((await failure(readBaseline(path))).message, name).toBe(`${path}: ${message}`);
    }
  });

  it('a pretty-printed document cut short is not valid JSON', async () => {
    const path = file('cut.json', JSON.stringify(report, null, 2).slice(0, 100));
    expect((await failure(readBaseline(path))).message).toMatch(new RegExp(`^${path.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')}: not valid JSON \\(.*\\); expected a report saved with`));
  });

  it('a folder, a missing file', async () => {
    const sub = join(dir, 'sub');
    mkdirSync(sub);
    expect((await failure(readBaseline(sub))).message).toBe(`${sub}: is a folder; expected a report saved with floorgap report --format json or the baseline model's prediction table`);
    expect((await failure(readBaseline(join(dir, 'nope.json')))).message).toBe(`${join(dir, 'nope.json')}: no such file`);
  });
});

describe('checkReport: each field a comparison reads has its type', () => {
  const edit = (f: (r: any) => void) => {
    const r = structuredClone(report) as any;
    f(r);
    return r;
  };
  const cases: [string, (r: any) => void, string][] = [
    ['a text value', (r) => (r.slices[0].error.dev.value = '0.1'), 'slices[0].error.dev.value: expected a number, got "0.1"'],
    ['null for a value', (r) => (r.overall.error.train.value = null), 'overall.error.train.value: expected a number, got null'],
    ['a value above 1', (r) => (r.overall.error.dev.value = 1.5), 'overall.error.dev.value: expected a number in [0, 1], got 1.5'],
    ['n = 0', (r) => (r.slices[0].error.dev.n = 0), 'slices[0].error.dev.n: expected a number > 0, got 0'],
    ['a missing lo', (r) => delete r.slices[0].error.dev.lo, 'slices[0].error.dev.lo: expected a number, got nothing'],
    ['a rate that is a number', (r) => (r.overall.error.dev = 0.25), 'overall.error.dev: expected null or a rate (an object), got 0.25'],
    ['no error object', (r) => delete r.overall.error, 'overall.error: expected an object of rates by split, got nothing'],
    ['a key value that is a number', (r) => (r.slices[0].key.station = 5), 'slices[0].key["station"]: expected a string, got 5'],
    ['a label that is not text', (r) => (r.slices[0].label = ['x']), 'slices[0].label: expected a string, got an array'],
    ['no focus', (r) => delete r.slices[0].focus, 'slices[0].focus: expected a string, got nothing'],
    ['a slice that is text', (r) => (r.slices[0] = 'station=S1'), 'slices[0]: expected a slice (an object), got "station=S1"'],
    ['no overall', (r) => delete r.overall, 'overall: expected a slice (an object), got nothing'],
    ['slices missing', (r) => delete r.slices, 'slices: expected an array, got nothing'],
    ['by as text', (r) => (r.by = 'station'), 'by: expected null or an array of column names, got "station"'],
  ];
  for (const [name, f, message] of cases) {
    it(name, () => {
      let thrown: unknown = null;
      try {
        checkReport('baseline.json', edit(f));
      } catch (e) {
        thrown = e;
      }
      expect((thrown as Error | null)?.message).toBe(`baseline.json: ${message}`);
    });
  }

  it('a whole report passes, and so do null rates and by null', () => {
    expect(checkReport('b.json', report).slices).toHaveLength(1);
    expect(checkReport('b.json', edit((r) => ((r.by = null), (r.slices[0].error.dev = null)))).by).toBeNull();
  });
});
