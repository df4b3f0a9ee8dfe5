/** Opening inputs into the rows view. Expected values are hand-counted from the fixture tables each test writes. */
import { mkdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { checkWhere, openSource, PER_SPLIT_COLUMN, ROWS_VIEW } from '../../src/read/source.js';
import { headerNames, detectTable } from '../../src/read/table.js';
import { FloorgapError } from '../../src/core/errors.js';
import { makeTempDir, removeTempDir, writeGzip } from '../helpers/table-variants.js';
import { failure } from '../helpers/failure.js';

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


describe('openSource', () => {
  it('two files with different columns, with union: one view, columns in first-seen order, missing as null', async () => {
    const a = file('a.csv', 'split,label,pred,station\ntrain,x,x,S1\n');
    const b = file('b.jsonl', '{"split":"dev","label":"y","pred":"x","lighting":"dome"}\n');
    const source = await openSource(duck, { files: [a, b], perSplit: {}, union: true });
    expect(source.columns).toEqual(['split', 'label', 'pred', 'station', 'lighting']);
    expect(source.splitColumn).toBeNull();
    expect(source.where).toBe(`${a}, ${b}`);
    const rows = await duck.all(`SELECT * FROM ${ROWS_VIEW} ORDER BY split DESC`);
    expect(rows).toEqual([
      { split: 'train', label: 'x', pred: 'x', station: 'S1', lighting: null },
      { split: 'dev', label: 'y', pred: 'x', station: null, lighting: 'dome' },
    ]);
  });

  it('two files with different columns, without union: an error naming the files and the columns that differ', async () => {
    const a = file('u-a.csv', 'split,label,pred,station,lighting\ntrain,x,x,S1,dome\n');
    const b = file('u-b.csv', 'split,shift,label,pred,station\ndev,day,y,x,S1\n');
    const e = await failure(openSource(duck, { files: [a, b], perSplit: {} }));
    expect(e.message).toBe(
      `${b}: its columns differ from ${a}'s (${b} lacks "lighting"; has "shift" that ${a} lacks); give files with the same columns, or --union to read them as one table with missing values`,
    );
    // the same columns in another order are the same columns
    const c = file('u-c.csv', 'pred,label,split,lighting,station\ndev,y,x,ring,S2\n');
    expect((await openSource(duck, { files: [a, c], perSplit: {} })).columns).toEqual(['split', 'label', 'pred', 'station', 'lighting']);
  });

  it('per-split files follow the same column rule', async () => {
    const train = file('ps-train.csv', 'label,pred,station\na,a,S1\n');
    const dev = file('ps-dev.csv', 'label,pred\nb,a\n');
    const e = await failure(openSource(duck, { files: [], perSplit: { train, dev } }));
    expect(e.message).toBe(
      `${dev}: its columns differ from ${train}'s (${dev} lacks "station"); give files with the same columns, or --union to read them as one table with missing values`,
    );
    const source = await openSource(duck, { files: [], perSplit: { train, dev }, union: true });
    expect(source.columns).toEqual(['label', 'pred', 'station']);
  });

  it('a file named twice (the same path, another spelling of it, a symlink) is an error', async () => {
    const a = file('twice.csv', 'split,label,pred\ntrain,x,x\n');
    const link = join(dir, 'twice-link.csv');
    symlinkSync(a, link);
    mkdirSync(join(dir, 'sub'), { recursive: true });
    const again = `${dir}/./sub/../twice.csv`; // not join(), which would tidy the spelling away
    for (const [first, second] of [[a, a], [a, again], [a, link]]) {
      const e = await failure(openSource(duck, { files: [first, second], perSplit: {}, union: true }));
      expect(e.message).toBe(`${second}: the same file as ${first}, given twice; give each file once`);
    }
    const e = await failure(openSource(duck, { files: [], perSplit: { train: a, dev: link } }));
    expect(e.message).toBe(`${link}: the same file as ${a}, given twice; give each file once`);
  });

  it('per-split files: each row gets its file split in __fg_split', async () => {
    const train = file('train.csv', 'label,pred\na,a\nb,a\n');
    const dev = join(dir, 'dev.csv.gz');
    writeGzip(dev, 'label,pred\nc,c\n');
    const source = await openSource(duck, { files: [], perSplit: { train, dev } });
    expect(source.splitColumn).toBe(PER_SPLIT_COLUMN);
    expect(source.columns).toEqual(['label', 'pred']);
    const rows = await duck.all(`SELECT label, ${PER_SPLIT_COLUMN} AS s FROM ${ROWS_VIEW} ORDER BY label`);
    expect(rows).toEqual([
      { label: 'a', s: 'train' },
      { label: 'b', s: 'train' },
      { label: 'c', s: 'dev' },
    ]);
  });

  it('a column named twice in a CSV header', async () => {
    const path = file('dup.csv', 'split,label,label,pred\ntrain,a,b,a\n');
    const e = await failure(openSource(duck, { files: [path], perSplit: {} }));
    expect(e.message).toBe(`${path}: columns 2 and 3 are both named "label"; column names must be unique`);
  });

  it('a column named twice in a gzip TSV header', async () => {
    const path = join(dir, 'dup.tsv.gz');
    writeGzip(path, 'split\tpred\tlabel\tpred\ntrain\ta\tb\ta\n');
    const e = await failure(openSource(duck, { files: [path], perSplit: {} }));
    expect(e.message).toBe(`${path}: columns 2 and 4 are both named "pred"; column names must be unique`);
  });

  it('two names the same after trimming spaces: an error naming both positions, not a renamed column', async () => {
    const path = file('padded.csv', 'split,label,pred,station,station \ntrain,a,a,S1,S1\n');
    const e = await failure(openSource(duck, { files: [path], perSplit: {} }));
    expect(e.message).toBe(`${path}: columns 4 and 5 are both named "station" (after trimming spaces); column names must be unique`);
    const json = file('padded.jsonl', '{"split":"train","label":"a","pred":"a"," station":"S1","station":"S1"}\n');
    const j = await failure(openSource(duck, { files: [json], perSplit: {} }));
    expect(j.message).toBe(`${json}: columns 4 and 5 are both named "station" (after trimming spaces); column names must be unique`);
  });

  it('an unnamed column is left out of the rows view and recorded by position', async () => {
    const path = file('unnamed.csv', ',split,label,  ,pred\n0,train,a,x,a\n1,dev,b,y,a\n');
    const source = await openSource(duck, { files: [path], perSplit: {} });
    expect(source.columns).toEqual(['split', 'label', 'pred']);
    expect(source.unnamed).toEqual([
      { path, column: 1 },
      { path, column: 4 },
    ]);
    const rows = await duck.all(`SELECT * FROM ${ROWS_VIEW} ORDER BY split DESC`);
    expect(rows).toEqual([
      { split: 'train', label: 'a', pred: 'a' },
      { split: 'dev', label: 'b', pred: 'a' },
    ]);
  });

  it('columns named x and x_1 are two different columns', async () => {
    const path = file('similar.csv', 'split,label,label_1,pred\ntrain,a,b,a\n');
    const source = await openSource(duck, { files: [path], perSplit: {} });
    expect(source.columns).toEqual(['split', 'label', 'label_1', 'pred']);
  });

  it('the reserved column name', async () => {
    const path = file('reserved.csv', `split,label,pred,${PER_SPLIT_COLUMN}\ntrain,a,a,x\n`);
    const e = await failure(openSource(duck, { files: [path], perSplit: {} }));
    expect(e.message).toBe(`${path}: column name "${PER_SPLIT_COLUMN}" is reserved by floorgap; rename it`);
  });

  it('headerNames gives the header as written, null for JSON Lines', async () => {
    const csv = file('quoted.csv', '"a,b",c,c\n1,2,3\n');
    expect(await headerNames(duck, await detectTable(csv))).toEqual(['a,b', 'c', 'c']);
    const jsonl = file('h.jsonl', '{"a":1}\n');
    expect(await headerNames(duck, await detectTable(jsonl))).toBeNull();
  });

  it('checkWhere accepts a valid condition and rejects an unknown column', async () => {
    const path = file('w.csv', 'split,label,pred,t\ntrain,a,a,1.5\n');
    await openSource(duck, { files: [path], perSplit: {} });
    await expect(checkWhere(duck, 'TRY_CAST(t AS DOUBLE) > 1')).resolves.toBeUndefined();
    await expect(checkWhere(duck, null)).resolves.toBeUndefined();
    const e = await failure(checkWhere(duck, 'nope > 1'));
    expect(e.message.startsWith('--where "nope > 1": not a valid DuckDB SQL condition on the columns (')).toBe(true);
  });
});
