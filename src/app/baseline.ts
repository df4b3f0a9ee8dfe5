/**
 * What `check --baseline B` was given: a report saved with `floorgap report --format json`
 * (`floorgap.report/1`), or the baseline model's prediction table. A JSON document — one JSON value,
 * pretty-printed or on one line — is never read as a table: it is a report of the right schema and
 * shape, or an error saying what it is. A JSON Lines table (one object a line) is a table.
 */
import { promises as fs } from 'node:fs';
import type { Report } from '../triage/types.js';
import { error } from '../core/errors.js';

/** What the baseline file holds. */
export type Baseline = { readonly kind: 'report'; readonly report: Report } | { readonly kind: 'table' };

const EXPECTED = 'expected a report saved with floorgap report --format json (schema floorgap.report/1) or the baseline model\'s prediction table';
/** Bytes read to tell a JSON document from a table. */
const HEAD_BYTES = 1 << 20;

/**
 * Reads the start of the baseline file and decides what it holds; a JSON document is read whole and
 * checked as a report ({@link checkReport}).
 * @param path the baseline, as given
 * @returns the report, or `table` for a prediction table (read by the engine)
 * @throws FloorgapError for a missing file, a folder, JSON that is not a floorgap.report/1 report, or a
 *   report whose fields do not have the expected types
 * @example
 * await readBaseline('baseline.json'); // => { kind: 'report', report: { schema: 'floorgap.report/1', … } }
 * await readBaseline('preds-old.csv'); // => { kind: 'table' }
 */
export async function readBaseline(path: string): Promise<Baseline> {
  const stat = await fs.stat(path).catch((e: NodeJS.ErrnoException) => {
    throw error(`${path}: ${e.code === 'ENOENT' ? 'no such file' : `cannot read (${e.code})`}`, e);
  });
  if (stat.isDirectory()) throw error(`${path}: is a folder; expected a report saved with floorgap report --format json or the baseline model's prediction table`);
  const handle = await fs.open(path, 'r').catch((e: NodeJS.ErrnoException) => {
    throw error(`${path}: cannot read (${e.code})`, e);
  });
  let head: string;
  let whole: boolean;
  try {
    const buf = Buffer.alloc(HEAD_BYTES);
    const { bytesRead } = await handle.read(buf, 0, HEAD_BYTES, 0);
    whole = bytesRead < HEAD_BYTES;
    head = buf.subarray(0, bytesRead).toString('utf8').replace(/^\ufeff/, '');
  } finally {
    await handle.close();
  }
  if (!isJsonDocument(head, whole)) return { kind: 'table' };
  const text = whole ? head : await fs.readFile(path, 'utf8');
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw error(`${path}: not valid JSON (${(e as Error).message}); ${EXPECTED}`, e);
  }
  return { kind: 'report', report: checkReport(path, value) };
}

/**
 * True when the start of a file is one JSON document rather than a table: it starts with `[`, or with
 * `{` and is not JSON Lines (a first line that is a whole object, with more after it); a small file
 * that parses as one JSON value (`null`, `3`) is one too.
 */
function isJsonDocument(head: string, whole: boolean): boolean {
  const start = head.search(/\S/);
  if (start < 0) return false;
  const c = head[start];
  if (c === '[') return true;
  if (c !== '{') {
    if (!whole) return false;
    try {
      JSON.parse(head);
      return true;
    } catch {
      return false;
    }
  }
  const nl = head.indexOf('\n', start);
  if (nl < 0) return true; // one line: a report written on one line (or a one-row table, which cannot pair)
  const rest = head.slice(nl);
  if (whole && rest.trim() === '') return true;
  try {
    const first = JSON.parse(head.slice(start, nl)) as unknown;
    return !(first !== null && typeof first === 'object' && !Array.isArray(first));
  } catch {
    return true; // "{" alone, as in a pretty-printed report
  }
}

/** A value as an error shows it: scalars as JSON, containers by kind. */
function shown(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (Array.isArray(v)) return 'an array';
  if (v !== null && typeof v === 'object') return 'an object';
  const s = JSON.stringify(v);
  return s.length > 40 ? `${s.slice(0, 39)}…` : s;
}

const isObject = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);

/**
 * Checks a parsed JSON document as a baseline report: the schema, then the type of every field a
 * comparison reads (`by`; each slice's `key`, `label`, `focus` and its error rates, each null or
 * `{value, lo, hi, n}` of finite numbers with value in [0, 1] and n > 0).
 * @param path the file, for the message
 * @param value the parsed document
 * @returns the report
 * @throws FloorgapError `baseline.json: slices[3].error.dev.value: expected a number, got "0.1"`
 * @example
 * checkReport('b.json', { schema: 'floorgap.check/1' });
 * // => FloorgapError('b.json: a JSON document with schema "floorgap.check/1"; expected a report saved with …')
 */
export function checkReport(path: string, value: unknown): Report {
  if (!isObject(value)) throw error(`${path}: a JSON document (${value === null ? 'null' : Array.isArray(value) ? 'an array' : typeof value}); ${EXPECTED}`);
  if (!('schema' in value)) throw error(`${path}: a JSON document (an object without a "schema" key); ${EXPECTED}`);
  if (value.schema !== 'floorgap.report/1') throw error(`${path}: a JSON document with schema ${shown(value.schema)}; ${EXPECTED}`);
  const bad = (field: string, what: string, v: unknown) => error(`${path}: ${field}: expected ${what}, got ${shown(v)}`);
  const by = value.by;
  if (by !== null && !(Array.isArray(by) && by.every((b) => typeof b === 'string'))) throw bad('by', 'null or an array of column names', by);
  const number = (field: string, v: unknown, lo: number, hi: number, open = false) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) throw bad(field, 'a number', v);
    if (v < lo || v > hi || (open && v === lo)) throw bad(field, `a number ${open ? `> ${lo}` : `in [${lo}, ${hi}]`}`, v);
  };
  const slice = (field: string, s: unknown) => {
    if (!isObject(s)) throw bad(field, 'a slice (an object)', s);
    if (!isObject(s.key)) throw bad(`${field}.key`, 'an object of column values', s.key);
    for (const [col, v] of Object.entries(s.key)) if (typeof v !== 'string') throw bad(`${field}.key[${JSON.stringify(col)}]`, 'a string', v);
    if (typeof s.label !== 'string') throw bad(`${field}.label`, 'a string', s.label);
    if (typeof s.focus !== 'string') throw bad(`${field}.focus`, 'a string', s.focus);
    if (!isObject(s.error)) throw bad(`${field}.error`, 'an object of rates by split', s.error);
    for (const split of ['train', 'train_dev', 'dev', 'test']) {
      const rate = s.error[split];
      const at = `${field}.error.${split}`;
      if (rate === null || rate === undefined) continue;
      if (!isObject(rate)) throw bad(at, 'null or a rate (an object)', rate);
      number(`${at}.value`, rate.value, 0, 1);
      number(`${at}.lo`, rate.lo, 0, 1);
      number(`${at}.hi`, rate.hi, 0, 1);
      number(`${at}.n`, rate.n, 0, Infinity, true);
    }
  };
  slice('overall', value.overall);
  if (!Array.isArray(value.slices)) throw bad('slices', 'an array', value.slices);
  value.slices.forEach((s, i) => slice(`slices[${i}]`, s));
  return value as unknown as Report;
}
