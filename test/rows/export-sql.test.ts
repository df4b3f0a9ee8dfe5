/**
 * The export query on a hand-made table of eleven rows held in DuckDB. Every expected row order,
 * membership and count below is hand-counted from the fixture (the comments beside FIXTURE say which
 * rows lie in which slice and why).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { exportCountSql, exportSql, neutralizeSql, type ExportQuery } from '../../src/rows/export-sql.js';
import type { Roles } from '../../src/read/roles.js';
import { literal } from '../../src/sql/quote.js';

const COLUMNS = ['id', 'split', 'cam', 'size', 'label', 'pred', 'score', 'a1', 'a2', 'note', 'run'];
// fixture (hand-made). Slices: s0 = cam=A (rank 1), s1 = size=< 0.5 (rank 2, binned at 0.5), s2 = cam=B (rank 5).
//   id  split  cam size  label pred score  a1  a2  note        membership, class
const FIXTURE: string[][] = [
  ['1', 'train', 'A', '0.2', 'x', 'x', '0.9', '', '', '=SUM(A1)', 'r1'], //   s0 s1, rest
  ['2', 'train', 'A', '0.7', 'x', 'y', '0.6', '', '', '-0.5', 'r1'], //       s0, error 0.6
  ['3', 'dev', 'A', '0.3', 'x', 'y', '0.95', '', '', '+3', 'r1'], //          s0 s1, error 0.95
  ['4', 'val', 'B', '0.8', 'x', 'x', '0.5', 'y', 'x', '1e-3', 'r1'], //        s2, dissent 1/2 (val → dev)
  ['5', 'dev', 'B', '0.1', 'x', 'y', '0.99', '', '', '\tx', 'r1'], //          s1 s2, error 0.99
  ['6', 'test', 'A', '0.4', 'x', 'y', '0.99', '', '', '', 'r1'], //           s0 s1, test: not written by default
  ['7', 'train', 'B', '0.9', 'y', 'y', '0.7', 'x', 'x', '@cmd', 'r1'], //     s2, dissent 2/2
  ['8', 'dev', 'A', '0.6', '', 'y', '0.8', '', '', '', 'r1'], //              s0 but no label: left out
  ['9', 'train', 'B', '0.2', 'x', 'x', '0.1', '', '', '-x', 'r1'], //         s1 s2, rest
  ['10', 'dev', 'A', '0.9', 'x', 'y', '', '', '', '-1.5e3', 'r1'], //         s0, error without score
  ['11', 'train', 'C', '0.6', 'x', 'y', '0.9', '', '', '', 'r1'], //          in no chosen slice
  ['12', 'train', 'A', '0.7', 'x', 'y', '0.99', '', '', '', 'r2'], //         s0, but run r2
];

const ROLES: Roles = { label: 'label', pred: 'pred', error: null, errorIsCorrect: false, split: 'split', id: 'id', score: 'score', weight: null, run: null };

function query(over: Partial<ExportQuery> = {}): ExportQuery {
  return {
    columns: COLUMNS,
    plan: { roles: ROLES, splitColumn: 'split', where: null, annotators: ['a1', 'a2'] },
    sliceColumns: [
      { name: 'cam', kind: 'category' },
      { name: 'size', kind: 'binned', edges: [0.5] },
    ],
    slices: [
      { key: { cam: 'A' }, label: 'cam=A', focus: 'bias', rank: 1, reason: 'reason A' },
      { key: { size: '< 0.5' }, label: 'size=< 0.5', focus: 'variance', rank: 2, reason: 'reason small' },
      { key: { cam: 'B' }, label: 'cam=B', focus: 'mismatch', rank: 5, reason: 'reason B' },
    ],
    splits: ['train', 'dev'],
    errorsOnly: false,
    limitPerSlice: null,
    neutralize: true,
    run: { column: 'run', value: 'r1' },
    ...over,
  };
}

let duck: Duck;

beforeAll(async () => {
  duck = await openDuck({ threads: 1 });
  const values = FIXTURE.map((r) => `(${r.map((v) => (v === '' ? 'NULL' : literal(v))).join(', ')})`.replace(`'\tx'`, `chr(9) || 'x'`));
  await duck.run(`CREATE VIEW fg_rows AS SELECT * FROM (VALUES ${values.join(', ')}) t(${COLUMNS.map((c) => `"${c}"`).join(', ')})`);
});

afterAll(() => duck.close());

const ids = async (q: ExportQuery) => (await duck.all(exportSql(q))).map((r) => r.id);

describe('exportSql', () => {
  it('every original column in order, then the fg_ columns', async () => {
    const reader = await duck.connection.runAndReadAll(exportSql(query()));
    expect(reader.columnNames()).toEqual([...COLUMNS, 'fg_slice', 'fg_focus', 'fg_rank', 'fg_split', 'fg_reason']);
  });

  it('rows grouped by their best-ranked slice; errors by score, then disputed rows, then the rest', async () => {
    // hand-counted: cam=A holds 3 (0.95), 2 (0.6), 10 (no score), then 1; size<0.5 then holds 5 (error), 9;
    // cam=B holds 7 (dissent 1), 4 (dissent 1/2). 6 is test, 8 has no label, 11 is in no slice, 12 is run r2.
    expect(await ids(query())).toEqual(['3', '2', '10', '1', '5', '9', '7', '4']);
  });

  it('a row in several chosen slices appears once with all of them, in rank order', async () => {
    const rows = await duck.all(exportSql(query()));
    const row = (id: string) => rows.find((r) => r.id === id)!;
    // hand-counted: row 3 lies in cam=A and size<0.5; row 5 in size<0.5 and cam=B
    expect(row('3')).toMatchObject({ fg_slice: 'cam=A | size=< 0.5', fg_focus: 'bias | variance', fg_rank: '1 | 2', fg_reason: 'reason A | reason small', fg_split: 'dev' });
    expect(row('5')).toMatchObject({ fg_slice: 'size=< 0.5 | cam=B', fg_rank: '2 | 5' });
    expect(row('2')).toMatchObject({ fg_slice: 'cam=A', fg_rank: '1', fg_reason: 'reason A', fg_split: 'train' });
    // split spellings are normalised: row 4 was written "val"
    expect(row('4')).toMatchObject({ split: 'val', fg_split: 'dev' });
    expect(rows.filter((r) => r.id === '3')).toHaveLength(1);
  });

  it('--errors-only keeps the model errors', async () => {
    // hand-counted: errors in train/dev among chosen rows are 3, 2, 10 (cam=A) and 5 (size<0.5)
    expect(await ids(query({ errorsOnly: true }))).toEqual(['3', '2', '10', '5']);
  });

  it('--limit-per-slice counts a row in the slice it sits with', async () => {
    // hand-counted: the first row of each group above
    expect(await ids(query({ limitPerSlice: 1 }))).toEqual(['3', '5', '7']);
    expect(await ids(query({ limitPerSlice: 2 }))).toEqual(['3', '2', '5', '9', '7', '4']);
  });

  it('--splits chooses the splits written', async () => {
    // hand-counted: train rows 2, 1 (cam=A), 9 (size<0.5), 7 (cam=B); with test, row 6 (error 0.99) leads cam=A
    expect(await ids(query({ splits: ['train'] }))).toEqual(['2', '1', '9', '7']);
    expect((await ids(query({ splits: ['train', 'dev', 'test'] })))[0]).toBe('6');
  });

  it('without a run the rows of every run are read; with one only its rows', async () => {
    // hand-counted: row 12 (run r2, error 0.99) then leads cam=A
    expect((await ids(query({ run: null })))[0]).toBe('12');
  });

  it('--where applies', async () => {
    const q = query();
    expect(await ids({ ...q, plan: { ...q.plan, where: `id <> '3'` } })).toEqual(['2', '10', '1', '5', '9', '7', '4']);
  });

  it('no chosen slice: no rows', async () => {
    expect(await ids(query({ slices: [] }))).toEqual([]);
  });

  it("formula-like text gets a leading '; numbers and NULL stay; --raw writes text as it is", async () => {
    const notes = Object.fromEntries((await duck.all(exportSql(query()))).map((r) => [r.id, r.note]));
    // hand-made values: =, +, -, @ and tab starts are neutralised unless the text is a number
    expect(notes).toEqual({ '1': "'=SUM(A1)", '2': '-0.5', '3': '+3', '4': '1e-3', '5': "'\tx", '7': "'@cmd", '9': "'-x", '10': '-1.5e3' });
    const raw = Object.fromEntries((await duck.all(exportSql(query({ neutralize: false })))).map((r) => [r.id, r.note]));
    expect(raw).toMatchObject({ '1': '=SUM(A1)', '5': '\tx', '7': '@cmd', '9': '-x' });
  });

  it('the fg_ columns are neutralised too', async () => {
    const q = query({ slices: [{ key: { cam: 'A' }, label: '=cam=A', focus: 'bias', rank: 1, reason: '-x' }] });
    const row = (await duck.all(exportSql(q)))[0];
    expect(row).toMatchObject({ fg_slice: "'=cam=A", fg_reason: "'-x" });
  });
});

describe('neutralizeSql', () => {
  it('on single values (hand-made cases)', async () => {
    const cases: [string | null, string | null][] = [
      ['=SUM(A1)', "'=SUM(A1)"],
      ['+A1', "'+A1"],
      ['-0.5', '-0.5'],
      ['+3', '+3'],
      ['.5', '.5'],
      ['-', "'-"],
      ['\r=1', "'\r=1"],
      ['a=b', 'a=b'],
      [null, null],
    ];
    for (const [input, want] of cases) {
      const v = input === null ? 'NULL::VARCHAR' : literal(input);
      const [row] = await duck.all(`SELECT ${neutralizeSql(v)} AS v`);
      expect(row.v).toBe(want);
    }
  });
});

describe('exportCountSql', () => {
  it('rows per split, and per slice (a row counted under each of its slices)', async () => {
    const rows = await duck.all(exportCountSql(query()));
    // hand-counted: dev rows 3, 10, 5, 4 (cam=A: 3, 10; size<0.5: 3, 5; cam=B: 5, 4);
    // train rows 2, 1, 9, 7 (cam=A: 2, 1; size<0.5: 1, 9; cam=B: 9, 7)
    expect(rows).toEqual([
      { split: 'dev', rows: 4, s0: 2, s1: 2, s2: 2 },
      { split: 'train', rows: 4, s0: 2, s1: 2, s2: 2 },
    ]);
    const limited = await duck.all(exportCountSql(query({ limitPerSlice: 1 })));
    // hand-counted: rows 3 (cam=A, size<0.5), 5 (size<0.5, cam=B), 7 (cam=B)
    expect(limited).toEqual([
      { split: 'dev', rows: 2, s0: 1, s1: 2, s2: 1 },
      { split: 'train', rows: 1, s0: 0, s1: 0, s2: 1 },
    ]);
  });
});
