/**
 * Ready-made cells as input: what a cells file must hold, and one-line errors naming the file, line
 * and column for what it must not. Expected messages: the wording of src/engine/cells-input.ts.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runMain } from '../helpers/run-main.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

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
