/**
 * The bad-input corpus (test/fixtures/bad/, written by its make.mjs) through the built CLI, as a user
 * runs it: each file ends in a correct report or in exit 2 with one line on stderr naming the file, the
 * line or column, and what was expected; stdout stays empty on error. Expected messages are this
 * project's contract (README "Exit codes", docs/reliability.md). Expected numbers come from how each
 * fixture is built (make.mjs: 40 train and 40 dev rows, one error in every 4 rows).
 */
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CheckResult } from '../../src/triage/check.js';
import type { Report } from '../../src/triage/types.js';
import { openDuck } from '../../src/sql/duck.js';
import { runCli } from '../helpers/run-cli.js';

const BAD = join('test', 'fixtures', 'bad');
const f = (name: string) => join(BAD, name);

/** Characters that must never reach a terminal from data: C0 controls but \n, DEL, C1, bidi controls. */
const LIVE_CONTROL = /[\x00-\x09\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/;

async function expectError(args: string[], message: RegExp) {
  const r = await runCli(args);
  expect(r.stdout).toBe('');
  const lines = r.stderr.trimEnd().split('\n');
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(/^floorgap: /);
  expect(lines[0]).toMatch(message);
  expect(lines[0]).not.toMatch(LIVE_CONTROL);
  expect(r.code).toBe(2);
}

async function reportJson(args: string[]): Promise<{ report: Report; stderr: string }> {
  const r = await runCli([...args, '--format', 'json', '--no-cache']);
  expect(r.code, r.stderr).toBe(0);
  return { report: JSON.parse(r.stdout) as Report, stderr: r.stderr };
}

describe.concurrent('bad files: exit 2 and one line naming what is wrong', () => {
  const cases: [string, string[], RegExp][] = [
    ['empty file', [f('empty.csv')], /empty\.csv: the file is empty; expected a table with a header line$/],
    ['only blank lines', [f('blank-lines.csv')], /blank-lines\.csv: the file holds only blank lines/],
    ['header only', [f('header-only.csv')], /header-only\.csv: no rows; expected a header and data rows/],
    ['LF line ends with one CRLF line', [f('mixed-line-ends.csv')], /mixed-line-ends\.csv: line 22: ends with CRLF \(\\r\\n\) where line 1 ends with LF \(\\n\); expected one kind of line end throughout the file$/],
    ['a carriage return alone inside a row', [f('lone-cr.csv')], /lone-cr\.csv: line 22: a carriage return \(\\r\) inside a row, not in quotes; expected line ends of one kind, \\n or \\r\\n$/],
    ['a NUL byte in a header name', [f('nul-header.csv')], /nul-header\.csv: line 1: the name of column 3, "sta\\u0000tion", holds a NUL byte; expected names of text$/],
    ['a row with a field too many', [f('ragged-long.csv')], /ragged-long\.csv: line 11: expected 7 fields as in the header, found 8$/],
    ['a row with fields missing', [f('ragged-short.csv')], /ragged-short\.csv: line 11: expected 7 fields as in the header, found 5$/],
    ['a column name twice', [f('duplicate-columns.csv')], /duplicate-columns\.csv: columns 3 and 7 are both named "station"; column names must be unique$/],
    ['a column name twice, once padded', [f('padded-duplicate.csv')], /padded-duplicate\.csv: columns 3 and 8 are both named "station" \(after trimming spaces\); column names must be unique$/],
    ['an unnamed column a role needs', [f('unnamed-label.csv')], /unnamed-label\.csv: no label column; the columns are "id", "split", "station", "package", "pred", "weight"; .*; column 5 of .*unnamed-label\.csv has no name and was left out$/],
    ['no label column', [f('no-label.csv')], /no-label\.csv: no label column; the columns are "id", "split", "station", "guess"/],
    ['bytes of no known format', [f('binary.bin')], /binary\.bin: unknown format; expected CSV, TSV, JSON Lines or Parquet/],
    ['bytes that are not UTF-8', [f('invalid-utf8.csv')], /invalid-utf8\.csv: line 22: bytes that are not valid UTF-8; save the file as UTF-8$/],
    ['weight NaN', [f('weight-nan.csv')], /weight-nan\.csv: line 7, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "NaN"/],
    ['weight Infinity', [f('weight-inf.csv')], /weight-inf\.csv: line 52, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "Infinity"/],
    ['weight negative', [f('weight-negative.csv')], /weight-negative\.csv: line 43, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-2"/],
    ['weight empty', [f('weight-empty.csv')], /weight-empty\.csv: line 9, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got ""/],
    ['weight text', [f('weight-text.csv')], /weight-text\.csv: line 62, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "heavy"/],
    ['weight too large (1e308)', [f('weight-huge.csv')], /weight-huge\.csv: line 5, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "1e308" \(1 row like it\)$/],
    ['weight subnormal (1e-320)', [f('weight-subnormal.csv')], /weight-subnormal\.csv: line 46, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "1e-320" \(1 row like it\)$/],
    ['every weight 0', [f('weight-all-zero.csv')], /weight-all-zero\.csv: every row has weight 0; expected some weight > 0$/],
    ['every dev weight 0', [f('weight-zero-dev.csv')], /weight-zero-dev\.csv: every row with split dev has weight 0 \(40 rows\); expected some weight > 0 in each split$/],
    ['every label empty', [f('labels-all-empty.csv')], /labels-all-empty\.csv: every row was left out: 80 rows have an empty "label" or "pred"; expected class labels in both columns$/],
    ['every dev prediction empty', [f('dev-preds-empty.csv')], /dev-preds-empty\.csv: no usable rows with split dev: its 40 rows have an empty "label" or "pred"$/],
    ['score text', [f('score-text.csv')], /score-text\.csv: line 5, column "score": expected a number \(model confidence\), got "high"/],
    ['only one split', [f('one-split.csv')], /one-split\.csv: no rows with split dev \(found train\); train and dev are required/],
    ['an unknown split value', [f('unknown-split.csv')], /unknown-split\.csv: column "split" has unknown split values "holdout" \(5 rows\)/],
    [
      'a required split file with no rows',
      ['--train', f('train-only-part.csv'), '--dev', f('dev-header-only.csv')],
      /no rows with split dev/,
    ],
    ['truncated gzip', [f('truncated.csv.gz')], /truncated\.csv\.gz: the gzip data ends early; was the file copied completely\?$/],
    ['Parquet with a bad footer', [f('bad-footer.parquet')], /bad-footer\.parquet: not a valid Parquet file: its footer is missing or damaged/],
    // the fifth line lacks its closing brace; the engine's own message points at line 6
    ['JSON Lines with a broken line', [f('broken.jsonl')], /broken\.jsonl: line 5: not valid JSON \(.*\); every line must hold one JSON object$/],
    ['a JSON array document, not JSON Lines', [f('array.json')], /array\.json: line 1: a JSON array; expected JSON Lines, one object per line$/],
    ['a JSON Lines line that is a bare number', [f('scalar-line.jsonl')], /scalar-line\.jsonl: line 3: a JSON number \(5\); expected JSON Lines, one object per line$/],
    // the engine names line 2 for both
    ['JSON Lines: half a surrogate pair on line 1', [f('surrogate.jsonl')], /surrogate\.jsonl: line 1: a \\u escape of half a surrogate pair; expected whole characters \(both halves of a pair\)$/],
    ['JSON Lines: bytes that are not UTF-8 on line 1', [f('invalid-utf8.jsonl')], /invalid-utf8\.jsonl: line 1: bytes that are not valid UTF-8; save the file as UTF-8$/],
    ['column names with control sequences', [f('control-header.csv')], /control-header\.csv: no label column; the columns are "id", "split", "sta\\u001b\[2Jtion", "verdict\\u202e", "guess\\u001b\]52;c;aGk=\\u0007"/],
    // ready-made cells with impossible sums
    ['cells: errors above the weight', ['--cells', f('cells-errors-above-weight.csv')], /cells-errors-above-weight\.csv: line 7, column "fg_errors": 12 errors in a cell of weight 10; expected 0 ≤ fg_errors ≤ fg_weight$/],
    ['cells: a NaN statistic', ['--cells', f('cells-nan.csv')], /cells-nan\.csv: line 4, column "fg_weight_sq": expected a finite number, got "NaN"$/],
    ['cells: a floor sum above the weight', ['--cells', f('cells-floor-above-weight.csv')], /cells-floor-above-weight\.csv: line 3, column "fg_floor_sum": floor sum 11 in a cell of weight 10; expected 0 ≤ fg_floor_sum ≤ fg_weight$/],
    ['cells: negative rows', ['--cells', f('cells-negative-rows.csv')], /cells-negative-rows\.csv: line 8, column "fg_rows": expected a whole number of rows from 0 to 2\^53, got "-10"$/],
    [
      'cells: Σw² too small for the rows',
      ['--cells', f('cells-weight-sq.csv')],
      /cells-weight-sq\.csv: line 5, column "fg_weight_sq": weight 10 with Σw² 5 over 10 rows; expected fg_weight² ≤ fg_rows × fg_weight_sq \(Cauchy–Schwarz\)$/,
    ],
    // floor tables
    ['floor table: a line repeated', [f('valid.csv'), '--floor-table', f('floors-duplicate.csv')], /floors-duplicate\.csv: line 4 repeats line 2 \(package=0402\); keep one$/],
    [
      'floor table: one key, two floors',
      [f('valid.csv'), '--floor-table', f('floors-conflicting.csv')],
      /floors-conflicting\.csv: lines 2 and 4 give package=0402 different values \(floor 0\.02 and 0\.04, n 400 and 200\); keep one$/,
    ],
    ['floor table: a floor above 1', [f('valid.csv'), '--floor-table', f('floors-above-one.csv')], /floors-above-one\.csv: line 3, column "floor": expected a fraction in \[0, 1\].*got "1\.5"$/],
    ['floor table: a negative floor', [f('valid.csv'), '--floor-table', f('floors-negative.csv')], /floors-negative\.csv: line 2, column "floor": expected a fraction in \[0, 1\].*got "-0\.01"$/],
    ['floor table: text for a floor', [f('valid.csv'), '--floor-table', f('floors-text.csv')], /floors-text\.csv: line 2, column "floor": .*got "two percent"$/],
    ['floor table: a column name twice', [f('valid.csv'), '--floor-table', f('floors-repeated-column.csv')], /floors-repeated-column\.csv: columns 2 and 3 are both named "floor"; column names must be unique$/],
    ['floor table: a NUL byte in a key', [f('valid.csv'), '--floor-table', f('floors-nul.csv')], /floors-nul\.csv: line 2, column "package": the value "04\\u000002" holds a NUL byte; expected text$/],
    ['floor table: no key column', [f('valid.csv'), '--floor-table', f('floors-no-key.csv')], /floors-no-key\.csv: no key columns/],
    ['floor table: a role column as key', [f('valid.csv'), '--floor-table', f('floors-role-key.csv')], /floors-role-key\.csv: key column "id" is the id column of .*valid\.csv; keys must be slice columns \(e\.g\. package\), label, pred or split$/],
    ['cost table: a role column as key', [f('valid.csv'), '--cost-table', f('costs-role-key.csv')], /costs-role-key\.csv: key column "weight" is the weight column of/],
    // paired baselines: ids unique among the dev rows on either side
    ['paired baseline: an id twice in the current table', ['check', f('paired-dup-id.csv'), '--baseline', f('valid.csv')], /paired-dup-id\.csv: id "dev-3" appears 2 times among the dev rows; ids must be unique to pair rows$/],
    ['paired baseline: an id twice in the baseline', ['check', f('valid.csv'), '--baseline', f('paired-dup-id.csv')], /paired-dup-id\.csv: id "dev-3" appears 2 times among the dev rows; ids must be unique to pair rows$/],
    // saved baseline reports: the shape is checked, field by field
    ['baseline report: a slice error as text', ['check', f('valid.csv'), '--by', 'station', '--baseline', f('baseline-text-value.json')], /baseline-text-value\.json: slices\[3\]\.error\.dev\.value: expected a number, got "0\.1"$/],
    ['baseline report: the overall error as text', ['check', f('valid.csv'), '--by', 'station', '--baseline', f('baseline-overall-text.json')], /baseline-overall-text\.json: overall\.error\.dev\.value: expected a number, got "NaN"$/],
    ['baseline report: a rate without n', ['check', f('valid.csv'), '--by', 'station', '--baseline', f('baseline-no-n.json')], /baseline-no-n\.json: slices\[0\]\.error\.dev\.n: expected a number, got nothing$/],
    ['baseline report: slices not an array', ['check', f('valid.csv'), '--by', 'station', '--baseline', f('baseline-slices-object.json')], /baseline-slices-object\.json: slices: expected an array, got an object$/],
    // JSON documents that are not reports are never read as prediction tables
    ['baseline: a JSON document of another schema', ['check', f('valid.csv'), '--baseline', f('baseline-check.json')], /baseline-check\.json: a JSON document with schema "floorgap\.check\/1"; expected a report saved with floorgap report --format json \(schema floorgap\.report\/1\) or the baseline model's prediction table$/],
    ['baseline: a JSON array', ['check', f('valid.csv'), '--baseline', f('baseline-array.json')], /baseline-array\.json: a JSON document \(an array\); expected a report saved with floorgap report --format json/],
    ['baseline: JSON null', ['check', f('valid.csv'), '--baseline', f('baseline-null.json')], /baseline-null\.json: a JSON document \(null\); expected a report saved with floorgap report --format json/],
    ['baseline: an empty JSON object', ['check', f('valid.csv'), '--baseline', f('baseline-empty-object.json')], /baseline-empty-object\.json: a JSON document \(an object without a "schema" key\); expected a report/],
    ['baseline: a folder', ['check', f('valid.csv'), '--max-bias', '0.9', '--baseline', BAD], /test\/fixtures\/bad: is a folder; expected a report saved with floorgap report --format json or the baseline model's prediction table$/],
    // cost tables
    ['cost table: one key, two costs', [f('valid.csv'), '--cost-table', f('costs-conflicting.csv')], /costs-conflicting\.csv: lines 3 and 4 give package=QFN different values \(label_cost 4 and 2\); keep one$/],
    ['cost table: a negative cost', [f('valid.csv'), '--cost-table', f('costs-negative.csv')], /costs-negative\.csv: line 3, column "label_cost": expected a cost from 1e-12 to 1e12.*got "-4"$/],
    ['cost table: a cost too large to sum (1e308)', [f('valid.csv'), '--cost-table', f('costs-huge.csv')], /costs-huge\.csv: line 3, column "label_cost": expected a cost from 1e-12 to 1e12 \(e\.g\. 1, or 4 for a slice four times dearer to label\), got "1e308"$/],
  ];
  for (const [name, args, message] of cases) {
    it(name, async () => {
      await expectError(args, message);
    });
  }
});

describe.concurrent('export --from a bad saved discovery: exit 2, one line, nothing written', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'floorgap-bad-from-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const expected = 'expected a discovery saved with floorgap discover --format json \\(schema floorgap\\.discover\\/1\\)$';
  const cases: [string, string, RegExp][] = [
    ['a discovery cut short: not JSON', f('discovery-cut.json'), new RegExp(`discovery-cut\\.json: not valid JSON \\(.*\\); ${expected}`)],
    ['a saved report, not a discovery', f('baseline-report.json'), new RegExp(`baseline-report\\.json: a JSON document with schema "floorgap\\.report/1"; ${expected}`)],
    ['a folder', BAD, new RegExp(`test/fixtures/bad: is a folder; ${expected}`)],
    ['a file that is not there', f('no-such-discovery.json'), new RegExp(`no-such-discovery\\.json: no such file; ${expected}`)],
    ['a slice found on no known part', f('discovery-bad-part.json'), /discovery-bad-part\.json: slices\[0\]\.part: expected "bias", "variance" or "mismatch", got "noise"$/],
    ['a condition on a column the input does not have', f('discovery-unknown-column.json'), /discovery-unknown-column\.json: slices\[0\] \("conveyor=C2"\): no column "conveyor"; the columns are "id", "split", "station", "package", "label", "pred", "weight"$/],
    ['a condition on a value no row has', f('discovery-no-row.json'), /discovery-no-row\.json: slices\[0\] \("station=S9"\): no row has station="S9"; the values of "station" are "S1", "S2", "S3", "S4"$/],
  ];
  for (const [name, from, message] of cases) {
    it(name, async () => {
      const out = join(dir, `${name.replace(/\W+/g, '-')}.csv`);
      await expectError(['export', f('valid.csv'), '--from', from, '--out', out, '--no-cache'], message);
      expect(existsSync(out)).toBe(false);
      expect(readdirSync(dir).filter((n) => n.includes(name.replace(/\W+/g, '-')))).toEqual([]);
    });
  }

  it('the hand-made discovery they are cut from is read: the rows of station=S1', async () => {
    const out = join(dir, 'valid-from.csv');
    const r = await runCli(['export', f('valid.csv'), '--from', f('discovery-valid.json'), '--out', out, '--no-cache']);
    expect(r.code, r.stderr).toBe(0);
    // make.mjs: station S1 is row i % 4 == 0, 10 of the 40 train rows and 10 of the 40 dev rows
    expect(r.stdout).toMatch(/^wrote 20 rows of 1 slice to /);
  });
});

describe.concurrent('awkward but valid files: the right report', () => {
  it('a UTF-8 byte order mark: the first column keeps its name', async () => {
    const { report } = await reportJson([f('bom.csv'), '--slice-cols', 'station']);
    expect(report.source.roles.id).toBe('id'); // the first column, "\ufeffid" if the mark were kept
    expect(report.overall.error.dev?.n).toBe(40);
    expect(report.overall.error.dev?.value).toBe(0.25); // make.mjs: errors at i % 4 == 0, 10 of 40
  });

  it('an unnamed first column (a pandas index): left out with a warning, the report made', async () => {
    const { report } = await reportJson([f('unnamed-index.csv')]);
    expect(report.warnings).toContain(`${f('unnamed-index.csv')}: column 1 has no name and was left out; name it in the header to use it`);
    expect(report.source.roles.id).toBe('id');
    expect(report.slices.map((s) => Object.keys(s.key)[0]).sort()).toEqual(['package', 'package', 'station', 'station', 'station', 'station']); // make.mjs: S1–S4, 0402/QFN
    expect(report.overall.error.dev?.value).toBe(0.25); // make.mjs: errors at i % 4 == 0, 10 of 40
  });

  it('JSON Lines with a UTF-8 byte order mark: read as without it', async () => {
    const { report } = await reportJson([f('bom.jsonl'), '--slice-cols', 'station']);
    expect(report.source.roles.id).toBe('id');
    expect(report.overall.error.dev?.n).toBe(40);
    expect(report.overall.error.dev?.value).toBe(0.25); // make.mjs: errors at i % 4 == 0, 10 of 40
  });

  it('CRLF line ends: values carry no carriage return', async () => {
    const { report } = await reportJson([f('crlf.csv'), '--slice-cols', 'station,package']);
    const values = report.slices.flatMap((s) => Object.values(s.key));
    expect(values.sort()).toEqual(['0402', 'QFN', 'S1', 'S2', 'S3', 'S4']);
    expect(report.overall.error.train?.value).toBe(0.25);
  });

  it('quoted fields with commas, quotes and a line break stay whole values', async () => {
    const { report } = await reportJson([f('quoted.csv'), '--slice-cols', 'station']);
    const values = report.slices.map((s) => s.key.station).sort();
    expect(values).toEqual(['S"2"', 'S1, left', 'S3\nrear', 'S4']);
    expect(report.overall.error.dev?.n).toBe(40);
  });

  it('numeric labels with integer and decimal spellings compare as numbers (1 = 1.0)', async () => {
    const { report } = await reportJson([f('numeric-labels.csv'), '--slice-cols', 'station']);
    expect(report.overall.error.train?.value).toBe(0.25); // 10 of 40, as with the text labels
    expect(report.overall.error.dev?.value).toBe(0.25);
  });

  it('labels that mix numbers and words compare as written', async () => {
    const { report } = await reportJson([f('mixed-labels.csv'), '--by', 'label']);
    // make.mjs: good -> "0"; void -> "void" on rows i % 8 == 0, else "1"; predictions mapped the same way
    expect(report.slices.map((s) => s.key.label).sort()).toEqual(['0', '1', 'void']);
    expect(report.overall.error.dev?.value).toBe(0.25);
  });

  it('an empty label: the row is left out with a warning', async () => {
    const { report } = await reportJson([f('empty-label.csv'), '--slice-cols', 'station']);
    expect(report.overall.error.train?.n).toBe(39);
    expect(report.warnings).toContain('1 row with an empty "label" or "pred" was left out');
  });

  it('control sequences in slice values are escaped in every format', async () => {
    for (const format of ['text', 'md', 'csv', 'json']) {
      const r = await runCli([f('control-values.csv'), '--slice-cols', 'station', '--format', format, '--no-cache']);
      expect(r.code).toBe(0);
      // CSV ends its records with CRLF (RFC 4180); every other control is data and must be escaped
      expect(r.stdout.replace(format === 'csv' ? /\r\n/g : /^$/, '\n'), format).not.toMatch(LIVE_CONTROL);
      expect(r.stderr).not.toMatch(LIVE_CONTROL);
    }
    const text = (await runCli([f('control-values.csv'), '--slice-cols', 'station', '--no-cache'])).stdout;
    expect(text).toContain('station=S1\\x1b[2J'); // visible, not a clear-screen
    expect(text).toContain('station=S3\\x07');
    expect(text).toContain('station=S4\\u202eevil');
    const { report } = await reportJson([f('control-values.csv'), '--slice-cols', 'station']);
    expect(report.slices.map((s) => s.key.station).sort()).toEqual(['S1\x1b[2J', 'S2\x1b]52;c;ZWNobyBoaQ==\x07', 'S3\x07', 'S4\u202eevil']); // JSON keeps the data exact
  });

  it('a baseline report saved by hand in the report schema (pretty or on one line) is compared field by field', async () => {
    for (const name of ['baseline-report.json', 'baseline-report-line.json']) {
      const r = await runCli(['check', f('valid.csv'), '--by', 'station', '--baseline', f(name), '--format', 'json', '--no-cache']);
      expect(r.code, r.stderr).toBe(0);
      const result = JSON.parse(r.stdout) as CheckResult;
      expect(result.baseline).toEqual({ path: f(name), kind: 'report' });
      // make.mjs: the file holds valid.csv's own dev errors (overall 10/40, S1 10/10, S2–S4 0/10): no change
      expect(result.comparisons.map((c) => [c.slice, c.before, c.change])).toEqual([
        ['overall', 0.25, 0],
        ['station=S1', 1, 0],
        ['station=S2', 0, 0],
        ['station=S3', 0, 0],
        ['station=S4', 0, 0],
      ]);
    }
  });

  it('paired: rows with an empty prediction are left out on either side, as the report leaves them out', async () => {
    // paired-empty-pred.csv: dev rows 1, 2, 5 (S2, S3, S2) have no prediction; valid.csv predicts them right
    const now = await runCli(['check', f('paired-empty-pred.csv'), '--by', 'station', '--baseline', f('valid.csv'), '--format', 'json', '--no-cache']);
    expect(now.code, now.stderr).toBe(0);
    const a = JSON.parse(now.stdout) as CheckResult;
    // 37 pairs, errors 10 before and 10 now (all of S1, make.mjs): no discordant pair anywhere
    expect(a.comparisons.map((c) => [c.slice, c.worse, c.better, c.before])).toEqual([
      ['overall', 0, 0, 10 / 37],
      ['station=S1', 0, 0, 1],
      ['station=S2', 0, 0, 0],
      ['station=S3', 0, 0, 0],
      ['station=S4', 0, 0, 0],
    ]);
    const before = await runCli(['check', f('valid.csv'), '--by', 'station', '--baseline', f('paired-empty-pred.csv'), '--format', 'json', '--no-cache']);
    expect(before.code, before.stderr).toBe(0);
    const b = JSON.parse(before.stdout) as CheckResult;
    expect(b.comparisons.map((c) => [c.slice, c.worse, c.better, c.before])).toEqual([
      ['overall', 0, 0, 10 / 37],
      ['station=S1', 0, 0, 1],
      ['station=S2', 0, 0, 0],
      ['station=S3', 0, 0, 0],
      ['station=S4', 0, 0, 0],
    ]);
    expect(b.warnings).toContain(`3 dev rows have an empty label or prediction in ${f('paired-empty-pred.csv')}; they are left out of the paired test`);
  });

  it('the CSV report quotes TAB, CR, commas and quotes: DuckDB reads back the exact slice labels', async () => {
    const r = await runCli([f('whitespace-values.csv'), '--slice-cols', 'station', '--format', 'csv', '--no-cache']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain('"station=S1\r X"');
    expect(r.stdout).toContain('"station=S2\tY"');
    const dir = mkdtempSync(join(tmpdir(), 'floorgap-csv-back-'));
    const duck = await openDuck({ threads: 1 });
    try {
      writeFileSync(join(dir, 'report.csv'), r.stdout);
      const rows = await duck.all(`SELECT label FROM read_csv('${join(dir, 'report.csv')}', header = true, all_varchar = true, delim = ',', quote = '"', escape = '"', new_line = '\\r\\n') ORDER BY label`);
      // make.mjs: the four station values, as written inside the quotes
      expect(rows.map((x) => x.label)).toEqual(['overall', 'station=S1\r X', 'station=S2\tY', 'station=S3, left', 'station=S4 "q"']);
    } finally {
      duck.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('floor-table keys that match no row: a warning per line, the report still made', async () => {
    const { report } = await reportJson([f('valid.csv'), '--floor-table', f('floors-unmatched.csv'), '--slice-cols', 'package']);
    expect(report.warnings).toContain(`${f('floors-unmatched.csv')}: line 4 (package=BGA) matches no row`);
    expect(report.warnings).toContain(`${f('floors-unmatched.csv')}: line 5 (package=0603) matches no row`);
    const qfn = report.slices.find((s) => s.key.package === 'QFN')!;
    expect(qfn.floor.value).toBeCloseTo(0.05, 12); // floors-unmatched.csv line 3
  });

  it('cost-table keys that match no row: a warning', async () => {
    const { report } = await reportJson([f('valid.csv'), '--cost-table', f('costs-unmatched.csv'), '--slice-cols', 'package']);
    expect(report.warnings).toContain(`${f('costs-unmatched.csv')}: line 4 (package=BGA) matches no row`);
  });
});

describe.concurrent('large cases, written at test time', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'floorgap-bad-large-'));
    // a 1 MB field in a free-text column
    let big = 'id,split,station,note,label,pred\n';
    for (let i = 0; i < 80; i++) big += `r${i},${i % 2 ? 'dev' : 'train'},S${i % 4},${i === 7 ? 'x'.repeat(1 << 20) : 'ok'},good,${i % 4 === 0 ? 'void' : 'good'}\n`;
    writeFileSync(join(dir, 'big-field.csv'), big);
    // a serial-number column with 100,000 distinct values
    let many = 'id,split,station,serial,label,pred\n';
    for (let i = 0; i < 100_000; i++) many += `r${i},${i % 2 ? 'dev' : 'train'},S${i % 4},SN${String(i).padStart(6, '0')},good,${i % 5 ? 'good' : 'void'}\n`;
    writeFileSync(join(dir, 'many-values.csv'), many);
    // a wide table: 1,995 numeric columns (an embedding stored as columns), 300 rows
    const emb = Array.from({ length: 1995 }, (_, j) => `emb_${j}`);
    let wide = ['id', 'split', 'label', 'pred', 'station', ...emb].join(',') + '\n';
    for (let r = 0; r < 300; r++) {
      const label = r % 3 ? 'a' : 'b';
      const pred = r % 4 ? label : label === 'a' ? 'b' : 'a';
      wide += [`r${r}`, r % 2 ? 'dev' : 'train', label, pred, `S${r % 4}`, ...emb.map((_, j) => String(((r * 37 + j * 11) % 1000) / 1000))].join(',') + '\n';
    }
    writeFileSync(join(dir, 'wide.csv'), wide);
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('a 1 MB field is read, and shown shortened in the text report', async () => {
    const r = await runCli([join(dir, 'big-field.csv'), '--by', 'note', '--no-cache']);
    expect(r.code, r.stderr).toBe(0);
    expect(Math.max(...r.stdout.split('\n').map((l) => l.length))).toBeLessThanOrEqual(100);
    expect(r.stdout).toMatch(/xxxx…/);
  });

  it('a slice column of 100,000 values is stopped before the scan, with advice', async () => {
    await expectError([join(dir, 'many-values.csv'), '--by', 'serial'], /--by serial: the first 100,000 rows alone hold 100,000 slices, more than --max-slices 10,000; slice by fewer or coarser columns/);
    await expectError([join(dir, 'many-values.csv'), '--slice-cols', 'station,serial'], /the overview's columns give 100,004 slices \(serial alone 100,000\), more than --max-slices 10,000; name fewer or coarser columns in --slice-cols/);
  });

  it('2,000 columns: the report is made from 32 candidate columns, and a warning says how many were left out', async () => {
    const { report, stderr } = await reportJson([join(dir, 'wide.csv')]);
    expect(stderr).toBe('');
    // the file's one column of 4 values first, then the numeric columns in file order, 32 in all
    const columns = [...new Set(report.slices.map((s) => Object.keys(s.key)[0]))];
    expect(columns).toHaveLength(32);
    expect(columns.sort()).toEqual(['station', ...Array.from({ length: 31 }, (_, j) => `emb_${j}`)].sort());
    expect(report.warnings).toContain(
      '1,964 more candidate slice columns were left out ("emb_31", "emb_32", "emb_33", …): at most 32 are chosen by themselves, columns of 2–50 values first, then numeric ones, each in file order; choose them with --slice-cols',
    );
    // hand arithmetic on the invented table: 150 dev rows (odd r); errors where r % 4 == 0, none of them odd
    expect(report.overall.error.dev?.n).toBe(150);
    expect(report.overall.error.dev?.value).toBe(0);
    expect(report.overall.error.train?.value).toBe(0.5); // even r: r % 4 == 0 is half of them
    // --slice-cols reaches any of them
    const named = await reportJson([join(dir, 'wide.csv'), '--slice-cols', 'emb_1994']);
    expect(named.report.slices.every((s) => Object.keys(s.key)[0] === 'emb_1994')).toBe(true);
    expect(named.report.slices).toHaveLength(5); // --bins 5 at the quantiles of 300 distinct values
  });

  it('the overview leaves such a column out by itself', async () => {
    const { report } = await reportJson([join(dir, 'many-values.csv')]);
    expect(report.slices.map((s) => Object.keys(s.key)[0])).not.toContain('serial');
    expect(report.overall.error.dev?.n).toBe(50_000);
  });
});
