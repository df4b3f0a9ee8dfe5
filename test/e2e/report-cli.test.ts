/**
 * The built CLI end to end: every output format, and the exit code and one-line message for each
 * kind of bad input. Expected messages are this project's contract (README, exit codes).
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Report } from '../../src/triage/types.js';
import { runCli } from '../helpers/run-cli.js';

const SAMPLE = ['data-samples/solder-joints.csv', '--floor-table', 'data-samples/inspector-floors.csv', '--annotators', 'insp_a,insp_b,insp_c'];

describe('report formats on the demo sample', () => {
  it('json: the documented contract', async () => {
    const r = await runCli([...SAMPLE, '--format', 'json']);
    expect(r.code).toBe(0);
    const rep = JSON.parse(r.stdout) as Report;
    expect(rep.schema).toBe('floorgap.report/1');
    expect(rep.confidence).toBe(0.95);
    expect(rep.fdr).toBe(0.05);
    expect(rep.fdr_method).toBe('bh');
    expect(rep.source.inputs[0].path).toBe('data-samples/solder-joints.csv');
    expect(rep.source.roles).toMatchObject({ label: 'label', pred: 'pred', split: 'split', id: 'id', score: 'score', weight: null });
    // the sample has 20,000 rows; every row lands in exactly one split (demo generator, 20,000 rows)
    const o = rep.overall;
    expect((o.rows.train ?? 0) + (o.rows.train_dev ?? 0) + (o.rows.dev ?? 0) + (o.rows.test ?? 0)).toBe(20000);
    for (const s of rep.slices) {
      const h = s.headroom!;
      // headroom parts sum to the total (definition)
      expect(h.bias + h.variance + (h.mismatch ?? 0)).toBeCloseTo(h.total, 12);
      expect(Object.keys(s.gaps)).toEqual(['avoidable_bias', 'variance', 'mismatch', 'dev_overfit']);
    }
    expect(rep.slices.map((s) => s.rank)).toEqual(rep.slices.map((_, i) => i + 1));
  });

  it('text: an aligned table within 100 columns naming the planted slices', async () => {
    const r = await runCli(SAMPLE);
    expect(r.code).toBe(0);
    const lines = r.stdout.split('\n');
    expect(Math.max(...lines.map((l) => [...l].length))).toBeLessThanOrEqual(100);
    expect(r.stdout).toContain('station=S5');
    expect(r.stdout).not.toMatch(/\x1b\[/); // NO_COLOR and not a TTY: no escape codes
  });

  it('md and csv', async () => {
    const md = await runCli([...SAMPLE, '--format', 'md']);
    expect(md.code).toBe(0);
    expect(md.stdout).toMatch(/^\|.*\|$/m);
    const csv = await runCli([...SAMPLE, '--format', 'csv']);
    expect(csv.code).toBe(0);
    const rows = csv.stdout.trim().split('\n');
    expect(rows[0].split(',')[0]).toBe('rank');
    expect(rows).toHaveLength(1 + 1 + 27); // header + overall + 27 one-column slices (6+4+6+3+3+5 values)
  });

  it('--by crosses columns and names them in the JSON', async () => {
    const r = await runCli([...SAMPLE, '--by', 'station,lighting', '--format', 'json']);
    expect(r.code).toBe(0);
    const rep = JSON.parse(r.stdout) as Report;
    expect(rep.by).toEqual(['station', 'lighting']);
    expect(rep.slices).toHaveLength(24); // 6 stations × 4 lightings, every combination present in the demo
  });

  it('--by label gives the per-class view', async () => {
    const r = await runCli([...SAMPLE, '--by', 'label', '--format', 'json']);
    expect(r.code).toBe(0);
    const rep = JSON.parse(r.stdout) as Report;
    expect(rep.slices.map((s) => s.key.label).sort()).toEqual(['bridge', 'good', 'insufficient', 'lifted', 'void']);
  });

  it('--floor 0.02 gives every row that floor (source default), and without a floor a warning', async () => {
    const r = await runCli(['data-samples/solder-joints.csv', '--floor', '0.02', '--slice-cols', 'station,package', '--format', 'json']);
    const rep = JSON.parse(r.stdout) as Report;
    expect(rep.overall.floor.value).toBeCloseTo(0.02, 12); // a sum of 8,026 × 0.02 divided back: equal to 1e-12
    expect(rep.overall.floor.source).toBe('default');
    const none = JSON.parse((await runCli(['data-samples/solder-joints.csv', '--slice-cols', 'station', '--format', 'json'])).stdout) as Report;
    expect(none.warnings.join(' ')).toMatch(/against perfection/);
  });
});

describe('bad input: one line on stderr, exit 2', () => {
  let dir: string;
  const file = (name: string, text: string) => {
    const p = join(dir, name);
    writeFileSync(p, text);
    return p;
  };
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'floorgap-bad-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  const header = 'id,split,station,label,pred,weight\n';
  const good = (n: number, split: string) =>
    Array.from({ length: n }, (_, i) => `${split}${i},${split},S${i % 3},a,${i % 4 === 0 ? 'b' : 'a'},1`).join('\n') + '\n';

  async function expectBad(args: string[], pattern: RegExp) {
    const r = await runCli(args);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^floorgap: /);
    expect(lines[0]).toMatch(pattern);
  }

  it('missing file', async () => {
    await expectBad([join(dir, 'nope.csv')], /nope\.csv: no such file/);
  });
  it('unknown format', async () => {
    await expectBad([file('blob.bin', 'just some words without separators\n')], /blob\.bin: unknown format/);
  });
  it('missing role column, naming the columns that exist', async () => {
    const p = file('nolabel.csv', 'id,split,station,guess\n1,train,S1,a\n');
    await expectBad([p], /nolabel\.csv: no label column; the columns are "id", "split", "station", "guess"/);
  });
  it('explicit role column that does not exist', async () => {
    await expectBad([file('ok1.csv', header + good(40, 'train') + good(40, 'dev')), '--label', 'truth'], /no column "truth" for --label/);
  });
  it('a required split with no rows', async () => {
    await expectBad([file('nodev.csv', header + good(40, 'train') + good(40, 'test'))], /no rows with split dev \(found train, test\)/);
  });
  it('unknown split values are listed', async () => {
    await expectBad([file('holdout.csv', header + good(40, 'train') + good(40, 'dev') + good(3, 'holdout'))], /unknown split values "holdout" \(3 rows\)/);
  });
  it('negative weight, with file, line and column', async () => {
    const p = file('negw.csv', header + good(40, 'train') + 'x1,dev,S1,a,a,-1\n' + good(40, 'dev'));
    await expectBad([p], /negw\.csv: line 42, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-1"/);
  });
  it('non-numeric weight', async () => {
    const p = file('textw.csv', header + good(40, 'train') + good(40, 'dev') + 'x2,dev,S1,a,a,heavy\n');
    await expectBad([p], /textw\.csv: line 82, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "heavy"/);
  });
  it('--floor outside [0, 1]', async () => {
    await expectBad([file('ok2.csv', header + good(40, 'train') + good(40, 'dev')), '--floor', '1.5'], /--floor 1\.5: expected a fraction in \[0, 1\]/);
  });
  it('--label-cost outside [1e-12, 1e12]', async () => {
    const data = file('ok-cost.csv', header + good(40, 'train') + good(40, 'dev'));
    await expectBad([data, '--label-cost', '1e308'], /^floorgap: --label-cost 1e308: expected a cost from 1e-12 to 1e12 \(e\.g\. 1, or 4 for a slice four times dearer to label\)$/);
    await expectBad([data, '--label-cost', '0'], /^floorgap: --label-cost 0: expected a cost from 1e-12 to 1e12/);
  });
  it('a floor table entry outside [0, 1]', async () => {
    const data = file('ok3.csv', header + good(40, 'train') + good(40, 'dev'));
    const floors = file('floors.csv', 'station,floor\nS0,0.02\nS1,1.5\n');
    await expectBad([data, '--floor-table', floors], /floors\.csv: line 3, column "floor": expected a fraction in \[0, 1\]/);
  });
  it('a usage error (unknown option) exits 2 too', async () => {
    await expectBad(['data-samples/solder-joints.csv', '--no-such-option'], /Unknown argument/);
  });
  it('inputs with different columns: an error naming the columns, or one table with --union', async () => {
    const rowsOf = (split: string, value: string) =>
      Array.from({ length: 40 }, (_, i) => `${split}${i},${split},S${i % 3},${value},a,${i % 4 === 0 ? 'b' : 'a'}`).join('\n') + '\n';
    const a = file('u-a.csv', 'id,split,station,lighting,label,pred\n' + rowsOf('train', 'dome'));
    const b = file('u-b.csv', 'id,split,station,shift,label,pred\n' + rowsOf('dev', 'night'));
    await expectBad([a, b], new RegExp(`u-b\\.csv: its columns differ from .*u-a\\.csv's \\(.*u-b\\.csv lacks "lighting"; has "shift" that .*u-a\\.csv lacks\\); give files with the same columns, or --union`));
    const r = await runCli([a, b, '--union', '--slice-cols', 'lighting,shift', '--format', 'json', '--no-cache']);
    expect(r.code, r.stderr).toBe(0);
    const rep = JSON.parse(r.stdout) as Report;
    // hand arithmetic on the invented files: lighting only in the 40 train rows of u-a.csv, shift only in the 40 dev rows of u-b.csv
    expect(rep.slices.map((x) => x.label).sort()).toEqual(['lighting=(missing)', 'lighting=dome', 'shift=(missing)', 'shift=night']);
    expect(rep.slices.find((x) => x.label === 'lighting=(missing)')?.error.dev?.n).toBe(40);
    // every command that reads rows takes --union, sql among them
    const sql = await runCli(['sql', a, b, '--union', '--table', 'lake.preds', '--slice-cols', 'lighting']);
    expect(sql.code, sql.stderr).toBe(0);
  });
  it('a file given twice, also under another spelling, is an error', async () => {
    const p = file('twice.csv', header + good(40, 'train') + good(40, 'dev'));
    await expectBad([p, p], /twice\.csv: the same file as .*twice\.csv, given twice; give each file once$/);
    const r = await runCli(['twice.csv', './twice.csv'], { cwd: dir });
    expect(r.stderr).toBe('floorgap: ./twice.csv: the same file as twice.csv, given twice; give each file once\n');
    expect(r.code).toBe(2);
  });
  it('a bad --where names the expression', async () => {
    await expectBad(['data-samples/solder-joints.csv', '--where', 'nonexistent_col = 1'], /--where "nonexistent_col = 1": not a valid DuckDB SQL condition/);
  });
});
