/**
 * `floorgap export` through the built CLI on the shipped demo sample. Expected rows are recomputed in
 * this test by reading data-samples/solder-joints.csv with plain string splitting (the sample has no
 * quoted fields), never by reusing floorgap code; the flagged slices are the demo generator's planted
 * truth (S5 mismatch, low-angle variance, QFN bias). Exported files are read back with DuckDB.
 * The CLI runs start together in beforeAll (at most three at a time) to keep the file fast.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { ROOT, runCli, type CliResult } from '../helpers/run-cli.js';

const TABLE = 'data-samples/solder-joints.csv';
const FLOORS = 'data-samples/inspector-floors.csv';
const SAMPLE = [TABLE, '--floor-table', FLOORS, '--annotators', 'insp_a,insp_b,insp_c'];
const FG = ['fg_slice', 'fg_focus', 'fg_rank', 'fg_split', 'fg_reason'];

/** The demo table, read independently: header and rows as string arrays, with the input position. */
interface DemoRow {
  readonly at: number;
  readonly v: Record<string, string>;
}
function readDemo(): { header: string[]; rows: DemoRow[] } {
  const lines = readFileSync(join(ROOT, TABLE), 'utf8').trim().split(/\r?\n/);
  const header = lines[0].split(',');
  const rows = lines.slice(1).map((line, at) => {
    const cells = line.split(',');
    return { at, v: Object.fromEntries(header.map((h, i) => [h, cells[i]])) };
  });
  return { header, rows };
}

const isError = (r: DemoRow) => r.v.label.trim() !== r.v.pred.trim();
const inKey = (key: Record<string, string>) => (r: DemoRow) => Object.entries(key).every(([c, v]) => r.v[c] === v);
/** Errors first by score (highest first), ties in input order: the order export promises for a slice's errors. */
const byConfidence = (a: DemoRow, b: DemoRow) => Number(b.v.score) - Number(a.v.score) || a.at - b.at;

let dir: string;
let duck: Duck;
let demo: { header: string[]; rows: DemoRow[] };
const runs: Record<string, CliResult> = {};
let started = 0;
let finished = 0;

async function readRows(path: string): Promise<Record<string, string | null>[]> {
  const from = path.endsWith('.parquet')
    ? `read_parquet('${path}')`
    : path.endsWith('.jsonl')
      ? `read_json('${path}', format = 'newline_delimited')`
      : `read_csv('${path}', header = true, all_varchar = true)`;
  const rows = await duck.all(`SELECT COLUMNS(*)::VARCHAR FROM ${from}`);
  return rows as Record<string, string | null>[];
}

function manifest(path: string): Record<string, any> {
  return JSON.parse(readFileSync(`${path}.manifest.json`, 'utf8')) as Record<string, any>;
}

/** Runs jobs with at most `width` at a time. */
async function pool(jobs: (() => Promise<void>)[], width: number): Promise<void> {
  const queue = [...jobs];
  await Promise.all(Array.from({ length: width }, async () => {
    while (queue.length) await queue.shift()!();
  }));
}

const out = (name: string) => join(dir, name);

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-export-'));
  duck = await openDuck({ threads: 1 });
  demo = readDemo();
  // a small hand-made table: formula-like notes, a memo with commas, quotes and empty values
  writeFileSync(
    out('notes.csv'),
    ['id,split,cam,label,pred,score,note,memo', ...Array.from({ length: 40 }, (_, i) => {
      const notes = ['=SUM(A1)', '-0.5', '+3', '@x', '-x', 'plain'];
      const memo = i % 3 === 0 ? '' : i % 3 === 1 ? '"a, ""quoted"" b"' : 'é ü';
      return `${i},${i % 2 ? 'train' : 'dev'},${i % 4 < 2 ? 'A' : 'B'},c,${i % 5 ? 'c' : 'd'},0.${i % 10},${notes[i % notes.length]},${memo}`;
    })].join('\n') + '\n',
  );
  // a column whose name holds a comma (quoted in the header): cam, side is L on even rows, R on odd ones
  writeFileSync(
    out('comma.csv'),
    ['id,split,"cam, side",label,pred', ...Array.from({ length: 40 }, (_, i) => `${i},${i % 4 < 2 ? 'train' : 'dev'},${i % 2 ? 'R' : 'L'},c,${i % 3 ? 'c' : 'd'}`)].join('\n') + '\n',
  );
  // files in the way, for --force and its refusal
  writeFileSync(out('taken.csv'), 'old rows\n');
  writeFileSync(out('forced.csv'), 'old rows\n');
  writeFileSync(out('forced.csv.manifest.json'), '{}\n');
  const job = (name: string, args: string[]) => async () => {
    started++;
    runs[name] = await runCli(args);
    finished++;
  };
  const exp = (file: string, ...more: string[]) => ['export', ...SAMPLE, '--out', out(file), ...more];
  const notes = (file: string, ...more: string[]) => ['export', out('notes.csv'), '--slice-cols', 'cam', '--out', out(file), ...more];
  await pool(
    [
      job('csv', exp('flagged.csv')),
      job('errors', exp('forced.csv', '--errors-only', '--limit-per-slice', '5', '--force')),
      job('top', exp('top.csv', '--top', '5', '--splits', 'train,train_dev,dev,test')),
      job('named', exp('named.csv', '--slice', 'station=S5', '--slice', 'package=QFN')),
      job('pair', exp('pair.jsonl', '--slice', 'station=S5,lighting=dome', '--splits', 'dev,test')),
      job('nocol', exp('nocol.csv', '--slice', 'camera=S5')),
      job('taken', exp('taken.csv')),
      job('nofolder', exp(join('missing', 'rows.csv'))),
      job('notes', notes('notes-out.csv', '--top', '2')),
      job('notesJsonl', notes('notes-out.jsonl', '--top', '2')),
      job('notesParquet', notes('notes-out.parquet', '--top', '2')),
      job('notesRaw', notes('notes-raw.csv', '--top', '2', '--raw')),
      job('nokey', notes('nokey.csv', '--slice', 'cam=Z')),
      job('both', notes('both.csv', '--top', '2', '--slice', 'cam=A')),
      job('badSplit', notes('bad-split.csv', '--splits', 'train,holdout')),
      job('dotJson', notes('rows.json')),
      job('comma', ['export', out('comma.csv'), '--slice', 'cam\\, side=R', '--splits', 'dev', '--out', out('comma-out.csv')]),
    ],
    3,
  );
}, 120_000);

afterAll(() => {
  duck?.close();
  rmSync(dir, { recursive: true, force: true });
});

describe('the default export: flagged slices, train and dev rows', () => {
  it('ran every job', () => {
    expect(finished).toBe(started);
    expect(runs.csv.code).toBe(0);
    expect(runs.csv.stdout).toMatch(/^wrote \d+ rows of 3 slices to .*flagged\.csv/);
  });

  it("chooses exactly the report's flagged slices, the demo's planted ones", () => {
    const m = manifest(out('flagged.csv'));
    // planted by the demo generator: S5 mismatch, low-angle variance, QFN bias
    expect(m.slices.map((s: any) => [s.label, s.focus]).sort()).toEqual([
      ['lighting=low-angle', 'variance'],
      ['package=QFN', 'bias'],
      ['station=S5', 'mismatch'],
    ]);
    // flagged slices rank first in the report, so they hold ranks 1, 2, 3 (README: rank)
    expect(m.slices.map((s: any) => s.rank)).toEqual([1, 2, 3]);
  });

  it('holds exactly the rows of those slices in train and dev, each once, original columns first', async () => {
    const rows = await readRows(out('flagged.csv'));
    const keys = manifest(out('flagged.csv')).slices.map((s: any) => s.key as Record<string, string>);
    // computed independently in this test: rows of the CSV in any flagged slice, split train or dev
    const want = demo.rows.filter((r) => ['train', 'dev'].includes(r.v.split) && keys.some((k: Record<string, string>) => inKey(k)(r)));
    expect(rows.map((r) => r.id).sort()).toEqual(want.map((r) => r.v.id).sort());
    expect(new Set(rows.map((r) => r.id)).size).toBe(rows.length);
    expect(Object.keys(rows[0])).toEqual([...demo.header, ...FG]);
    // original values come through as written
    const byId = new Map(demo.rows.map((r) => [r.v.id, r]));
    for (const r of rows.slice(0, 50)) for (const h of demo.header) expect(r[h] ?? '').toBe(byId.get(r.id!)!.v[h]);
  });

  it("each slice's first row is its highest-confidence error (rows of better-ranked slices sit with those)", async () => {
    const rows = await readRows(out('flagged.csv'));
    const slices = manifest(out('flagged.csv')).slices as { label: string; key: Record<string, string>; rank: number }[];
    const earlier: ((r: DemoRow) => boolean)[] = [];
    for (const s of slices) {
      // computed independently in this test: errors in the slice, train/dev, not in a better-ranked slice
      const mine = demo.rows.filter((r) => ['train', 'dev'].includes(r.v.split) && inKey(s.key)(r) && !earlier.some((f) => f(r)));
      const best = mine.filter(isError).sort(byConfidence)[0];
      const first = rows.find((r) => r.fg_rank!.split(' | ')[0] === String(s.rank))!;
      expect(first.id).toBe(best.v.id);
      earlier.push(inKey(s.key));
    }
    // the groups come in rank order
    const firstRanks = rows.map((r) => Number(r.fg_rank!.split(' | ')[0]));
    expect(firstRanks).toEqual([...firstRanks].sort((a, b) => a - b));
  });

  it('rows in several slices appear once with every slice listed in rank order', async () => {
    const rows = await readRows(out('flagged.csv'));
    const slices = manifest(out('flagged.csv')).slices as { label: string; key: Record<string, string>; rank: number; focus: string; reason: string }[];
    const byId = new Map(rows.map((r) => [r.id, r]));
    let several = 0;
    for (const d of demo.rows) {
      if (!['train', 'dev'].includes(d.v.split)) continue;
      const hits = slices.filter((s) => inKey(s.key)(d));
      if (hits.length < 2) continue;
      several++;
      const r = byId.get(d.v.id)!;
      expect(r.fg_slice).toBe(hits.map((s) => s.label).join(' | '));
      expect(r.fg_rank).toBe(hits.map((s) => s.rank).join(' | '));
      expect(r.fg_focus).toBe(hits.map((s) => s.focus).join(' | '));
      expect(r.fg_reason).toBe(hits.map((s) => s.reason).join(' | '));
    }
    expect(several).toBeGreaterThan(100); // the overview's slices overlap across columns
  });

  it('fg_reason names dev error, floor and the focus part; fg_split is the normalised split', async () => {
    const rows = await readRows(out('flagged.csv'));
    const s5 = manifest(out('flagged.csv')).slices.find((s: any) => s.label === 'station=S5');
    expect(s5.reason).toMatch(/^dev error \d+\.\d % vs floor \d+\.\d %, mismatch \d+\.\d pts$/);
    expect(rows.find((r) => r.fg_slice === 'station=S5')!.fg_reason).toBe(s5.reason);
    expect(new Set(rows.map((r) => r.fg_split))).toEqual(new Set(['train', 'dev']));
    expect(rows.every((r) => r.fg_split === r.split)).toBe(true);
  });
});

describe('the manifest', () => {
  it('records schema, command line, version, time, selection, counts and inputs with their sha256', () => {
    const m = manifest(out('flagged.csv'));
    expect(m.schema).toBe('floorgap.export/1');
    expect(m.argv).toEqual(['floorgap', 'export', ...SAMPLE, '--out', out('flagged.csv')]);
    expect(m.version).toBe(JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')).version);
    expect(new Date(m.created).toISOString()).toBe(m.created);
    expect(Date.now() - Date.parse(m.created)).toBeLessThan(5 * 60_000);
    expect(m.format).toBe('csv');
    expect(m.selection).toMatchObject({ mode: 'flagged', top: null, named: [], by: null, splits: ['train', 'dev'], errors_only: false, limit_per_slice: null, raw: false });
    expect(m.options).toMatchObject({ 'floor-table': FLOORS, annotators: 'insp_a,insp_b,insp_c', fdr: 0.05 });
    // the binning that made the slices, default filled in
    expect(m.options).toMatchObject({ bins: 5, 'bin-method': 'quantile' });
    expect(m.slices.every((s: any) => s.chosen === 'flagged' && s.flagged === true)).toBe(true);
    expect(m.columns).toEqual([...demo.header, ...FG]);
    // sha256 computed independently in this test with node:crypto over the whole file
    const sha = (f: string) => createHash('sha256').update(readFileSync(join(ROOT, f))).digest('hex');
    expect(m.inputs).toHaveLength(1);
    expect(m.inputs[0]).toMatchObject({ path: TABLE, bytes: readFileSync(join(ROOT, TABLE)).length, sha256: sha(TABLE) });
    expect(m.floor_table).toMatchObject({ path: FLOORS, sha256: sha(FLOORS) });
  });

  it('counts rows per slice and split (a row under each of its slices) and in total', () => {
    const m = manifest(out('flagged.csv'));
    let total = 0;
    const totals: Record<string, number> = { train: 0, dev: 0 };
    for (const d of demo.rows) {
      if (!['train', 'dev'].includes(d.v.split)) continue;
      if (m.slices.some((s: any) => inKey(s.key)(d))) {
        total++;
        totals[d.v.split]++;
      }
    }
    for (const s of m.slices) {
      // computed independently in this test from the CSV
      const mine = demo.rows.filter(inKey(s.key));
      const train = mine.filter((r) => r.v.split === 'train').length;
      const dev = mine.filter((r) => r.v.split === 'dev').length;
      expect(s.rows).toEqual({ total: train + dev, train, dev });
    }
    expect(m.rows).toEqual({ total, ...totals });
    expect(runs.csv.stdout).toContain(`wrote ${total} rows`);
  });
});

describe('formats', () => {
  it('CSV, JSON Lines and Parquet hold the same rows in the same order', async () => {
    expect([runs.notes.code, runs.notesJsonl.code, runs.notesParquet.code]).toEqual([0, 0, 0]);
    const csv = await readRows(out('notes-out.csv'));
    const jsonl = await readRows(out('notes-out.jsonl'));
    const parquet = await readRows(out('notes-out.parquet'));
    expect(csv).toHaveLength(40); // hand-made: all 40 rows are train or dev, in cam=A or cam=B
    expect(jsonl).toEqual(csv);
    expect(parquet).toEqual(csv);
    // hand-made memo values survive the round trip
    expect(new Set(csv.map((r) => r.memo))).toEqual(new Set([null, 'a, "quoted" b', 'é ü']));
    expect(manifest(out('notes-out.parquet')).format).toBe('parquet');
    expect(manifest(out('notes-out.jsonl')).format).toBe('jsonl');
  });
});

describe('choosing slices and rows', () => {
  it('--errors-only --limit-per-slice 5: the five most confident errors of each slice (--force over old files)', async () => {
    expect(runs.errors.code).toBe(0);
    const rows = await readRows(out('forced.csv'));
    const slices = manifest(out('forced.csv')).slices as { key: Record<string, string>; rank: number }[];
    const earlier: ((r: DemoRow) => boolean)[] = [];
    const want: string[] = [];
    for (const s of slices) {
      // computed independently in this test
      const mine = demo.rows.filter((r) => ['train', 'dev'].includes(r.v.split) && isError(r) && inKey(s.key)(r) && !earlier.some((f) => f(r)));
      want.push(...mine.sort(byConfidence).slice(0, 5).map((r) => r.v.id));
      earlier.push(inKey(s.key));
    }
    expect(rows.map((r) => r.id)).toEqual(want);
    expect(rows.every((r) => r.label !== r.pred)).toBe(true);
    expect(manifest(out('forced.csv')).selection).toMatchObject({ errors_only: true, limit_per_slice: 5 });
  });

  it("--top 5: the report's first five slices, every split", async () => {
    expect(runs.top.code).toBe(0);
    const m = manifest(out('top.csv'));
    // the first five in the report's order hold ranks 1 to 5 (README: rank)
    expect(m.slices.map((s: any) => s.rank)).toEqual([1, 2, 3, 4, 5]);
    expect(m.slices.every((s: any) => s.chosen === 'top 5')).toBe(true);
    const rows = await readRows(out('top.csv'));
    // computed independently in this test
    const want = demo.rows.filter((r) => m.slices.some((s: any) => inKey(s.key)(r)));
    expect(rows.length).toBe(want.length);
    expect(new Set(rows.map((r) => r.fg_split))).toEqual(new Set(['train', 'train_dev', 'dev', 'test']));
  });

  it('--slice by key: one-column slices of two columns come from the overview', async () => {
    expect(runs.named.code).toBe(0);
    const m = manifest(out('named.csv'));
    expect(m.selection).toMatchObject({ mode: 'named', named: ['station=S5', 'package=QFN'], by: null });
    expect(m.slices.map((s: any) => [s.label, s.chosen, s.named])).toEqual([
      ['station=S5', 'named', 'station=S5'],
      ['package=QFN', 'named', 'package=QFN'],
    ]);
    const rows = await readRows(out('named.csv'));
    // computed independently in this test
    const want = demo.rows.filter((r) => ['train', 'dev'].includes(r.v.split) && (r.v.station === 'S5' || r.v.package === 'QFN'));
    expect(rows.map((r) => r.id).sort()).toEqual(want.map((r) => r.v.id).sort());
  });

  it('--slice "station=S5,lighting=dome" needs no --by: its columns define the grouping', async () => {
    expect(runs.pair.code).toBe(0);
    const m = manifest(out('pair.jsonl'));
    expect(m.selection.by).toEqual(['station', 'lighting']);
    expect(m.slices.map((s: any) => s.label)).toEqual(['station=S5 · lighting=dome']);
    const rows = await readRows(out('pair.jsonl'));
    // computed independently in this test
    const want = demo.rows.filter((r) => ['dev', 'test'].includes(r.v.split) && r.v.station === 'S5' && r.v.lighting === 'dome');
    expect(rows.map((r) => r.id).sort()).toEqual(want.map((r) => r.v.id).sort());
    expect(m.slices[0].rows.total).toBe(want.length);
  });

  it('--slice names a column whose name holds a comma (\\,): the grouping is that one column', async () => {
    expect(runs.comma.stderr).toBe('');
    expect(runs.comma.code).toBe(0);
    const m = manifest(out('comma-out.csv'));
    expect(m.selection.by).toEqual(['cam, side']);
    expect(m.slices.map((s: any) => s.label)).toEqual(['cam, side=R']);
    const rows = await readRows(out('comma-out.csv'));
    // hand arithmetic on the invented table: dev rows are i % 4 in {2, 3}, R rows are odd i, so i % 4 == 3: 10 of 40
    expect(rows.map((r) => Number(r.id)).sort((a, b) => a - b)).toEqual([3, 7, 11, 15, 19, 23, 27, 31, 35, 39]);
    // the model's errors first (pred d where i % 3 == 0: 3, 15, 27, 39), then the rest in input order
    expect(rows.map((r) => r.id).slice(0, 4)).toEqual(['3', '15', '27', '39']);
  });

  it('an unknown column or a key matching no row is a clear error (exit 2), and nothing is written', () => {
    expect(runs.nokey.code).toBe(2);
    expect(runs.nokey.stderr).toMatch(/--slice "cam=Z": no row has cam="Z"; the values of "cam" are "A", "B"/);
    expect(runs.nocol.code).toBe(2);
    expect(runs.nocol.stderr).toMatch(/--slice "camera=S5": no column "camera"; the columns are "id"/);
    expect(existsSync(out('nokey.csv'))).toBe(false);
    expect(existsSync(out('nocol.csv'))).toBe(false);
  });
});

describe('safety', () => {
  it('refuses to overwrite without --force (exit 2) and leaves the file alone', () => {
    expect(runs.taken.code).toBe(2);
    expect(runs.taken.stderr).toMatch(/taken\.csv: file exists; pass --force to overwrite it/);
    expect(readFileSync(out('taken.csv'), 'utf8')).toBe('old rows\n');
    expect(existsSync(out('taken.csv.manifest.json'))).toBe(false);
  });

  it('--force replaced the old file and manifest', () => {
    expect(readFileSync(out('forced.csv'), 'utf8').startsWith('id,split,')).toBe(true);
    expect(manifest(out('forced.csv')).schema).toBe('floorgap.export/1');
  });

  it('conflicting or unknown options are clear errors (exit 2)', () => {
    expect([runs.both.code, runs.badSplit.code, runs.dotJson.code]).toEqual([2, 2, 2]);
    expect(runs.both.stderr).toMatch(/--top and --slice choose slices in two ways/);
    expect(runs.badSplit.stderr).toMatch(/"holdout" is not a split; expected some of train, train_dev, dev, test/);
    expect(runs.dotJson.stderr).toMatch(/name the file \.jsonl or \.ndjson/);
  });

  it('a missing output folder is a clear error', () => {
    expect(runs.nofolder.code).toBe(2);
    expect(runs.nofolder.stderr).toMatch(/folder .*missing does not exist/);
  });

  it('leaves no temporary file in the output folder', () => {
    expect(readdirSync(dir).filter((f) => f.includes('.tmp-'))).toEqual([]);
  });

  it("formula-like text gets a leading ' (numbers left alone); --raw writes it as it is", async () => {
    expect([runs.notes.code, runs.notesRaw.code]).toEqual([0, 0]);
    const notes = new Set((await readRows(out('notes-out.csv'))).map((r) => r.note));
    // hand-made notes of the table written above
    expect(notes).toEqual(new Set(["'=SUM(A1)", '-0.5', '+3', "'@x", "'-x", 'plain']));
    const raw = new Set((await readRows(out('notes-raw.csv'))).map((r) => r.note));
    expect(raw).toEqual(new Set(['=SUM(A1)', '-0.5', '+3', '@x', '-x', 'plain']));
  });
});
