/**
 * The engine cross-check: `loadCells` (one DuckDB scan) against an independent recomputation of every
 * cell by plain loops over the fixture rows (test/helpers/engine-fixture.ts, which shares no code with
 * src/). Unless a comment says otherwise, every expected value here is "computed independently in this
 * test by a plain loop over the fixture rows".
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { loadCells, type Loaded } from '../../src/cells/load.js';
import { type LoadOptions } from '../../src/cells/plan.js';
import { rollupSlices, type SliceStats } from '../../src/slices/rollup.js';
import type { CellRecord as Cell } from '../helpers/cell-records.js';
import {
  cellId,
  expectCells,
  expectedEdges,
  generateTable,
  parseCsv,
  records,
  splitOf,
  toCsv,
  toJsonl,
  type Expected,
  type ExpectedFloor,
  type TextRow,
  type TextTable,
} from '../helpers/engine-fixture.js';
import { csvToParquet, makeTempDir, removeTempDir, writeGzip } from '../helpers/table-variants.js';
import { recordsOf } from '../helpers/cell-records.js';

const BINS = 5;

let duck: Duck;
let dir: string;

beforeAll(async () => {
  duck = await openDuck({ threads: 2 });
  dir = makeTempDir();
});

afterAll(() => {
  duck?.close();
  if (dir) removeTempDir(dir);
});

function options(over: Partial<LoadOptions> & Pick<LoadOptions, 'source'>): LoadOptions {
  return {
    roles: {},
    where: null,
    by: null,
    sliceCols: null,
    bins: BINS,
    maxCells: 100_000,
    floor: null,
    floorTable: null,
    ...over,
  };
}

/** Writes the table as CSV and returns its path and the rows parsed back from the file text. */
function writeCsv(name: string, t: TextTable): { path: string; rows: TextRow[] } {
  const path = join(dir, name);
  writeFileSync(path, toCsv(t));
  // our own parsing of the file as written (not the generator's objects)
  return { path, rows: records(parseCsv(readFileSync(path, 'utf8'))) };
}

/** Relative closeness to 1e-9 (exact for zero). */
function close(actual: number, expected: number): boolean {
  if (expected === 0) return actual === 0;
  return Math.abs(actual - expected) <= 1e-9 * Math.abs(expected);
}

function expectClose(actual: number, expected: number, what: string): void {
  if (!close(actual, expected)) expect.fail(`${what}: got ${actual}, expected ${expected}`);
}

/** Asserts that the cells equal the expected cells one by one. */
function expectSameCells(cells: readonly Cell[], expected: Expected, columns: readonly string[]): void {
  const seen = new Set<string>();
  for (const c of cells) {
    const id = cellId(c.split, c.key, columns, c.floorEntry);
    expect(seen.has(id), `cell ${id} appears twice`).toBe(false);
    seen.add(id);
    const e = expected.cells.get(id);
    if (!e) expect.fail(`unexpected cell ${id}`);
    expect(Object.keys(c.key)).toEqual(columns);
    expect(c.rows, `${id} rows`).toBe(e.rows);
    expect(Number.isInteger(c.rows)).toBe(true);
    expectClose(c.weight, e.weight, `${id} weight`);
    expectClose(c.weightSq, e.weightSq, `${id} weightSq`);
    expectClose(c.errors, e.errors, `${id} errors`);
    expectClose(c.floorSum, e.floorSum, `${id} floorSum`);
    expect(c.floorEntry, `${id} floorEntry`).toBe(e.floorEntry);
    expect(c.floorN, `${id} floorN`).toBe(e.floorN);
  }
  const missing = [...expected.cells.keys()].filter((k) => !seen.has(k));
  expect(missing, 'expected cells the scan did not return').toEqual([]);
}

/** Slices in a canonical order with floor parts sorted, for comparing two rollups. */
function canonical(slices: readonly SliceStats[]): SliceStats[] {
  const byEntry = (a: { entry: number }, b: { entry: number }) => a.entry - b.entry;
  return [...slices]
    .map((s) => ({ ...s, floorParts: [...s.floorParts].sort(byEntry), devFloorParts: [...s.devFloorParts].sort(byEntry) }))
    .sort((a, b) => JSON.stringify(a.key).localeCompare(JSON.stringify(b.key)));
}

/** Asserts two rollups are equal: keys and row counts exactly, sums to 1e-9 relative. */
function expectSameSlices(actual: readonly SliceStats[], expected: readonly SliceStats[]): void {
  const a = canonical(actual);
  const b = canonical(expected);
  expect(a.map((s) => s.key)).toEqual(b.map((s) => s.key));
  a.forEach((s, i) => {
    const t = b[i];
    const what = JSON.stringify(s.key);
    expect(Object.keys(s.splits).sort(), what).toEqual(Object.keys(t.splits).sort());
    for (const [split, sums] of Object.entries(s.splits)) {
      const other = t.splits[split as keyof typeof t.splits]!;
      expect(sums.rows, `${what} ${split} rows`).toBe(other.rows);
      for (const f of ['weight', 'weightSq', 'errors', 'floorSum'] as const) expectClose(sums[f], other[f], `${what} ${split} ${f}`);
    }
    for (const parts of ['floorParts', 'devFloorParts'] as const) {
      expect(s[parts].map((p) => [p.entry, p.n]), `${what} ${parts}`).toEqual(t[parts].map((p) => [p.entry, p.n]));
      s[parts].forEach((p, j) => {
        expectClose(p.weight, t[parts][j].weight, `${what} ${parts} weight`);
        expectClose(p.floorSum, t[parts][j].floorSum, `${what} ${parts} floorSum`);
      });
    }
  });
}

/** Per-slice, per-split sums straight from the expected cells (a plain loop). */
function expectedSlices(expected: Expected, by: readonly string[]): Map<string, Map<string, { rows: number; weight: number; errors: number }>> {
  const out = new Map<string, Map<string, { rows: number; weight: number; errors: number }>>();
  for (const c of expected.cells.values()) {
    const k = JSON.stringify(by.map((b) => c.key[b]));
    const splits = out.get(k) ?? new Map();
    out.set(k, splits);
    const s = splits.get(c.split) ?? { rows: 0, weight: 0, errors: 0 };
    splits.set(c.split, { rows: s.rows + c.rows, weight: s.weight + c.weight, errors: s.errors + c.errors });
  }
  return out;
}

const TEMP_VALUES = (rows: readonly TextRow[]) => rows.filter((r) => r.temp.trim() !== '').map((r) => Number(r.temp));

describe('loadCells: unweighted, default floor, full cross', () => {
  const table = generateTable({ rows: 400, seed: 7 });
  let rows: TextRow[];
  let path: string;
  let loaded: Loaded;

  beforeAll(async () => {
    ({ path, rows } = writeCsv('plain.csv', table));
    loaded = await loadCells(duck, options({ source: { files: [path], perSplit: {} }, floor: 0.03 }));
  });

  it('detects the roles and the slice columns, binning the numeric one', () => {
    // roles and candidate columns: hand-derived from the generator's header (id, split, label, pred are
    // roles; station, lighting, batch have 2–50 values; temp is numeric with > 50 values)
    expect(loaded.roles).toMatchObject({ label: 'label', pred: 'pred', split: 'split', id: 'id', weight: null });
    const edges = expectedEdges(TEMP_VALUES(rows), BINS);
    expect(edges).toHaveLength(BINS - 1);
    expect(loaded.columns).toEqual([
      { name: 'station', kind: 'category' },
      { name: 'lighting', kind: 'category' },
      { name: 'temp', kind: 'binned', edges },
      { name: 'batch', kind: 'category' },
    ]);
    expect(loaded.overviewColumns).toEqual(['station', 'lighting', 'temp', 'batch']);
    expect(loaded.grouping).toEqual({ kind: 'cross' });
  });

  it('every cell matches the plain-loop recomputation', () => {
    const columns = loaded.columns.map((c) => ({ name: c.name, edges: c.kind === 'binned' ? expectedEdges(TEMP_VALUES(rows), BINS) : undefined }));
    const expected = expectCells(rows, { columns, defaultFloor: 0.03 });
    expect(expected.cells.size).toBeGreaterThan(50);
    expectSameCells(recordsOf(loaded.table), expected, columns.map((c) => c.name));
    // trimming: ' S2 ' and 'S2' are one station, and no key keeps stray spaces
    expect(new Set(recordsOf(loaded.table).map((c) => c.key.station))).toEqual(new Set(['S1', 'S2', 'S3', 'S4', '(missing)']));
    expect(new Set(recordsOf(loaded.table).map((c) => c.key.lighting))).toEqual(new Set(['dome', 'ring', 'coax', '(missing)']));
    expect(recordsOf(loaded.table).some((c) => c.key.temp === '(missing)')).toBe(true);
  });

  it('warns about unlabelled rows with their exact count, and about the missing floor only without one', () => {
    const expected = expectCells(rows, { columns: [] });
    expect(expected.unlabelled).toBeGreaterThan(0);
    expect(loaded.warnings).toEqual([`${expected.unlabelled} rows with an empty "label" or "pred" were left out`]);
  });

  it('labels with surrounding spaces compare equal after trimming', () => {
    // hand-counted property of the fixture: some rows differ from their label only by spaces
    const spacedOnly = rows.filter((r) => r.label !== '' && r.label !== r.pred && r.label.trim() === r.pred.trim());
    expect(spacedOnly.length).toBeGreaterThan(10);
    const total = recordsOf(loaded.table).reduce((s, c) => s + c.errors, 0);
    const plain = rows.filter((r) => r.label.trim() !== '' && r.pred.trim() !== '' && r.label.trim() !== r.pred.trim()).length;
    expect(total).toBe(plain);
  });
});

describe('loadCells: weights and a floor table with n and keys of different specificity', () => {
  const table = generateTable({ rows: 450, seed: 21, weighted: true });
  // floor table: hand-written; line numbers hand-counted (header is line 1)
  const FLOORS: ExpectedFloor[] = [
    { keys: { station: 'S1' }, floor: 0.05, n: 200 }, // line 2
    { keys: { station: 'S1', lighting: 'dome' }, floor: 0.1, n: 50 }, // line 3: more specific, wins for S1 · dome
    { keys: { lighting: 'ring' }, floor: 0.02, n: null }, // line 4: ties with line 2 for S1 · ring, line 2 wins
    { keys: { station: '(missing)' }, floor: 0.2, n: 10 }, // line 5: rows without a station
    { keys: { station: 'S9' }, floor: 0.3, n: 40 }, // line 6: matches no row
  ];
  const FLOOR_CSV = 'station,lighting,floor,n\nS1,,0.05,200\nS1,dome,0.10,50\n,ring,0.02,\n(missing),,0.2,10\nS9,,0.3,40\n';
  let rows: TextRow[];
  let path: string;
  let floorPath: string;
  let cross: Loaded;
  let sets: Loaded;
  let columns: { name: string; edges?: number[] }[];

  beforeAll(async () => {
    ({ path, rows } = writeCsv('weighted.csv', table));
    floorPath = join(dir, 'floors.csv');
    writeFileSync(floorPath, FLOOR_CSV);
    const base = { source: { files: [path], perSplit: {} }, floor: 0.01, floorTable: floorPath };
    cross = await loadCells(duck, options(base));
    sets = await loadCells(duck, options({ ...base, maxCells: 1 }));
    columns = cross.columns.map((c) => ({ name: c.name, edges: c.kind === 'binned' ? expectedEdges(TEMP_VALUES(rows), BINS) : undefined }));
  });

  it('reads the weight role and the floor table', () => {
    expect(cross.roles.weight).toBe('weight');
    expect(cross.floorTable?.entries.map((e) => e.line)).toEqual([2, 3, 4, 5, 6]);
    expect(cross.columns.map((c) => c.name)).toEqual(['station', 'lighting', 'temp', 'batch']);
    expect(cross.columns[2].edges).toEqual(expectedEdges(TEMP_VALUES(rows), BINS));
  });

  it('every cell matches the plain-loop recomputation (weights, floors, entries, n)', () => {
    const expected = expectCells(rows, { columns, weight: 'weight', floors: FLOORS, defaultFloor: 0.01 });
    expectSameCells(recordsOf(cross.table), expected, columns.map((c) => c.name));
    // every entry but S9 is used, and the default floor too (hand-derived from the fixture's stations)
    expect(new Set(recordsOf(cross.table).map((c) => c.floorEntry))).toEqual(new Set([-1, 0, 1, 2, 3]));
  });

  it('warns about the floor-table entry that matches no row', () => {
    const unlabelled = expectCells(rows, { columns: [] }).unlabelled;
    expect(cross.warnings).toEqual([
      `${unlabelled} rows with an empty "label" or "pred" were left out`,
      `${floorPath}: line 6 (station=S9) matches no row`,
    ]);
  });

  it('grouping sets: picked when maxCells is tiny; each set matches the plain loop', () => {
    expect(sets.grouping.kind).toBe('sets');
    if (sets.grouping.kind !== 'sets') return;
    // one set per column and per pair of columns (hand-derived: 4 columns → 4 + 6 sets)
    expect(sets.grouping.sets).toEqual([
      ['station'],
      ['lighting'],
      ['temp'],
      ['batch'],
      ['station', 'lighting'],
      ['station', 'temp'],
      ['station', 'batch'],
      ['lighting', 'temp'],
      ['lighting', 'batch'],
      ['temp', 'batch'],
    ]);
    const names = columns.map((c) => c.name);
    const patternOf = (c: Cell) => names.filter((n) => c.key[n] !== null).join('+');
    for (const set of sets.grouping.sets) {
      const mine = recordsOf(sets.table).filter((c) => patternOf(c) === set.join('+'));
      const expected = expectCells(rows, { columns, grouped: set, weight: 'weight', floors: FLOORS, defaultFloor: 0.01 });
      expectSameCells(mine, expected, names);
    }
    // no cell belongs to a pattern outside the sets
    const patterns = new Set(sets.grouping.sets.map((s) => s.join('+')));
    expect(recordsOf(sets.table).every((c) => patterns.has(patternOf(c)))).toBe(true);
  });

  it('grouping sets: the same warnings as the full cross (counts not multiplied by the number of sets)', () => {
    expect(sets.warnings).toEqual(cross.warnings);
  });

  it('grouping sets: rollups by one and two columns equal those of the full cross', () => {
    for (const by of [['station'], ['lighting'], ['temp'], ['station', 'lighting'], ['lighting', 'station'], ['temp', 'batch'], []]) {
      expectSameSlices(rollupSlices(sets.table, by), rollupSlices(cross.table, by));
    }
  });

  it('rollup by station matches the plain loop', () => {
    const expected = expectedSlices(expectCells(rows, { columns, weight: 'weight', floors: FLOORS, defaultFloor: 0.01 }), ['station']);
    const got = rollupSlices(cross.table, ['station']);
    expect(got.length).toBe(expected.size);
    for (const s of got) {
      const e = expected.get(JSON.stringify([s.key.station]))!;
      for (const [split, sums] of Object.entries(s.splits)) {
        const want = e.get(split)!;
        expect(sums.rows).toBe(want.rows);
        expectClose(sums.weight, want.weight, `${s.key.station} ${split} weight`);
        expectClose(sums.errors, want.errors, `${s.key.station} ${split} errors`);
      }
      expect(Object.keys(s.splits).sort()).toEqual([...e.keys()].sort());
    }
  });

  it('a by of three columns in grouping-sets mode', async () => {
    const by = ['station', 'lighting', 'batch'];
    const loaded = await loadCells(
      duck,
      options({ source: { files: [path], perSplit: {} }, floor: 0.01, floorTable: floorPath, maxCells: 1, by }),
    );
    expect(loaded.grouping.kind).toBe('sets');
    expect(loaded.by).toEqual(by);
    const got = rollupSlices(loaded.table, by);
    // against the plain loop, cell by cell for the three columns
    const names = columns.map((c) => c.name);
    const exact = recordsOf(loaded.table).filter((c) => names.filter((n) => c.key[n] !== null).join('+') === 'station+lighting+batch');
    expectSameCells(exact, expectCells(rows, { columns, grouped: by, weight: 'weight', floors: FLOORS, defaultFloor: 0.01 }), names);
    // and the rollup equals the full cross's rollup
    expectSameSlices(got, rollupSlices(cross.table, by));
    // one- and two-column rollups still come from their own sets
    expectSameSlices(rollupSlices(loaded.table, ['batch']), rollupSlices(cross.table, ['batch']));
    expectSameSlices(rollupSlices(loaded.table, ['station', 'batch']), rollupSlices(cross.table, ['station', 'batch']));
  });

  it('the same rows in two files of different formats give the same cells', async () => {
    const half = Math.floor(table.rows.length / 2);
    const first = join(dir, 'first-half.csv');
    writeFileSync(first, toCsv({ header: table.header, rows: table.rows.slice(0, half) }));
    const second = join(dir, 'second-half.jsonl.gz');
    writeGzip(second, toJsonl({ header: table.header, rows: table.rows.slice(half) }));
    const loaded = await loadCells(duck, options({ source: { files: [first, second], perSplit: {} }, floor: 0.01, floorTable: floorPath }));
    expect(loaded.columns).toEqual(cross.columns);
    const expected = expectCells(rows, { columns, weight: 'weight', floors: FLOORS, defaultFloor: 0.01 });
    expectSameCells(recordsOf(loaded.table), expected, columns.map((c) => c.name));
  });

  it('--where filters rows before binning and scanning', async () => {
    const where = `batch <> 'B3' AND TRY_CAST(weight AS DOUBLE) > 0`;
    const loaded = await loadCells(duck, options({ source: { files: [path], perSplit: {} }, floor: 0.01, floorTable: floorPath, where }));
    // the same condition written again in JS (batch is never empty; weight has spaces that CAST tolerates)
    const keep = (r: TextRow) => r.batch !== 'B3' && Number(r.weight.trim()) > 0;
    const kept = rows.filter(keep);
    expect(kept.length).toBeLessThan(rows.length * 0.7);
    const edges = expectedEdges(TEMP_VALUES(kept), BINS);
    expect(loaded.columns.find((c) => c.name === 'temp')?.edges).toEqual(edges);
    const cols = loaded.columns.map((c) => ({ name: c.name, edges: c.kind === 'binned' ? edges : undefined }));
    // B1 and B2 remain, so batch stays a slice column
    expect(cols.map((c) => c.name)).toEqual(['station', 'lighting', 'temp', 'batch']);
    const expected = expectCells(rows, { columns: cols, weight: 'weight', floors: FLOORS, defaultFloor: 0.01, keep });
    expectSameCells(recordsOf(loaded.table), expected, cols.map((c) => c.name));
    expect(new Set(recordsOf(loaded.table).map((c) => c.key.batch))).toEqual(new Set(['B1', 'B2']));
    expect(loaded.warnings).toContain(`${expected.unlabelled} rows with an empty "label" or "pred" were left out`);
  });
});

describe('loadCells: one file per split, in four formats', () => {
  const table = generateTable({ rows: 360, seed: 3, weighted: true });
  let rows: TextRow[];
  let loaded: Loaded;
  const fileSplit = new Map<string, string>();

  beforeAll(async () => {
    const { rows: all } = writeCsv('all-splits.csv', table);
    // drop the split column; the file decides the split
    const header = table.header.filter((h) => h !== 'split');
    const part = (split: string): TextTable => ({
      header,
      rows: all.filter((r) => splitOf(r.split) === split)
        .map((r) => header.map((h) => r[h])),
    });
    const train = join(dir, 'train.csv');
    writeFileSync(train, toCsv(part('train')));
    const trainDev = join(dir, 'train_dev.tsv');
    writeFileSync(trainDev, toCsv(part('train_dev')).replace(/,/g, '\t'));
    const dev = join(dir, 'dev.jsonl.gz');
    writeGzip(dev, toJsonl(part('dev')));
    const testCsv = join(dir, 'test-for-parquet.csv');
    writeFileSync(testCsv, toCsv(part('test')));
    const test = join(dir, 'test.parquet');
    await csvToParquet(duck, testCsv, test);
    // rows parsed back from the CSV text of each part (our own parsing), tagged with their file's split
    rows = [];
    for (const s of ['train', 'train_dev', 'dev', 'test']) {
      for (const r of records(parseCsv(toCsv(part(s))))) {
        rows.push(r);
        fileSplit.set(r.id, s);
      }
    }
    expect(rows.length).toBe(all.length);
    loaded = await loadCells(
      duck,
      options({ source: { files: [], perSplit: { train, train_dev: trainDev, dev, test } }, floor: 0.04 }),
    );
  });

  it('reads every format and tags each row with its file split', () => {
    expect(loaded.source.inputs.map((i) => [i.format, i.gzip, i.split])).toEqual([
      ['csv', false, 'train'],
      ['tsv', false, 'train_dev'],
      ['jsonl', true, 'dev'],
      ['parquet', false, 'test'],
    ]);
    expect(loaded.roles.split).toBeNull();
    expect(loaded.source.splitColumn).toBe('__fg_split');
    expect(loaded.columns.map((c) => c.name)).toEqual(['station', 'lighting', 'temp', 'batch']);
  });

  it('every cell matches the plain-loop recomputation', () => {
    const edges = expectedEdges(TEMP_VALUES(rows), BINS);
    expect(loaded.columns[2].edges).toEqual(edges);
    const columns = loaded.columns.map((c) => ({ name: c.name, edges: c.kind === 'binned' ? edges : undefined }));
    const expected = expectCells(rows, { columns, weight: 'weight', defaultFloor: 0.04, split: (r) => fileSplit.get(r.id)! });
    expectSameCells(recordsOf(loaded.table), expected, columns.map((c) => c.name));
    expect(new Set(recordsOf(loaded.table).map((c) => c.split))).toEqual(new Set(['train', 'train_dev', 'dev', 'test']));
  });
});

describe('loadCells: error and correct columns', () => {
  // fixture: hand-written; counts below hand-counted from it
  const CSV = [
    'split,correct,station',
    'train,1,A',
    'train,0,A',
    'train,true,B',
    'train, no ,B',
    'train,,B', // no value: left out
    'dev,yes,A',
    'dev,F,A',
    'dev,1.0,B',
  ].join('\n');

  it('a 0/1 correct column is inverted into errors; words and case are accepted', async () => {
    const path = join(dir, 'correct.csv');
    writeFileSync(path, CSV + '\n');
    const loaded = await loadCells(duck, options({ source: { files: [path], perSplit: {} } }));
    expect(loaded.roles.error).toBe('correct');
    expect(loaded.roles.errorIsCorrect).toBe(true);
    const pick = (split: string, station: string) => recordsOf(loaded.table).find((c) => c.split === split && c.key.station === station);
    // hand-counted: train A has 1 error of 2 rows, train B 1 of 2 (the empty row is left out),
    // dev A 1 of 2, dev B 0 of 1
    expect([pick('train', 'A')?.rows, pick('train', 'A')?.errors]).toEqual([2, 1]);
    expect([pick('train', 'B')?.rows, pick('train', 'B')?.errors]).toEqual([2, 1]);
    expect([pick('dev', 'A')?.rows, pick('dev', 'A')?.errors]).toEqual([2, 1]);
    expect([pick('dev', 'B')?.rows, pick('dev', 'B')?.errors]).toEqual([1, 0]);
    expect(recordsOf(loaded.table)).toHaveLength(4);
    expect(loaded.warnings).toContain('1 row with an empty "correct" was left out');
  });
});
