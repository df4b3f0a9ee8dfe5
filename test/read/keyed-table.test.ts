/** Floor tables. Expected values are hand-counted from the fixture (test/fixtures/floors/ or the lines a test writes). */
import { copyFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { describeKey, readFloorTable } from '../../src/read/keyed-table.js';
import { needsOneThreadFor } from '../../src/read/table.js';
import { openEngine } from '../../src/app/analysis.js';
import { FloorgapError } from '../../src/core/errors.js';
import { csvToParquet, makeTempDir, removeTempDir, writeGzip } from '../helpers/table-variants.js';
import { failure } from '../helpers/failure.js';

const FLOORS = fileURLToPath(new URL('../fixtures/floors', import.meta.url));

let duck: Duck;
let dir: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 1 });
  dir = makeTempDir();
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}


describe('readFloorTable', () => {
  it('reads keys of different specificity, floors and n (CSV)', async () => {
    const path = join(FLOORS, 'floors.csv');
    const t = await readFloorTable(duck, path);
    // expected: hand-copied from test/fixtures/floors/floors.csv; header is line 1, empty key cells are
    // not part of the key, key text is trimmed, leading zeros kept, `1e3` is a number
    expect(t.path).toBe(path);
    expect(t.keyColumns).toEqual(['station', 'lighting']);
    expect(t.entries).toEqual([
      { line: 2, keys: { station: 'S1' }, floor: 0.05, n: 200 },
      { line: 3, keys: { station: 'S1', lighting: 'dome' }, floor: 0.1, n: 50 },
      { line: 4, keys: { lighting: 'ring' }, floor: 0.02, n: null },
      { line: 5, keys: { station: '0201', lighting: 'ring' }, floor: 0, n: 1000 },
    ]);
  });

  it('a column name repeated (also after trimming) or left empty is an error naming the name as written', async () => {
    const twice = file('twice.csv', 'package,floor,floor\n0402,0.02,0.02\n');
    expect((await failure(readFloorTable(duck, twice))).message).toBe(`${twice}: columns 2 and 3 are both named "floor"; column names must be unique`);
    const padded = file('padded.tsv', 'package\tfloor\t package\n0402\t0.02\t0402\n');
    expect((await failure(readFloorTable(duck, padded))).message).toBe(
      `${padded}: columns 1 and 3 are both named "package" (after trimming spaces); column names must be unique`,
    );
    const unnamed = file('unnamed.csv', 'package,,floor\n0402,x,0.02\n');
    expect((await failure(readFloorTable(duck, unnamed))).message).toBe(
      `${unnamed}: column 2 has no name; name every column of the table (its keys and "floor")`,
    );
  });

  it('reads JSON Lines with line numbers starting at 1', async () => {
    const t = await readFloorTable(duck, join(FLOORS, 'floors.jsonl'));
    // expected: hand-copied from test/fixtures/floors/floors.jsonl (first line is line 1)
    expect(t.keyColumns).toEqual(['station', 'lighting']);
    expect(t.entries).toEqual([
      { line: 1, keys: { station: 'S1' }, floor: 0.05, n: 200 },
      { line: 2, keys: { station: 'S1', lighting: 'dome' }, floor: 0.1, n: null },
      { line: 3, keys: { lighting: 'ring' }, floor: 0.02, n: null },
    ]);
  });

  it('JSON Lines with a byte order mark: a command opens its engine with one thread for it (the parallel reader rejects the mark)', async () => {
    const path = file('bom.jsonl', '\ufeff{"station":"S1","floor":0.05}\n{"station":"S2","floor":0.1}\n');
    expect(await needsOneThreadFor([file('plain.csv', 'station,floor\nS1,0.05\n'), path])).toBe(true);
    expect(await needsOneThreadFor([file('plain2.csv', 'station,floor\nS1,0.05\n')])).toBe(false);
    const engine = await openEngine({ threads: 2, memoryLimit: '200MB' }, { read: [path], write: [] });
    try {
      expect(await engine.all(`SELECT current_setting('threads') AS t`)).toEqual([{ t: 1 }]);
      const t = await readFloorTable(engine, path);
      // expected: hand-copied from the two lines written above
      expect(t.entries).toEqual([
        { line: 1, keys: { station: 'S1' }, floor: 0.05, n: null },
        { line: 2, keys: { station: 'S2' }, floor: 0.1, n: null },
      ]);
    } finally {
      engine.close();
    }
  });

  it('reads TSV and gzip-compressed CSV', async () => {
    const tsv = file('floors.tsv', 'package\tfloor\n0201\t0.12\n');
    const gz = join(dir, 'floors.csv.gz');
    writeGzip(gz, 'package,floor\n0201,0.12\n');
    // expected: hand-written from the two one-entry tables above
    for (const path of [tsv, gz]) {
      const t = await readFloorTable(duck, path);
      expect(t.keyColumns).toEqual(['package']);
      expect(t.entries).toEqual([{ line: 2, keys: { package: '0201' }, floor: 0.12, n: null }]);
    }
  });

  it('reads another value column (a cost table)', async () => {
    const path = file('costs.csv', 'station,cost\nS1,2.5\nS2,40\n');
    const t = await readFloorTable(duck, path, 'cost');
    // expected: hand-copied from the table above; a cost may exceed 1
    expect(t.entries.map((e) => e.floor)).toEqual([2.5, 40]);
  });

  it('a cost outside [1e-12, 1e12] (1e308 would make Σw·cost infinite; 0 or 1e-13 the yield) names file, line and column', async () => {
    for (const bad of ['1e308', '1.5e12', '0', '1e-13', '-4', 'Infinity']) {
      const path = file(`cost-${bad}.csv`, `station,label_cost\nS1,2\nS2,${bad}\n`);
      const e = await failure(readFloorTable(duck, path, 'label_cost'));
      // line 3: hand-counted (header is line 1)
      expect(e.message).toBe(`${path}: line 3, column "label_cost": expected a cost from 1e-12 to 1e12 (e.g. 1, or 4 for a slice four times dearer to label), got "${bad}"`);
    }
    const ends = await readFloorTable(duck, file('cost-ends.csv', 'station,label_cost\nS1,1e12\nS2,1e-12\n'), 'label_cost');
    // expected: hand-copied from the table above; the ends of the range are costs
    expect(ends.entries.map((e) => e.floor)).toEqual([1e12, 1e-12]);
  });

  it('a floor of 1.5: names file, line and column', async () => {
    const path = file('floor-too-big.csv', 'station,floor\nS1,0.1\nS2,1.5\n');
    const e = await failure(readFloorTable(duck, path));
    // line 3: hand-counted (header is line 1)
    expect(e.message).toBe(`${path}: line 3, column "floor": expected a fraction in [0, 1] (e.g. 0.02 for 2 %), got "1.5"`);
  });

  it('a negative or non-numeric or empty floor', async () => {
    for (const [bad, line] of [
      ['-0.1', 2],
      ['2%', 2],
      ['', 2],
    ] as const) {
      const path = file(`floor-${line}-${bad.length}.csv`, `station,floor\nS1,${bad}\n`);
      const e = await failure(readFloorTable(duck, path));
      expect(e.message).toBe(
        `${path}: line ${line}, column "floor": expected a fraction in [0, 1] (e.g. 0.02 for 2 %), got "${bad}"`,
      );
    }
  });

  it('a non-positive n', async () => {
    const path = file('bad-n.jsonl', '{"station":"S1","floor":0.1,"n":5}\n{"station":"S2","floor":0.1,"n":0}\n');
    const e = await failure(readFloorTable(duck, path));
    // line 2: hand-counted (JSON Lines: first line is line 1)
    expect(e.message).toBe(`${path}: line 2, column "n": expected a number of rows > 0, got "0"`);
  });

  it('two entries with the same key (after trimming)', async () => {
    const path = file('dup.csv', 'station,lighting,floor\nS1,dome,0.1\nS2,,0.2\n S1 ,dome ,0.3\n');
    const e = await failure(readFloorTable(duck, path));
    expect(e.message).toBe(`${path}: lines 2 and 4 give station=S1 · lighting=dome different values (floor 0.1 and 0.3); keep one`);
  });

  it('no floor column lists the columns', async () => {
    const path = file('nofloor.csv', 'station,value\nS1,0.1\n');
    const e = await failure(readFloorTable(duck, path));
    expect(e.message).toBe(`${path}: no "floor" column; the columns are "station", "value"`);
  });

  it('no key column', async () => {
    const path = file('nokey.csv', 'floor,n\n0.1,20\n');
    const e = await failure(readFloorTable(duck, path));
    expect(e.message).toBe(`${path}: no key columns; add slice columns (e.g. package) beside "floor"`);
  });

  it('a header without rows', async () => {
    const path = file('header-only.csv', 'station,floor\n');
    const e = await failure(readFloorTable(duck, path));
    expect(e.message).toBe(`${path}: no entries; expected a header and at least one row with a "floor" column`);
  });

  it('Parquet is refused', async () => {
    const csv = file('floors-for-parquet.csv', 'station,floor\nS1,0.1\n');
    const path = join(dir, 'floors.parquet');
    await csvToParquet(duck, csv, path);
    const e = await failure(readFloorTable(duck, path));
    expect(e.message).toBe(`${path}: a floor table must be CSV, TSV or JSON Lines`);
  });

  it('a missing file names the path', async () => {
    const path = join(dir, 'missing-floors.csv');
    const e = await failure(readFloorTable(duck, path));
    expect(e.message).toBe(`${path}: no such file`);
  });

  it('a floor table under a .txt name is detected by content', async () => {
    const path = join(dir, 'floors.txt');
    copyFileSync(join(FLOORS, 'floors.csv'), path);
    const t = await readFloorTable(duck, path);
    // expected: same four entries as floors.csv (hand-counted)
    expect(t.entries).toHaveLength(4);
  });
});

describe('describeKey', () => {
  it('joins key parts; the empty key is every row', () => {
    // expected: hand-written
    expect(describeKey({ station: 'S1', lighting: 'dome' })).toBe('station=S1 · lighting=dome');
    expect(describeKey({})).toBe('(every row)');
  });
});
