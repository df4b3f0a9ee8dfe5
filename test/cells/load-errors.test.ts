/**
 * Bad input through `loadCells`: every message names what was wrong and where. Line numbers are
 * hand-counted from the hand-written fixture below (CSV/TSV: the header is line 1; JSON Lines: the first
 * row is line 1; Parquet: row numbers from 1).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { loadCells, type Loaded } from '../../src/cells/load.js';
import { type LoadOptions } from '../../src/cells/plan.js';
import { FloorgapError } from '../../src/core/errors.js';
import { csvToParquet, makeTempDir, removeTempDir, writeGzip } from '../helpers/table-variants.js';
import { failure } from '../helpers/failure.js';
import { recordsOf } from '../helpers/cell-records.js';

// fixture (hand-written): 8 rows, lines 2–9; row id k sits on CSV line k + 1
const HEADER = 'id,split,label,pred,station,weight,score';
const ROWS = [
  '1,train,a,a,S1,1,0.9',
  '2,train,a,b,S2,1,0.8',
  '3,train,b,b,S1,2,0.7',
  '4,dev,a,a,S2,1,0.6',
  '5,dev,b,a,S1,1,0.5',
  '6,dev,b,b,S2,1,0.4',
  '7,test,a,a,S1,1,0.3',
  '8,test,a,b,S2,1,0.2',
];
const COLUMN_LIST = '"id", "split", "label", "pred", "station", "weight", "score"';

let duck: Duck;
let dir: string;
let counter = 0;

beforeAll(async () => {
  duck = await openDuck({ threads: 1 });
  dir = makeTempDir();
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

/** The fixture with some fields replaced: { id: { column: value } }. */
function rowsWith(changes: Record<number, Record<string, string>> = {}): string[][] {
  const cols = HEADER.split(',');
  return ROWS.map((line) => {
    const fields = line.split(',');
    const change = changes[Number(fields[0])] ?? {};
    return cols.map((c, i) => change[c] ?? fields[i]);
  });
}

function csvFile(changes: Record<number, Record<string, string>> = {}, ext = 'csv'): string {
  const path = join(dir, `data-${++counter}.${ext}`);
  writeFileSync(path, [HEADER, ...rowsWith(changes).map((r) => r.join(','))].join('\n') + '\n');
  return path;
}

function textFile(name: string, text: string): string {
  const path = join(dir, `${++counter}-${name}`);
  writeFileSync(path, text);
  return path;
}

function options(over: Partial<LoadOptions> & Pick<LoadOptions, 'source'>): LoadOptions {
  return { roles: {}, where: null, by: null, sliceCols: null, bins: 5, maxCells: 100_000, floor: 0.01, floorTable: null, ...over };
}

const files = (...f: string[]) => ({ files: f, perSplit: {} });


describe('weights', () => {
  it('a negative weight: file, line, column, value', async () => {
    const path = csvFile({ 5: { weight: '-1' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    // id 5 → line 6 (hand-counted)
    expect(e.message).toBe(`${path}: line 6, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-1" (1 row like it)`);
  });

  it('the same count in grouping-sets mode', async () => {
    const path = csvFile({ 5: { weight: '-1' } });
    const e = await failure(loadCells(duck, options({ source: files(path), maxCells: 1 })));
    expect(e.message).toBe(`${path}: line 6, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-1" (1 row like it)`);
  });

  it('a non-numeric weight: the first bad line and the number of bad rows', async () => {
    const path = csvFile({ 3: { weight: 'heavy' }, 7: { weight: 'n/a' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    // id 3 → line 4; two bad rows (hand-counted)
    expect(e.message).toBe(`${path}: line 4, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "heavy" (2 rows like it)`);
  });

  it('an empty weight', async () => {
    const path = csvFile({ 2: { weight: '' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: line 3, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "" (1 row like it)`);
  });

  it('inf and NaN are not weights', async () => {
    const path = csvFile({ 4: { weight: 'inf' }, 6: { weight: 'NaN' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: line 5, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "inf" (2 rows like it)`);
  });

  it('a weight too large to square and sum safely (1e308), or too small to stay a normal number (1e-320)', async () => {
    // the weight domain (docs/method.md, "Weights"): 0, or a finite number from 1e-100 to 1e100
    const huge = csvFile({ 2: { weight: '1e308' } });
    const e1 = await failure(loadCells(duck, options({ source: files(huge) })));
    // id 2 → line 3 (hand-counted)
    expect(e1.message).toBe(`${huge}: line 3, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "1e308" (1 row like it)`);
    const tiny = csvFile({ 4: { weight: '1e-320' }, 7: { weight: '1e-101' } });
    const e2 = await failure(loadCells(duck, options({ source: files(tiny) })));
    // id 4 → line 5; two bad rows (hand-counted)
    expect(e2.message).toBe(`${tiny}: line 5, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "1e-320" (2 rows like it)`);
    const above = csvFile({ 6: { weight: '1.0000001e100' } });
    const e3 = await failure(loadCells(duck, options({ source: files(above) })));
    expect(e3.message).toBe(`${above}: line 7, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "1.0000001e100" (1 row like it)`);
  });

  it('every weight 0: no rate can be formed, an error instead of a report of nulls', async () => {
    const zero = Object.fromEntries(ROWS.map((_, i) => [i + 1, { weight: '0' }]));
    const path = csvFile(zero);
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: every row has weight 0; expected some weight > 0`);
    expect(e.exitCode).toBe(2);
  });

  it('every weight of one split 0: the error names the split', async () => {
    // ids 4–6 are the dev rows (hand-counted from the fixture)
    const path = csvFile({ 4: { weight: '0' }, 5: { weight: '0' }, 6: { weight: '0' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: every row with split dev has weight 0 (3 rows); expected some weight > 0 in each split`);
    // ids 7–8 are the test rows: an optional split is checked too
    const test = csvFile({ 7: { weight: '0' }, 8: { weight: '0' } });
    const e2 = await failure(loadCells(duck, options({ source: files(test) })));
    expect(e2.message).toBe(`${test}: every row with split test has weight 0 (2 rows); expected some weight > 0 in each split`);
  });

  it('weights at the ends of the domain (0, 1e-100, 1e100) are read', async () => {
    const path = csvFile({ 1: { weight: '1e100' }, 2: { weight: '1e-100' }, 3: { weight: '0' } });
    const loaded = await loadCells(duck, options({ source: files(path) }));
    // hand arithmetic on the fixture: train rows ids 1–3 weigh 1e100 + 1e-100 + 0 = 1e100 (the small weight
    // is lost in rounding), Σw² = 1e200; dev rows ids 4–6 weigh 1 each
    const records = recordsOf(loaded.table);
    const sum = (split: string, field: 'weight' | 'weightSq') => records.reduce((a, c) => (c.split === split ? a + c[field] : a), 0);
    expect(sum('train', 'weight')).toBe(1e100);
    expect(sum('train', 'weightSq')).toBe(1e200);
    expect(sum('dev', 'weight')).toBe(3);
  });

  it('a bad weight outside --where is not reported; the one inside is', async () => {
    // id 2 (station S2) is filtered out; id 5 (station S1) is kept
    const path = csvFile({ 2: { weight: '-3' }, 5: { weight: '-1' } });
    const e = await failure(loadCells(duck, options({ source: files(path), where: `station = 'S1'` })));
    expect(e.message).toBe(`${path}: line 6, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-1" (1 row like it)`);
  });

  it('JSON Lines: line numbers start at 1', async () => {
    const cols = HEADER.split(',');
    const text = rowsWith({ 5: { weight: '-1' } })
      .map((r) => JSON.stringify(Object.fromEntries(cols.map((c, i) => [c, r[i]]))))
      .join('\n');
    const path = textFile('data.jsonl', text + '\n');
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: line 5, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-1" (1 row like it)`);
  });

  it('gzip-compressed TSV: line numbers as in the text', async () => {
    const path = join(dir, 'data.tsv.gz');
    writeGzip(path, [HEADER, ...rowsWith({ 5: { weight: '-1' } }).map((r) => r.join(','))].join('\n').replace(/,/g, '\t') + '\n');
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: line 6, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-1" (1 row like it)`);
  });

  it('Parquet: row numbers', async () => {
    const path = join(dir, 'data.parquet');
    await csvToParquet(duck, csvFile({ 5: { weight: '-1' } }), path);
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: row 5, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-1" (1 row like it)`);
  });

  it('per-split files: the message names the file that holds the bad row', async () => {
    const head = 'id,label,pred,station,weight';
    const train = textFile('train.csv', `${head}\n1,a,a,S1,1\n2,a,b,S2,1\n`);
    const dev = textFile('dev.csv', `${head}\n3,a,a,S1,1\n4,b,a,S2,-2\n`);
    const e = await failure(loadCells(duck, options({ source: { files: [], perSplit: { train, dev } } })));
    expect(e.message).toBe(`${dev}: line 3, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-2" (1 row like it)`);
  });

  it('per-split files read with union: --where on a column only one file has still locates the bad row', async () => {
    const train = textFile('train.csv', 'id,label,pred,weight,shift\n1,a,a,1,day\n2,a,b,1,night\n');
    const dev = textFile('dev.csv', 'id,label,pred,weight\n3,a,a,1\n4,b,a,-5\n');
    const where = `shift IS NULL OR shift = 'day'`;
    const e = await failure(loadCells(duck, options({ source: { files: [], perSplit: { train, dev }, union: true }, where })));
    // hand-counted: dev id 4 on line 3 is the only bad row (its shift is missing, so --where keeps it)
    expect(e.message).toBe(`${dev}: line 3, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "-5" (1 row like it)`);
  });

  it('per-split files read with union: a file without the weight column has missing weights', async () => {
    const train = textFile('train.csv', 'id,label,pred,station,weight\n1,a,a,S1,1\n2,a,b,S2,1\n');
    const dev = textFile('dev.csv', 'id,label,pred,station\n3,a,a,S1\n4,b,a,S2\n');
    const e = await failure(loadCells(duck, options({ source: { files: [], perSplit: { train, dev }, union: true } })));
    // hand-counted: both dev rows (lines 2 and 3) lack a weight
    expect(e.message).toBe(`${dev}: line 2, column "weight": expected a weight of 0 or between 1e-100 and 1e100, got "" (2 rows like it)`);
  });
});

describe('scores and error columns', () => {
  it('a non-numeric score: file, line, column', async () => {
    const path = csvFile({ 2: { score: 'high' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    // id 2 → line 3 (hand-counted)
    expect(e.message).toBe(`${path}: line 3, column "score": expected a number (model confidence), got "high" (1 row like it)`);
  });

  it('an empty score is allowed', async () => {
    const path = csvFile({ 2: { score: '' } });
    const loaded = await loadCells(duck, options({ source: files(path) }));
    // hand-counted: 8 rows, none left out
    expect(recordsOf(loaded.table).reduce((s, c) => s + c.rows, 0)).toBe(8);
  });

  it('an error column with a value that is not 0/1', async () => {
    const path = textFile('err.csv', 'split,error,station\ntrain,0,A\ntrain,1,B\ndev,maybe,A\ndev,0,B\n');
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: line 4, column "error": expected 0 or 1 (or true/false), got "maybe" (1 row like it)`);
  });
});

describe('floor tables', () => {
  it('a floor of 1.5: file, line, column', async () => {
    const floors = textFile('floors.csv', 'station,floor\nS1,0.1\nS2,1.5\n');
    const e = await failure(loadCells(duck, options({ source: files(csvFile()), floorTable: floors })));
    // line 3 (hand-counted)
    expect(e.message).toBe(`${floors}: line 3, column "floor": expected a fraction in [0, 1] (e.g. 0.02 for 2 %), got "1.5"`);
  });

  it('a key column missing from the data lists the data columns', async () => {
    const path = csvFile();
    const floors = textFile('floors.csv', 'station,shift,floor\nS1,night,0.1\n');
    const e = await failure(loadCells(duck, options({ source: files(path), floorTable: floors })));
    expect(e.message).toBe(`${floors}: key column "shift" is not a column of ${path}; the columns are ${COLUMN_LIST}`);
  });

  it('entries that match no row: one warning each, naming line and key', async () => {
    const floors = textFile('floors.csv', 'station,label,floor\nS1,,0.1\nS7,,0.2\nS2,zz,0.3\n');
    const loaded = await loadCells(duck, options({ source: files(csvFile()), floorTable: floors }));
    expect(loaded.warnings).toEqual([
      `${floors}: line 3 (station=S7) matches no row`,
      `${floors}: line 4 (station=S2 · label=zz) matches no row`,
    ]);
    // hand-counted: the 4 S1 rows take entry 0 (floor 0.1), the 4 S2 rows the default floor 0.01
    const s1 = recordsOf(loaded.table).filter((c) => c.key.station === 'S1');
    expect(s1.reduce((s, c) => s + c.rows, 0)).toBe(4);
    expect(s1.every((c) => c.floorEntry === 0 && c.floorSum === c.weight * 0.1)).toBe(true);
    const s2 = recordsOf(loaded.table).filter((c) => c.key.station === 'S2');
    expect(s2.every((c) => c.floorEntry === -1 && Math.abs(c.floorSum - c.rows * 0.01) < 1e-12)).toBe(true);
  });

  it('a missing floor table file names the path', async () => {
    const floors = join(dir, 'no-floors.csv');
    const e = await failure(loadCells(duck, options({ source: files(csvFile()), floorTable: floors })));
    expect(e.message).toBe(`${floors}: no such file`);
  });
});

describe('splits', () => {
  it('a required split with no rows', async () => {
    const path = csvFile({ 4: { split: 'test' }, 5: { split: 'test' }, 6: { split: 'train_dev' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(
      `${path}: no rows with split dev (found train, train_dev, test); train and dev are required, train_dev and test are optional`,
    );
  });

  it('no train rows, in grouping-sets mode too', async () => {
    const path = csvFile({ 1: { split: 'dev' }, 2: { split: 'val' }, 3: { split: 'test' } });
    for (const maxCells of [100_000, 1]) {
      const e = await failure(loadCells(duck, options({ source: files(path), maxCells })));
      expect(e.message).toBe(`${path}: no rows with split train (found dev, test); train and dev are required, train_dev and test are optional`);
    }
  });

  it('every row left out for an empty label or prediction: says so instead of "no rows with split train"', async () => {
    const empty = Object.fromEntries(ROWS.map((_, i): [number, Record<string, string>] => [i + 1, i % 2 ? { label: ' ' } : { pred: '' }]));
    const path = csvFile(empty);
    for (const maxCells of [100_000, 1]) {
      const e = await failure(loadCells(duck, options({ source: files(path), maxCells })));
      // hand-counted: all 8 rows have an empty label (ids 2, 4, 6, 8) or prediction (ids 1, 3, 5, 7)
      expect(e.message).toBe(`${path}: every row was left out: 8 rows have an empty "label" or "pred"; expected class labels in both columns`);
    }
  });

  it('every row of a required split left out: names the split and its rows', async () => {
    // ids 4–6 are the dev rows (hand-counted from the fixture); id 1 (train) is left out too
    const path = csvFile({ 1: { label: '' }, 4: { pred: '' }, 5: { label: '' }, 6: { pred: '  ' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: no usable rows with split dev: its 3 rows have an empty "label" or "pred"`);
    // the spelling of the split does not matter; --where narrows the count
    const val = csvFile({ 4: { pred: '', split: 'VAL' }, 5: { label: '', split: ' validation' }, 6: { pred: '' } });
    const e2 = await failure(loadCells(duck, options({ source: files(val), where: `station = 'S1' OR split <> 'dev'` })));
    // hand-counted: --where keeps ids 4 and 5 (split not 'dev' as written) but drops id 6 (S2, split dev)
    expect(e2.message).toBe(`${val}: no usable rows with split dev: its 2 rows have an empty "label" or "pred"`);
  });

  it('an error column empty on every row, or on every dev row', async () => {
    const all = textFile('err-empty.csv', 'split,error,station\ntrain,,A\ntrain, ,B\ndev,,A\ndev,,B\n');
    const e = await failure(loadCells(duck, options({ source: files(all) })));
    expect(e.message).toBe(`${all}: every row was left out: 4 rows have an empty "error"; expected 0 or 1 (or true/false) in it`);
    const dev = textFile('err-empty-dev.csv', 'split,error,station\ntrain,0,A\ntrain,1,B\ndev,,A\ndev,,B\n');
    const e2 = await failure(loadCells(duck, options({ source: files(dev) })));
    expect(e2.message).toBe(`${dev}: no usable rows with split dev: its 2 rows have an empty "error"`);
  });

  it('per-split files: a dev file whose every row lacks a label', async () => {
    const train = textFile('train.csv', 'id,label,pred\n1,a,a\n2,a,b\n');
    const dev = textFile('dev.csv', 'id,label,pred\n3,,a\n4,,b\n5,,a\n');
    const e = await failure(loadCells(duck, options({ source: { files: [], perSplit: { train, dev } } })));
    expect(e.message).toBe(`${train}, ${dev}: no usable rows with split dev: its 3 rows have an empty "label" or "pred"`);
  });

  it('unknown split values are listed as written (trimmed) with their row counts, most frequent first', async () => {
    const path = csvFile({ 2: { split: 'holdout' }, 6: { split: ' holdout' }, 7: { split: 'Fold1' } });
    for (const maxCells of [100_000, 1]) {
      const e = await failure(loadCells(duck, options({ source: files(path), maxCells })));
      // hand-counted: holdout ×2 (one with a leading space), Fold1 ×1, shown as written
      expect(e.message).toBe(
        `${path}: column "split" has unknown split values "holdout" (2 rows), "Fold1" (1 rows); expected train, train_dev (train-dev, traindev), dev (val, valid, validation), test`,
      );
    }
  });

  it('an empty split value is listed as (empty)', async () => {
    const path = csvFile({ 8: { split: '' } });
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(
      `${path}: column "split" has unknown split values "(empty)" (1 rows); expected train, train_dev (train-dev, traindev), dev (val, valid, validation), test`,
    );
  });

  it('spellings that name the same split fill the same cells', async () => {
    const path = csvFile({ 4: { split: 'VAL' }, 5: { split: ' validation ' }, 6: { split: 'Dev' } });
    const loaded = await loadCells(duck, options({ source: files(path) }));
    // hand-counted: dev holds ids 4 (S2), 5 (S1, error), 6 (S2) → one S1 cell and one S2 cell
    const dev = recordsOf(loaded.table).filter((c) => c.split === 'dev');
    expect(dev.map((c) => [c.key.station, c.rows, c.errors]).sort()).toEqual([
      ['S1', 1, 1],
      ['S2', 2, 0],
    ]);
  });
});

describe('inputs, --where and column names', () => {
  it('a header without rows', async () => {
    const path = textFile('header.csv', HEADER + '\n');
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: no rows; expected a header and data rows`);
  });

  it('--where that matches no row', async () => {
    const path = csvFile();
    const e = await failure(loadCells(duck, options({ source: files(path), where: `station = 'S9'` })));
    expect(e.message).toBe(`${path}: no rows match --where "station = 'S9'"`);
  });

  it('--where that is not valid SQL on the columns', async () => {
    const e = await failure(loadCells(duck, options({ source: files(csvFile()), where: 'shift = 1' })));
    expect(e.message.startsWith('--where "shift = 1": not a valid DuckDB SQL condition on the columns (')).toBe(true);
    expect(e.message.endsWith('); columns are text, so compare numbers with TRY_CAST(col AS DOUBLE)')).toBe(true);
  });

  it('both table files and per-split files', async () => {
    const path = csvFile();
    const e = await failure(loadCells(duck, options({ source: { files: [path], perSplit: { train: path } } })));
    expect(e.message).toBe('give either table files with a split column or --train/--train-dev/--dev/--test files, not both');
  });

  it('no input at all', async () => {
    const e = await failure(loadCells(duck, options({ source: { files: [], perSplit: {} } })));
    expect(e.message).toBe('no input: give a prediction table (e.g. floorgap report preds.csv) or --train F --dev F');
  });

  it('a missing data file names the path', async () => {
    const path = join(dir, 'nothing-here.csv');
    const e = await failure(loadCells(duck, options({ source: files(path) })));
    expect(e.message).toBe(`${path}: no such file`);
  });

  it('--by and --slice-cols naming unknown columns', async () => {
    const path = csvFile();
    const by = await failure(loadCells(duck, options({ source: files(path), by: ['shift'] })));
    expect(by.message).toBe(`${path}: --by names "shift", which is not a column; the columns are ${COLUMN_LIST}`);
    const cols = await failure(loadCells(duck, options({ source: files(path), sliceCols: ['shift'] })));
    expect(cols.message).toBe(`${path}: --slice-cols names "shift", which is not a column; the columns are ${COLUMN_LIST}`);
  });

  it('--label naming a missing column', async () => {
    const path = csvFile();
    const e = await failure(loadCells(duck, options({ source: files(path), roles: { label: 'truth' } })));
    expect(e.message).toBe(`${path}: no column "truth" for --label; the columns are ${COLUMN_LIST}`);
  });

  it('--by label resolves to the label column', async () => {
    const loaded = await loadCells(duck, options({ source: files(csvFile()), by: ['label', 'station'] }));
    expect(loaded.by).toEqual(['label', 'station']);
    // hand-counted: labels a (5 rows) and b (3 rows)
    const a = recordsOf(loaded.table).filter((c) => c.key.label === 'a').reduce((s, c) => s + c.rows, 0);
    const b = recordsOf(loaded.table).filter((c) => c.key.label === 'b').reduce((s, c) => s + c.rows, 0);
    expect([a, b]).toEqual([5, 3]);
  });
});
