/**
 * Ready-made cells as input: what a cells file must hold, and one-line errors naming the file, line
 * and column for what it must not. Expected messages: the wording of src/cells/cells-file.ts.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runMain } from '../helpers/run-main.js';
import { openDuck } from '../../src/sql/duck.js';
import { csvToParquet, makeTempDir, removeTempDir } from '../helpers/table-variants.js';

let dir: string;

const HEADER = 'fg_split,station,fg_floor_entry,fg_floor,fg_floor_n,fg_rows,fg_weight,fg_weight_sq,fg_errors,fg_floor_sum';
const ROWS = ['train,S1,-1,0.02,,100,100,100,10,2', 'dev,S1,-1,0.02,,50,50,50,9,1', 'train,S2,-1,0.02,,80,80,80,4,1.6', 'dev,S2,-1,0.02,,40,40,40,3,0.8'];

function file(name: string, lines: readonly string[]): string {
  const path = join(dir, name);
  writeFileSync(path, lines.join('\n') + '\n');
  return path;
}

const report = (argv: string[]) => runMain(['report', ...argv], { XDG_CACHE_HOME: join(dir, 'cache') });

beforeAll(() => {
  dir = makeTempDir();
});

afterAll(() => {
  if (dir) removeTempDir(dir);
});

describe('a hand-written cells file', () => {
  it('gives the report its sums say (hand counts: S1 train 10/100, dev 9/50)', async () => {
    const r = await report(['--cells', file('ok.csv', [HEADER, ...ROWS]), '--by', 'station', '--format', 'json']);
    expect(r.code).toBe(0);
    const rep = JSON.parse(r.stdout);
    const s1 = rep.slices.find((s: { label: string }) => s.label === 'station=S1');
    // hand arithmetic: 10 / 100 = 0.1 train error, 9 / 50 = 0.18 dev error, floor 2 / 100 = 0.02
    expect(s1.error.train.value).toBeCloseTo(0.1, 12);
    expect(s1.error.dev.value).toBeCloseTo(0.18, 12);
    expect(s1.floor.value).toBeCloseTo(0.02, 12);
    expect(s1.rows).toEqual({ train: 100, train_dev: null, dev: 50, test: null });
    expect(rep.source.inputs[0].path).toMatch(/ok\.csv$/);
  });

  it('the same cell in two shards is summed', async () => {
    const a = file('shard1.csv', [HEADER, ...ROWS]);
    const b = file('shard2.csv', [HEADER, ROWS[0]]);
    const r = await report(['--cells', a, b, '--by', 'station', '--format', 'json']);
    const s1 = JSON.parse(r.stdout).slices.find((s: { label: string }) => s.label === 'station=S1');
    // hand arithmetic: 100 + 100 train rows, 10 + 10 errors
    expect(s1.rows.train).toBe(200);
    expect(s1.error.train.value).toBeCloseTo(0.1, 12);
  });
});

describe('errors (exit 2, one line)', () => {
  it('a missing statistic column', async () => {
    const path = file('missing.csv', ['fg_split,station,fg_rows', 'train,S1,3']);
    const r = await report(['--cells', path]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`floorgap: ${path}: no column "fg_weight"; a cells file has fg_split, fg_rows, fg_weight, fg_weight_sq, fg_errors, fg_floor_sum and one column per slice column (see docs/formats.md); was it written by floorgap sql?\n`);
  });

  it('a value that is not a number names the file, line and column', async () => {
    const path = file('bad.csv', [HEADER, ROWS[0], 'dev,S1,-1,0.02,,fifty,50,50,9,1']);
    const r = await report(['--cells', path]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`floorgap: ${path}: line 3, column "fg_rows": expected a number, got "fifty"\n`);
  });

  it('an unknown fg_ column', async () => {
    const path = file('typo.csv', [`${HEADER},fg_weird`, ...ROWS.map((r) => `${r},1`)]);
    const r = await report(['--cells', path]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`floorgap: ${path}: unknown column "fg_weird"; columns starting with fg_ are cell statistics (see docs/formats.md)\n`);
  });

  it('shards with different columns', async () => {
    const a = file('cols-a.csv', [HEADER, ...ROWS]);
    const b = file('cols-b.csv', [HEADER.replace('station', 'lighting'), ...ROWS]);
    const r = await report(['--cells', a, b]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`floorgap: ${b}: its columns differ from ${a}'s; shards of one cells result have the same columns\n`);
  });

  it('a split value that is no split, and rows the query set aside for a bad weight', async () => {
    const odd = file('odd.csv', [HEADER, ...ROWS, 'holdout,S1,-1,0.02,,5,5,5,1,0.1']);
    const r1 = await report(['--cells', odd]);
    expect(r1.code).toBe(2);
    expect(r1.stderr).toMatch(/column "fg_split" has unknown split values "holdout" \(5 rows\)/);
    const weight = file('weight.csv', [HEADER, ...ROWS, '!weight,S1,-1,0.02,,2,0,0,0,0']);
    const r2 = await report(['--cells', weight]);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toMatch(/: 2 rows have a bad weight \(fg_split "!weight"\), expected a weight of 0 or between 1e-100 and 1e100; fix them in the table the cells came from$/m);
  });

  it('cells whose every row was left out for an empty label', async () => {
    const path = file('all-left-out.csv', [HEADER, '!unlabelled,S1,-1,0.02,,150,150,150,0,3', '!unlabelled,S2,-1,0.02,,120,120,120,0,2.4']);
    const r = await report(['--cells', path]);
    expect(r.code).toBe(2);
    // hand arithmetic: 150 + 120 rows set aside
    expect(r.stderr).toBe(`floorgap: ${path}: every row was left out: 270 rows have an empty label or prediction (fg_split "!unlabelled"); expected class labels in both columns\n`);
  });

  it('cells whose dev rows all weigh 0', async () => {
    const path = file('zero-dev.csv', [HEADER, ROWS[0], 'dev,S1,-1,0.02,,50,0,0,0,0', ROWS[2], 'dev,S2,-1,0.02,,40,0,0,0,0']);
    const r = await report(['--cells', path]);
    expect(r.code).toBe(2);
    // hand arithmetic: 50 + 40 dev rows
    expect(r.stderr).toBe(`floorgap: ${path}: every row with split dev has weight 0 (90 rows); expected some weight > 0 in each split\n`);
  });

  it('--by a column the cells do not hold, and rows given with --cells', async () => {
    const path = file('by.csv', [HEADER, ...ROWS]);
    const r1 = await report(['--cells', path, '--by', 'lighting']);
    expect(r1.code).toBe(2);
    expect(r1.stderr).toMatch(/--by names "lighting", which is not a key column of the cells .*; the key columns are "station"/);
    const r2 = await report([path, '--cells', path]);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toMatch(/--cells and prediction tables .* were both given; give one of them/);
  });

  it('export needs rows', async () => {
    const path = file('export.csv', [HEADER, ...ROWS]);
    const r = await runMain(['export', '--cells', path, '--out', join(dir, 'rows.csv')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('floorgap: export writes the rows behind slices, and --cells holds no rows; give the prediction tables the cells came from\n');
  });

  it('options that shape cells from rows are noted as ignored', async () => {
    const path = file('ignored.csv', [HEADER, ...ROWS]);
    const r = await report(['--cells', path, '--floor', '0.1']);
    expect(r.code).toBe(0);
    expect(r.stderr).toBe('floorgap: --floor ignored: cells already carry what the rows gave (floorgap sql takes these options)\n');
  });
});

describe('impossible sums: exit 2, one line naming the file, line, column and rule', () => {
  // fixture (hand-written): ROWS[0] on line 2, the bad cell on line 3, the other valid cells after it
  const cases: [string, string, string][] = [
    ['errors above the weight', 'dev,S1,-1,0.02,,10,10,10,12,0.2', 'line 3, column "fg_errors": 12 errors in a cell of weight 10; expected 0 ≤ fg_errors ≤ fg_weight'],
    ['negative errors', 'dev,S1,-1,0.02,,10,10,10,-1,0.2', 'line 3, column "fg_errors": -1 errors in a cell of weight 10; expected 0 ≤ fg_errors ≤ fg_weight'],
    ['NaN errors', 'dev,S1,-1,0.02,,10,10,10,NaN,0.2', 'line 3, column "fg_errors": expected a finite number, got "NaN"'],
    ['an infinite weight', 'dev,S1,-1,0.02,,10,Infinity,10,1,0.2', 'line 3, column "fg_weight": expected a finite number, got "Infinity"'],
    ['a floor sum above the weight', 'dev,S1,-1,0.02,,10,10,10,1,11', 'line 3, column "fg_floor_sum": floor sum 11 in a cell of weight 10; expected 0 ≤ fg_floor_sum ≤ fg_weight'],
    ['negative rows', 'dev,S1,-1,0.02,,-5,10,10,1,0.2', 'line 3, column "fg_rows": expected a whole number of rows from 0 to 2^53, got "-5"'],
    ['rows that are not whole', 'dev,S1,-1,0.02,,2.5,10,10,1,0.2', 'line 3, column "fg_rows": expected a whole number of rows from 0 to 2^53, got "2.5"'],
    ['an empty row count', 'dev,S1,-1,0.02,,,10,10,1,0.2', 'line 3, column "fg_rows": expected a number, got ""'],
    ['a negative weight', 'dev,S1,-1,0.02,,10,-10,10,0,0', 'line 3, column "fg_weight": expected a weight sum ≥ 0, got "-10"'],
    // hand arithmetic: 0 rows hold no weight; 1e-101 is below the smallest row weight
    ['weight in a cell of no rows', 'dev,S1,-1,0.02,,0,3,3,0,0', 'line 3, column "fg_weight": weight 3 in a cell of 0 rows; expected fg_weight = 0 or 1e-100 ≤ fg_weight ≤ fg_rows × 1e100 (each row weighs 0 or 1e-100 to 1e100)'],
    ['weight below the smallest row weight', 'dev,S1,-1,0.02,,1,1e-101,1e-202,0,0', 'line 3, column "fg_weight": weight 1e-101 in a cell of 1 rows; expected fg_weight = 0 or 1e-100 ≤ fg_weight ≤ fg_rows × 1e100 (each row weighs 0 or 1e-100 to 1e100)'],
    ['a negative Σw²', 'dev,S1,-1,0.02,,10,10,-1,1,0.2', 'line 3, column "fg_weight_sq": expected a sum of squared weights ≥ 0, got "-1"'],
    // hand arithmetic: Σw² ≤ (Σw)² = 100 for weights ≥ 0
    ['Σw² above (Σw)²', 'dev,S1,-1,0.02,,10,10,150,1,0.2', 'line 3, column "fg_weight_sq": Σw² 150 above the squared weight 10²; expected fg_weight_sq ≤ fg_weight²'],
    // hand arithmetic: (Σw)² = 100 > rows × Σw² = 10 × 5 = 50 (Cauchy–Schwarz)
    ['Σw² too small for the rows', 'dev,S1,-1,0.02,,10,10,5,1,0.2', 'line 3, column "fg_weight_sq": weight 10 with Σw² 5 over 10 rows; expected fg_weight² ≤ fg_rows × fg_weight_sq (Cauchy–Schwarz)'],
    ['a floor above 1', 'dev,S1,-1,1.5,,10,10,10,1,0.2', 'line 3, column "fg_floor": expected a floor in [0, 1] (or empty), got "1.5"'],
    ['a floor n of 0', 'dev,S1,-1,0.02,0,10,10,10,1,0.2', 'line 3, column "fg_floor_n": expected a floor n > 0 (or empty), got "0"'],
    ['a floor entry below -1', 'dev,S1,-2,0.02,,10,10,10,1,0.2', 'line 3, column "fg_floor_entry": expected a whole number ≥ -1 (the floor-table entry; -1 for the default floor), got "-2"'],
    ['a floor entry that is not whole', 'dev,S1,0.5,0.02,,10,10,10,1,0.2', 'line 3, column "fg_floor_entry": expected a whole number ≥ -1 (the floor-table entry; -1 for the default floor), got "0.5"'],
  ];
  for (const [name, line, message] of cases) {
    it(name, async () => {
      const path = file(`impossible-${name.replace(/\W+/g, '-')}.csv`, [HEADER, ROWS[0], line, ...ROWS.slice(1)]);
      const r = await report(['--cells', path]);
      expect(r.stdout).toBe('');
      expect(r.stderr).toBe(`floorgap: ${path}: ${message}\n`);
      expect(r.code).toBe(2);
    });
  }

  it('cost sums: a cost weight above the weight, and a cost sum outside the cost range', async () => {
    const head = `${HEADER},fg_cost_sum,fg_cost_weight`;
    const ok = ROWS.map((r) => `${r},0,0`);
    const above = file('cost-weight.csv', [head, ...ok, 'dev,S3,-1,0.02,,10,10,10,1,0.2,20,12']);
    const r1 = await report(['--cells', above]);
    expect(r1.stderr).toBe(`floorgap: ${above}: line 6, column "fg_cost_weight": cost weight 12 in a cell of weight 10; expected 0 ≤ fg_cost_weight ≤ fg_weight\n`);
    // hand arithmetic: a cost sum of 0 over a cost weight of 5 is a mean cost of 0, below 1e-12
    const zero = file('cost-zero.csv', [head, ...ok, 'dev,S3,-1,0.02,,10,10,10,1,0.2,0,5']);
    const r2 = await report(['--cells', zero]);
    expect(r2.stderr).toBe(
      `floorgap: ${zero}: line 6, column "fg_cost_sum": cost sum 0 over a cost weight of 5; expected 1e-12 × fg_cost_weight ≤ fg_cost_sum ≤ 1e12 × fg_cost_weight (costs from 1e-12 to 1e12)\n`,
    );
    expect(r2.code).toBe(2);
  });

  it('audit counts: more panel rows than audited rows, more audited rows than rows, a fractional count', async () => {
    const head = `${HEADER},fg_audited,fg_panel_rows,fg_panel_errors,fg_agree_sum,fg_ann_rows__a1,fg_ann_errors__a1,fg_class_other__a1`;
    const ok = ROWS.map((r) => `${r},0,0,0,0,0,0,0`);
    const run = async (bad: string) => {
      const path = file(`audit-${bad.replace(/\W+/g, '-')}.csv`, [head, ...ok, `dev,S3,-1,0.02,,10,10,10,1,0.2,${bad}`]);
      const r = await report(['--cells', path]);
      expect(r.code).toBe(2);
      return r.stderr.replace(path, 'FILE');
    };
    expect(await run('4,5,0,0,4,0,0')).toBe('floorgap: FILE: line 6, column "fg_panel_rows": 5 panel rows of 4 audited rows; expected fg_panel_rows ≤ fg_audited\n');
    expect(await run('11,5,0,0,4,0,0')).toBe('floorgap: FILE: line 6, column "fg_audited": 11 audited rows in a cell of 10 rows; expected fg_audited ≤ fg_rows\n');
    expect(await run('4,2,3,0,4,0,0')).toBe('floorgap: FILE: line 6, column "fg_panel_errors": 3 panel errors in 2 panel rows; expected 0 ≤ fg_panel_errors ≤ fg_panel_rows\n');
    expect(await run('4,2,1,2.5,4,0,0')).toBe('floorgap: FILE: line 6, column "fg_agree_sum": agreement sum 2.5 over 2 panel rows; expected 0 ≤ fg_agree_sum ≤ fg_panel_rows\n');
    expect(await run('4,2,1,1,3.5,0,0')).toBe('floorgap: FILE: line 6, column "fg_ann_rows__a1": expected a whole number ≥ 0, got "3.5"\n');
    expect(await run('4,2,1,1,5,0,0')).toBe('floorgap: FILE: line 6, column "fg_ann_rows__a1": 5 labelled rows of 4 audited rows; expected "fg_ann_rows__a1" ≤ fg_audited\n');
    expect(await run('4,2,1,1,3,4,0')).toBe('floorgap: FILE: line 6, column "fg_ann_errors__a1": 4 labels that differ from the label, of 3 given; expected "fg_ann_errors__a1" ≤ "fg_ann_rows__a1"\n');
    expect(await run('4,2,1,1,3,1,3')).toBe('floorgap: FILE: line 6, column "fg_class_other__a1": 3 labels on 2 panel rows; expected "fg_class_other__a1" ≤ fg_panel_rows\n');
  });

  it('Parquet cells: the row number', async () => {
    const duck = await openDuck({ threads: 1 });
    try {
      const csv = file('to-parquet.csv', [HEADER, ROWS[0], 'dev,S1,-1,0.02,,10,10,10,12,0.2', ...ROWS.slice(1)]);
      const path = join(dir, 'impossible.parquet');
      await csvToParquet(duck, csv, path);
      const r = await report(['--cells', path]);
      expect(r.stderr).toBe(`floorgap: ${path}: row 2, column "fg_errors": 12 errors in a cell of weight 10; expected 0 ≤ fg_errors ≤ fg_weight\n`);
    } finally {
      duck.close();
    }
  });

  it('rows the query set aside keep their own message, whatever their sums', async () => {
    // a warehouse sums the bad weights themselves: NaN and negative sums on the !weight row
    const path = file('set-aside.csv', [HEADER, ...ROWS, '!weight,S1,-1,0.02,,2,NaN,NaN,-1,NaN']);
    const r = await report(['--cells', path]);
    expect(r.stderr).toMatch(/: 2 rows have a bad weight \(fg_split "!weight"\)/);
  });

  it('the rules hold after summing shards too: two row counts whose sum passes 2^53', async () => {
    // hand arithmetic: 5e15 + 5e15 = 1e16 > 2^53 = 9007199254740992, each alone below it
    const big = 'train,S1,-1,0.02,,5000000000000000,5000000000000000,5000000000000000,0,100000000000000';
    const a = file('big-a.csv', [HEADER, big, ...ROWS.slice(1)]);
    const b = file('big-b.csv', [HEADER, big]);
    const r = await report(['--cells', a, b]);
    expect(r.stderr).toBe(
      `floorgap: ${a}, ${b}: the cell fg_split "train", station "S1", summed over the files: column "fg_rows": expected a whole number of rows from 0 to 2^53, got "10000000000000000"\n`,
    );
    expect(r.code).toBe(2);
  });

  it('consistent weighted cells pass every rule (weights 1, 1, 1.5 and 1, 1.5; a floor entry with n; a cost table)', async () => {
    // hand arithmetic: train Σw = 3.5, Σw² = 1 + 1 + 2.25 = 4.25, errors 1.5, floor 0.02 × 3.5 = 0.07, cost 2 × 3.5 = 7;
    // dev Σw = 2.5, Σw² = 3.25. Cells from the cell query pass too: test/cells/cells-roundtrip.test.ts
    const head = `${HEADER},fg_cost_sum,fg_cost_weight`;
    const path = file('weighted-ok.csv', [head, 'train,S1,0,0.02,400,3,3.5,4.25,1.5,0.07,7,3.5', 'dev,S1,0,0.02,400,2,2.5,3.25,2.5,0.05,0,0', ...ROWS.slice(2).map((r) => `${r},0,0`)]);
    const r = await report(['--cells', path, '--format', 'json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
  });
});
