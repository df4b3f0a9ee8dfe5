/**
 * Reader fuzzing: random mutations of small valid inputs — a CSV table, a JSON Lines table, and a floor
 * table (`--floor-table` beside a fixed valid CSV table) — through the CLI in-process (runMain), 1,000
 * mutated inputs per format. Whatever the bytes, a run must end as the README's "Exit codes" promise:
 * exit 0 with a JSON report on stdout, or exit 2 with exactly one line on stderr starting `floorgap: `
 * (and nothing on stdout, as test/e2e/bad-input.test.ts expects of bad files) — never exit 3 (internal
 * error), never a thrown exception, never a hang (each run has 10 s).
 *
 * Mutations: delete, insert or replace bytes (quotes, commas, newlines, \r, NUL, ESC, bytes that are not
 * UTF-8 such as 0xff, …), insert short texts (a BOM, "NaN", "1e999", bidi controls, …), duplicate or drop
 * lines, truncate, swap or rename header names. A smaller property (40 inputs) mutates only the CSV
 * header: 30 to 400 more columns, names with control characters (NUL, ESC, tab, DEL, a bidi override),
 * padded, repeated or blank names; a report it ends in must name only columns of the header (never an
 * engine's rename such as `station_1`) and at most 32 slice columns. fast-check draws them with a fixed
 * seed, so a failure reproduces; its message holds the mutated bytes (escaped and as hex) and the command.
 *
 * Speed: one in-process run costs about 100 ms (a DuckDB opened and closed per run, and yargs laying out
 * its help text per command). Each property draws batches of 4 mutated inputs and runs them concurrently
 * (DuckDB works off the main thread), 250 batches = 1,000 inputs, with `--threads 1` per run.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import type { Report } from '../../src/triage/types.js';
import { runMain } from '../helpers/run-main.js';

/** Mutated inputs run at the same time, and batches per property: 4 × 250 = 1,000 inputs. */
const BATCH = 4;
const BATCHES = 250;
/** Batches of the header mutations (wide headers cost more per run): 10 × 4 = 40 inputs. */
const HEADER_BATCHES = 10;
/** A run that takes longer than this counts as a hang. */
const RUN_TIMEOUT_MS = 10_000;
/** vitest timeout of one 1,000-input property (about 70–100 s when the machine is not busy). */
const PROPERTY_TIMEOUT_MS = 400_000;

/** Characters that must never reach a terminal from data: C0 controls but \n, DEL, C1, bidi controls (as test/e2e/bad-input.test.ts). */
const LIVE_CONTROL = /[\x00-\x09\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/;

// fixture (hand-built): 10 rows of an inspection line, 5 train and 5 dev, one quoted station with a comma
const HEADER = ['id', 'split', 'station', 'package', 'label', 'pred'];
const ROWS: string[][] = [
  ['1', 'train', 'S1', '0402', 'good', 'good'],
  ['2', 'train', 'S2', 'QFN', 'void', 'good'],
  ['3', 'train', 'S1, rear', '0402', 'good', 'good'],
  ['4', 'train', 'S2', 'QFN', 'void', 'void'],
  ['5', 'train', 'S1', 'QFN', 'good', 'void'],
  ['6', 'dev', 'S2', '0402', 'good', 'good'],
  ['7', 'dev', 'S1', 'QFN', 'void', 'void'],
  ['8', 'dev', 'S1, rear', '0402', 'good', 'void'],
  ['9', 'dev', 'S2', 'QFN', 'void', 'good'],
  ['10', 'dev', 'S1', '0402', 'good', 'good'],
];
const csvField = (v: string) => (/[",\n\r]/.test(v) ? `"${v.replaceAll('"', '""')}"` : v);
const CSV = [HEADER, ...ROWS].map((r) => r.map(csvField).join(',')).join('\n') + '\n';
// the same rows as JSON Lines; ids as numbers, the rest as strings
const JSONL = ROWS.map((r) => JSON.stringify(Object.fromEntries(HEADER.map((h, i) => [h, h === 'id' ? Number(r[i]) : r[i]])))).join('\n') + '\n';
// fixture (hand-built): floors per package, one with a sample size and one without
const FLOORS = 'package,floor,n\n0402,0.02,400\nQFN,0.05,\n';

/** One mutation; positions are taken modulo the current length, so any number is valid. */
type Mutation =
  | { kind: 'delete'; at: number; count: number }
  | { kind: 'insert'; at: number; bytes: readonly number[] }
  | { kind: 'replace'; at: number; byte: number }
  | { kind: 'duplicate-line'; line: number }
  | { kind: 'drop-line'; line: number }
  | { kind: 'truncate'; at: number }
  | { kind: 'swap-header'; i: number; j: number }
  | { kind: 'rename-header'; i: number; name: string }
  | { kind: 'widen'; columns: number; numeric: boolean };

/** Bytes that matter to a reader: quotes, separators, line ends, NUL, ESC, braces, not-UTF-8 bytes. */
const SPECIAL_BYTES = [0x22, 0x2c, 0x0a, 0x0d, 0x00, 0x1b, 0x09, 0x7b, 0x7d, 0x5b, 0x5d, 0x3a, 0x5c, 0x20, 0xff, 0xfe, 0xc3, 0x80, 0xe2];
/** Short texts: a BOM, doubled quotes, CRLF, numbers a parser may choke on, bidi and terminal controls. */
const SPECIAL_TEXTS = ['\ufeff', '""', '\r\n', '\n\n', ',,', 'NaN', '-1', '1e999', 'null', 'true', '{}', '[]', '\u202e', '\x1b[2J', '\\u0000', '"\n"', 'x'.repeat(300)];
/** Header names: roles, names of the floor table, an empty and a padded name, a duplicate of a present one. */
const HEADER_NAMES = ['', ' label', 'label', 'pred', 'split', 'id', 'station', 'package', 'weight', 'score', 'floor', 'n', 'error', 'run', 'Label', 'a"b', 'é'];

const position = fc.nat({ max: 1_000_000 });
const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('delete' as const), at: position, count: fc.integer({ min: 1, max: 4 }) }),
  fc.record({
    kind: fc.constant('insert' as const),
    at: position,
    bytes: fc.oneof(
      fc.constantFrom(...SPECIAL_BYTES).map((b) => [b]),
      fc.constantFrom(...SPECIAL_TEXTS).map((t) => [...Buffer.from(t, 'utf8')]),
      fc.array(fc.integer({ min: 0, max: 255 }), { minLength: 1, maxLength: 3 }),
    ),
  }),
  fc.record({ kind: fc.constant('replace' as const), at: position, byte: fc.oneof(fc.constantFrom(...SPECIAL_BYTES), fc.integer({ min: 0, max: 255 })) }),
  fc.record({ kind: fc.constant('duplicate-line' as const), line: position }),
  fc.record({ kind: fc.constant('drop-line' as const), line: position }),
  fc.record({ kind: fc.constant('truncate' as const), at: position }),
  fc.record({ kind: fc.constant('swap-header' as const), i: fc.nat({ max: 7 }), j: fc.nat({ max: 7 }) }),
  fc.record({ kind: fc.constant('rename-header' as const), i: fc.nat({ max: 7 }), name: fc.constantFrom(...HEADER_NAMES) }),
);
/** One mutated input: 1 to 4 mutations of the valid one. */
const mutations = fc.array(mutation, { minLength: 1, maxLength: 4 });

/**
 * Header names of the classes a header can go wrong in: control characters (C0, ESC sequences, NUL,
 * tab, a bidi override), padding with spaces, names that repeat another after trimming, blank names.
 */
const NAME_CLASSES = ['sta\x01tion', 'sta\x1b[2Jtion', 'la\u202ebel', 'a\x00b', 'stat\tion', ' station', 'station ', ' split', 'pred ', '  ', '', 'x\x7f'];
/** Header mutations: wide headers (30 to 400 more columns), and names of the classes above. */
const headerMutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('widen' as const), columns: fc.integer({ min: 30, max: 400 }), numeric: fc.boolean() }),
  fc.record({ kind: fc.constant('rename-header' as const), i: fc.nat({ max: 7 }), name: fc.constantFrom(...NAME_CLASSES) }),
);
const headerMutations = fc.array(headerMutation, { minLength: 1, maxLength: 3 });

/** The lines of a buffer, each with its line end ("\n" split, so a "\r" stays with its line). */
function lines(buf: Buffer): Buffer[] {
  const out: Buffer[] = [];
  let start = 0;
  for (let i = 0; i < buf.length; i++) {
    if (buf[i] === 0x0a) {
      out.push(buf.subarray(start, i + 1));
      start = i + 1;
    }
  }
  if (start < buf.length) out.push(buf.subarray(start));
  return out;
}

/** Swaps or renames names of the header: CSV, the fields of line 1; JSON Lines, the keys of every line. */
function editHeader(buf: Buffer, jsonl: boolean, edit: (names: string[]) => string[]): Buffer {
  if (jsonl) {
    return Buffer.concat(
      lines(buf).map((line) => {
        const text = line.toString('utf8');
        const keys = [...text.matchAll(/"((?:[^"\\]|\\.)*)"\s*:/g)];
        if (keys.length === 0) return line;
        const names = edit(keys.map((k) => k[1]));
        let out = '';
        let last = 0;
        keys.forEach((k, i) => {
          out += text.slice(last, k.index) + JSON.stringify(names[i] ?? k[1]) + ':';
          last = k.index! + k[0].length;
        });
        return Buffer.from(out + text.slice(last), 'utf8');
      }),
    );
  }
  const all = lines(buf);
  if (all.length === 0) return buf;
  const first = all[0].toString('utf8');
  const end = first.match(/\r?\n$/)?.[0] ?? '';
  const names = edit(first.slice(0, first.length - end.length).split(','));
  return Buffer.concat([Buffer.from(names.join(',') + end, 'utf8'), ...all.slice(1)]);
}

function apply(input: Buffer, m: Mutation, jsonl: boolean): Buffer {
  const len = input.length;
  switch (m.kind) {
    case 'delete': {
      if (len === 0) return input;
      const at = m.at % len;
      return Buffer.concat([input.subarray(0, at), input.subarray(Math.min(len, at + m.count))]);
    }
    case 'insert': {
      const at = m.at % (len + 1);
      return Buffer.concat([input.subarray(0, at), Buffer.from(m.bytes), input.subarray(at)]);
    }
    case 'replace': {
      if (len === 0) return input;
      const out = Buffer.from(input);
      out[m.at % len] = m.byte;
      return out;
    }
    case 'duplicate-line':
    case 'drop-line': {
      const all = lines(input);
      if (all.length === 0) return input;
      const i = m.line % all.length;
      const copy = m.kind === 'duplicate-line' ? [...all.slice(0, i + 1), all[i], ...all.slice(i + 1)] : [...all.slice(0, i), ...all.slice(i + 1)];
      return Buffer.concat(copy);
    }
    case 'truncate':
      return input.subarray(0, m.at % (len + 1));
    case 'swap-header':
      return editHeader(input, jsonl, (names) => {
        const out = [...names];
        const i = m.i % names.length;
        const j = m.j % names.length;
        [out[i], out[j]] = [out[j], out[i]];
        return out;
      });
    case 'rename-header':
      return editHeader(input, jsonl, (names) => names.map((n, i) => (i === m.i % names.length ? m.name : n)));
    case 'widen': {
      // CSV only: `columns` more columns x0, x1, … with numbers (many values) or three categories
      const all = lines(input);
      return Buffer.concat(
        all.map((line, k) => {
          const text = line.toString('utf8');
          const end = text.match(/\r?\n$/)?.[0] ?? '';
          const cells = Array.from({ length: m.columns }, (_, j) => (k === 0 ? `x${j}` : m.numeric ? String(((k * 31 + j * 7) % 97) / 10) : `v${(k + j) % 3}`));
          return Buffer.from(`${text.slice(0, text.length - end.length)},${cells.join(',')}${end}`, 'utf8');
        }),
      );
    }
  }
}

/** The bytes of a file, readable in a test report: printable ASCII as is, the rest as \n, \r, \xNN. */
function escapeBytes(buf: Buffer): string {
  let s = '';
  for (const b of buf) {
    if (b === 0x0a) s += '\\n';
    else if (b === 0x0d) s += '\\r';
    else if (b === 0x5c) s += '\\\\';
    else if (b >= 0x20 && b < 0x7f) s += String.fromCharCode(b);
    else s += `\\x${b.toString(16).padStart(2, '0')}`;
  }
  return s;
}

const dir = mkdtempSync(join(tmpdir(), 'floorgap-fuzz-'));
const env = { XDG_CACHE_HOME: join(dir, 'cache') };
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// fixture (hand-built): the fixed valid table beside mutated floor tables
const TABLE = join(dir, 'table.csv');
writeFileSync(TABLE, CSV);

interface Format {
  readonly name: string;
  readonly valid: string;
  readonly file: (slot: number) => string;
  readonly argv: (path: string) => string[];
  readonly jsonl: boolean;
}

const COMMON = ['--format', 'json', '--no-cache', '--threads', '1'];
const FORMATS: Record<'csv' | 'jsonl' | 'floor', Format> = {
  csv: { name: 'CSV table', valid: CSV, file: (s) => join(dir, `mutated-${s}.csv`), argv: (p) => ['report', p, ...COMMON], jsonl: false },
  jsonl: { name: 'JSON Lines table', valid: JSONL, file: (s) => join(dir, `mutated-${s}.jsonl`), argv: (p) => ['report', p, ...COMMON], jsonl: true },
  floor: {
    name: 'floor table',
    valid: FLOORS,
    file: (s) => join(dir, `floors-${s}.csv`),
    argv: (p) => ['report', TABLE, '--floor-table', p, ...COMMON],
    jsonl: false,
  },
};

type Outcome = { kind: 'report' } | { kind: 'error'; line: string };
/** A further check of a report (exit 0) against the mutated bytes; returns what is wrong, or null. */
type ReportCheck = (report: Report, bytes: Buffer) => string | null;

/**
 * Runs one mutated input; returns what it ended in, or throws an Error whose message holds the
 * mutated bytes, the command and the observed output.
 */
async function runOne(format: Format, ops: readonly Mutation[], slot: number, check?: ReportCheck): Promise<Outcome> {
  const bytes = ops.reduce<Buffer>((buf, m) => apply(buf, m, format.jsonl), Buffer.from(format.valid, 'utf8'));
  const path = format.file(slot);
  writeFileSync(path, bytes);
  const argv = format.argv(path);
  const describeRun = (what: string) =>
    `${what}\n  command: floorgap ${argv.join(' ')}\n  mutations: ${JSON.stringify(ops)}\n  bytes (escaped): "${escapeBytes(bytes)}"\n  bytes (hex): ${bytes.toString('hex')}`;
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<'timeout'>((resolve) => {
    timer = setTimeout(() => resolve('timeout'), RUN_TIMEOUT_MS);
  });
  let r: Awaited<ReturnType<typeof runMain>> | 'timeout';
  try {
    r = await Promise.race([runMain(argv, env), timeout]);
  } catch (e) {
    throw new Error(describeRun(`runMain threw: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`));
  } finally {
    clearTimeout(timer);
  }
  if (r === 'timeout') throw new Error(describeRun(`no exit within ${RUN_TIMEOUT_MS / 1000} s`));
  const observed = `exit ${r.code}\n  stderr: ${JSON.stringify(r.stderr)}\n  stdout: ${JSON.stringify(r.stdout.slice(0, 300))}`;
  if (r.code === 0) {
    let report: unknown;
    try {
      report = JSON.parse(r.stdout);
    } catch {
      throw new Error(describeRun(`exit 0 without valid JSON on stdout: ${observed}`));
    }
    if ((report as { schema?: unknown }).schema !== 'floorgap.report/1') throw new Error(describeRun(`exit 0 with JSON that is not a report: ${observed}`));
    const wrong = check?.(report as Report, bytes);
    if (wrong) throw new Error(describeRun(`exit 0, but ${wrong}: ${observed}`));
    return { kind: 'report' };
  }
  if (r.code === 2) {
    const line = r.stderr.endsWith('\n') ? r.stderr.slice(0, -1) : null;
    const ok = line !== null && !line.includes('\n') && line.startsWith('floorgap: ') && !line.startsWith('floorgap: internal error') && !LIVE_CONTROL.test(line) && r.stdout === '';
    if (!ok) throw new Error(describeRun(`exit 2 without exactly one clean "floorgap: " line on stderr (and nothing on stdout): ${observed}`));
    return { kind: 'error', line };
  }
  throw new Error(describeRun(`exit ${r.code} (expected 0 or 2): ${observed}`));
}

/** Runs `batches` batches of 4 mutated inputs (250: 1,000 in all) and returns how the runs ended. */
async function fuzz(
  format: Format,
  draw: fc.Arbitrary<Mutation[]> = mutations,
  batches = BATCHES,
  check?: ReportCheck,
): Promise<{ reports: number; errors: Map<string, number> }> {
  let reports = 0;
  const errors = new Map<string, number>();
  await fc.assert(
    fc.asyncProperty(fc.array(draw, { minLength: BATCH, maxLength: BATCH }), async (batch) => {
      const outcomes = await Promise.allSettled(batch.map((ops, slot) => runOne(format, ops, slot, check)));
      const failed = outcomes.find((o): o is PromiseRejectedResult => o.status === 'rejected');
      if (failed) throw failed.reason;
      for (const o of outcomes as PromiseFulfilledResult<Outcome>[]) {
        if (o.value.kind === 'report') reports += 1;
        else {
          // the kind of error, without the file's path and the values quoted in it
          const kind = o.value.line.replace(dir, '').replace(/"[^"]*"/g, '"…"').replace(/\d+/g, 'N').slice(0, 90);
          errors.set(kind, (errors.get(kind) ?? 0) + 1);
        }
      }
    }),
    { seed: 42, numRuns: batches },
  );
  return { reports, errors };
}

/**
 * A report names only columns the header has (trimmed), never one the engine renamed (`station_1`,
 * `column2`), and its overview has at most 32 slice columns (src/cells/profile.ts MAX_AUTO_COLUMNS).
 */
const namesAsWritten: ReportCheck = (report, bytes) => {
  const first = bytes.toString('utf8').replace(/^\ufeff/, '').split('\n', 1)[0].replace(/\r$/, '');
  const header = new Set(first.split(',').map((n) => n.trim()));
  const used = new Set(report.slices.flatMap((x) => Object.keys(x.key)));
  for (const name of [...used, ...Object.values(report.source.roles)]) {
    if (name !== null && !header.has(name)) return `column ${JSON.stringify(name)} is not a name of the header`;
  }
  return used.size > 32 ? `${used.size} slice columns in the overview, more than 32` : null;
};

describe('reader fuzzing: 1,000 mutated inputs per format end in a report or one clean error line', () => {
  it('the valid inputs give a report (the fuzzing starts from good files)', async () => {
    for (const format of Object.values(FORMATS)) {
      // no mutation: a delete of zero bytes would be a no-op, so run the valid bytes directly
      const path = format.file(99);
      writeFileSync(path, format.valid);
      const r = await runMain(format.argv(path), env);
      expect(r.code, `${format.name}: ${r.stderr}`).toBe(0);
    }
  });

  it(
    'CSV table: 40 header mutations (wide headers, control characters, padded, repeated and blank names)',
    async () => {
      const { reports, errors } = await fuzz(FORMATS.csv, headerMutations, HEADER_BATCHES, namesAsWritten);
      expect(reports, JSON.stringify([...errors])).toBeGreaterThan(0);
      expect(errors.size).toBeGreaterThan(0);
    },
    PROPERTY_TIMEOUT_MS,
  );

  for (const key of ['csv', 'jsonl', 'floor'] as const) {
    it(
      `${FORMATS[key].name}: 1,000 mutations`,
      async () => {
        const { reports, errors } = await fuzz(FORMATS[key]);
        // both outcomes are reached: the mutations are neither all harmless nor all fatal
        expect(reports, JSON.stringify([...errors])).toBeGreaterThan(0);
        expect(errors.size).toBeGreaterThan(0);
      },
      PROPERTY_TIMEOUT_MS,
    );
  }
});
