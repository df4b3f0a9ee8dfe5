/**
 * `floorgap export --discovered` and `--from F` through the built CLI, in a temporary folder. Expected
 * rows are recomputed in this test by reading the CSV tables with plain string splitting (neither has
 * quoted fields) for the conditions of the slices `floorgap discover --format json` lists, never by
 * reusing floorgap code. Two tables: the shipped demo sample (whose found slices are one-column ones
 * that overlap: a joint can be at station S5 and a QFN), and a small table written here with one planted
 * conjunction, station=S2 · lighting=dome, so that slices of different column sets share one file.
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
const SAMPLE = [TABLE, '--floor-table', FLOORS];

interface Row {
  readonly at: number;
  readonly v: Record<string, string>;
}
/** A CSV without quoted fields, read independently: header and rows. */
function readTable(path: string): { header: string[]; rows: Row[] } {
  const lines = readFileSync(path, 'utf8').trim().split(/\r?\n/);
  const header = lines[0].split(',');
  return { header, rows: lines.slice(1).map((line, at) => ({ at, v: Object.fromEntries(line.split(',').map((c, i) => [header[i], c])) })) };
}
/** Exported rows, read back with DuckDB (every column as text). */
async function readExport(path: string): Promise<Record<string, string>[]> {
  return (await duck.all(`SELECT * FROM read_csv('${path}', header = true, all_varchar = true)`)) as Record<string, string>[];
}

const inSlice = (conditions: Record<string, string>) => (r: Row) => Object.entries(conditions).every(([c, v]) => r.v[c] === v);

interface Found {
  readonly label: string;
  readonly rank: number;
  readonly part: string;
  readonly conditions: Record<string, string>;
  readonly q: number;
  readonly lift: { value: number; over: Record<string, string> };
  readonly gaps: Record<string, { value: number } | null>;
  readonly explained_by: string[];
}

let dir: string;
let duck: Duck;
const out = (name: string) => join(dir, name);
const runs: Record<string, CliResult> = {};
let demo: { header: string[]; rows: Row[] };
let found: Found[];
let planted: { header: string[]; rows: Row[] };
let plantedFound: Found[];

/** Runs jobs with at most `width` at a time. */
async function pool(jobs: (() => Promise<void>)[], width: number): Promise<void> {
  const queue = [...jobs];
  await Promise.all(Array.from({ length: width }, async () => {
    while (queue.length) await queue.shift()!();
  }));
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-export-discovered-'));
  duck = await openDuck({ threads: 1 });
  demo = readTable(join(ROOT, TABLE));
  // invented: 4 stations × 2 lightings × train/dev, 100 rows each; 40 errors in S2·dome, 5 elsewhere.
  // With --floor 0.05 only S2·dome has a gap; station=S2 and lighting=dome are found too, and folded into it
  const lines = ['id,split,station,lighting,label,pred'];
  let id = 0;
  for (const split of ['train', 'dev']) {
    for (const station of ['S1', 'S2', 'S3', 'S4']) {
      for (const lighting of ['dome', 'ring']) {
        const errors = station === 'S2' && lighting === 'dome' ? 40 : 5;
        for (let i = 0; i < 100; i++) lines.push(`r${id++},${split},${station},${lighting},good,${i < errors ? 'void' : 'good'}`);
      }
    }
  }
  writeFileSync(out('planted.csv'), lines.join('\n') + '\n');
  planted = readTable(out('planted.csv'));
  const PLANTED = [out('planted.csv'), '--floor', '0.05'];

  // the saved discoveries first: --from reads them
  const saved = await Promise.all([
    runCli(['discover', ...SAMPLE, '--format', 'json']),
    runCli(['discover', ...SAMPLE, '--top', '2', '--format', 'json']),
    runCli(['discover', ...PLANTED, '--all', '--format', 'json']),
  ]);
  for (const r of saved) expect(r.code, r.stderr).toBe(0);
  writeFileSync(out('found.json'), saved[0].stdout);
  writeFileSync(out('found-top2.json'), saved[1].stdout);
  writeFileSync(out('planted.json'), saved[2].stdout);
  found = JSON.parse(saved[0].stdout).slices;
  plantedFound = JSON.parse(saved[2].stdout).slices;

  const job = (name: string, args: string[]) => async () => {
    runs[name] = await runCli(args);
  };
  const exp = (file: string, ...more: string[]) => ['export', ...SAMPLE, '--out', out(file), ...more];
  await pool(
    [
      job('discovered', exp('discovered.csv', '--discovered')),
      job('from', exp('from.csv', '--from', out('found.json'))),
      job('top2', exp('top2.csv', '--discovered', '--top', '2')),
      job('fromTop2', exp('from-top2.csv', '--from', out('found-top2.json'))),
      job('errors', exp('errors.csv', '--discovered', '--errors-only', '--limit-per-slice', '5', '--splits', 'dev')),
      job('planted', ['export', ...PLANTED, '--discovered', '--all', '--out', out('planted-rows.csv')]),
      job('plantedFrom', ['export', ...PLANTED, '--from', out('planted.json'), '--out', out('planted-from.csv')]),
      job('bothModes', exp('both.csv', '--discovered', '--from', out('found.json'))),
      job('fromSlice', exp('from-slice.csv', '--from', out('found.json'), '--slice', 'station=S5')),
      job('discoveredSlice', exp('discovered-slice.csv', '--discovered', '--slice', 'station=S5')),
      job('fromDepth', exp('from-depth.csv', '--from', out('found.json'), '--depth', '1')),
      job('depthAlone', exp('depth-alone.csv', '--depth', '1')),
      job('discoveredBy', exp('discovered-by.csv', '--discovered', '--by', 'station')),
    ],
    3,
  );
}, 180_000);

afterAll(() => {
  duck?.close();
  rmSync(dir, { recursive: true, force: true });
});

const manifest = (file: string) => JSON.parse(readFileSync(`${out(file)}.manifest.json`, 'utf8'));

describe('export --discovered on the demo sample', () => {
  it('writes the slices discover lists with the same options, in their rank order', () => {
    expect(runs.discovered.code, runs.discovered.stderr).toBe(0);
    expect(found.length).toBeGreaterThan(1);
    const m = manifest('discovered.csv');
    expect(m.slices.map((s: { label: string; rank: number }) => [s.label, s.rank])).toEqual(found.map((s) => [s.label, s.rank]));
    expect(m.slices.map((s: { focus: string }) => s.focus)).toEqual(found.map((s) => s.part));
  });

  it('holds exactly the train and dev rows of those slices, each once', async () => {
    const rows = await readExport(out('discovered.csv'));
    // counted in this test over the CSV for the slices' conditions
    const want = demo.rows.filter((r) => ['train', 'dev'].includes(r.v.split) && found.some((s) => inSlice(s.conditions)(r)));
    expect(rows.map((r) => r.id).sort()).toEqual(want.map((r) => r.v.id).sort());
    expect(new Set(rows.map((r) => r.id)).size).toBe(rows.length);
    expect(runs.discovered.stdout).toMatch(new RegExp(`^wrote ${want.length} rows of ${found.length} slices to `));
    const m = manifest('discovered.csv');
    expect(m.rows.total).toBe(want.length);
    for (const [i, s] of found.entries()) {
      const mine = demo.rows.filter(inSlice(s.conditions));
      const train = mine.filter((r) => r.v.split === 'train').length;
      const dev = mine.filter((r) => r.v.split === 'dev').length;
      expect(m.slices[i].rows).toEqual({ total: train + dev, train, dev });
    }
  });

  it('a row in two discovered slices lists both, in rank order', async () => {
    const rows = new Map((await readExport(out('discovered.csv'))).map((r) => [r.id, r]));
    let several = 0;
    for (const d of demo.rows) {
      if (!['train', 'dev'].includes(d.v.split)) continue;
      const hits = found.filter((s) => inSlice(s.conditions)(d));
      if (hits.length < 2) continue;
      several++;
      const r = rows.get(d.v.id)!;
      expect(r.fg_slice).toBe(hits.map((s) => s.label).join(' | '));
      expect(r.fg_rank).toBe(hits.map((s) => s.rank).join(' | '));
      expect(r.fg_focus).toBe(hits.map((s) => s.part).join(' | '));
    }
    expect(several).toBeGreaterThan(0);
  });

  it('fg_reason gives the part gap, the lift over the weakest parent\'s rest and q', async () => {
    const rows = await readExport(out('discovered.csv'));
    for (const s of found) {
      const gap = s.gaps[s.part === 'bias' ? 'avoidable_bias' : s.part]!.value;
      // the discover JSON's numbers, as points with one decimal and a sign; q with three decimals or <0.001
      const sign = (x: number) => `${x >= 0 ? '+' : ''}${(x * 100).toFixed(1)}`;
      const over = Object.keys(s.lift.over).length === 0 ? 'all other rows' : `the rest of ${Object.entries(s.lift.over).map(([k, v]) => `${k}=${v}`).join(' · ')}`;
      const q = s.q < 0.001 ? 'q<0.001' : `q=${s.q.toFixed(3)}`;
      const reason = `${s.part} ${sign(gap)} pts, lift ${sign(s.lift.value)} over ${over}, ${q}`;
      expect(rows.find((r) => r.fg_slice === s.label)!.fg_reason).toBe(reason);
      expect(manifest('discovered.csv').slices.find((m: { label: string }) => m.label === s.label).reason).toBe(reason);
    }
  });

  it('--top 2 keeps the first two discovered slices', async () => {
    expect(runs.top2.code, runs.top2.stderr).toBe(0);
    const m = manifest('top2.csv');
    expect(m.slices.map((s: { label: string }) => s.label)).toEqual(found.slice(0, 2).map((s) => s.label));
    const want = demo.rows.filter((r) => ['train', 'dev'].includes(r.v.split) && found.slice(0, 2).some((s) => inSlice(s.conditions)(r)));
    expect((await readExport(out('top2.csv'))).map((r) => r.id).sort()).toEqual(want.map((r) => r.v.id).sort());
  });

  it('--errors-only --limit-per-slice 5 --splits dev: the five most confident dev errors of each slice', async () => {
    expect(runs.errors.code, runs.errors.stderr).toBe(0);
    const rows = await readExport(out('errors.csv'));
    const earlier: ((r: Row) => boolean)[] = [];
    const want: string[] = [];
    for (const s of found) {
      // computed in this test: dev errors in the slice, not in a better-ranked one, by score then input order
      const mine = demo.rows.filter((r) => r.v.split === 'dev' && r.v.label !== r.v.pred && inSlice(s.conditions)(r) && !earlier.some((f) => f(r)));
      mine.sort((a, b) => Number(b.v.score) - Number(a.v.score) || a.at - b.at);
      want.push(...mine.slice(0, 5).map((r) => r.v.id));
      earlier.push(inSlice(s.conditions));
    }
    expect(rows.map((r) => r.id)).toEqual(want);
  });

  it('the manifest says the slices were discovered, with the search settings', () => {
    const m = manifest('discovered.csv');
    expect(m.selection).toMatchObject({ mode: 'discovered', top: null, named: [], by: null, from: null });
    expect(m.selection.search).toEqual(JSON.parse(readFileSync(out('found.json'), 'utf8')).settings);
    expect(m.slices.every((s: { chosen: string }) => s.chosen === 'discovered')).toBe(true);
  });
});

describe('export --from a saved discovery', () => {
  it('gives the same file as --discovered with the same options', () => {
    expect(runs.from.code, runs.from.stderr).toBe(0);
    expect(readFileSync(out('from.csv'), 'utf8')).toBe(readFileSync(out('discovered.csv'), 'utf8'));
    expect(readFileSync(out('from-top2.csv'), 'utf8')).toBe(readFileSync(out('top2.csv'), 'utf8'));
    expect(readFileSync(out('planted-from.csv'), 'utf8')).toBe(readFileSync(out('planted-rows.csv'), 'utf8'));
  });

  it('the manifest names the file with its SHA-256, and the saved search settings', () => {
    const m = manifest('from.csv');
    // computed in this test with node:crypto over the whole file
    const sha = createHash('sha256').update(readFileSync(out('found.json'))).digest('hex');
    expect(m.selection.mode).toBe('from');
    expect(m.selection.from).toMatchObject({ path: out('found.json'), bytes: readFileSync(out('found.json')).length, sha256: sha });
    expect(m.selection.search).toEqual(JSON.parse(readFileSync(out('found.json'), 'utf8')).settings);
    expect(m.slices.every((s: { chosen: string }) => s.chosen === 'from')).toBe(true);
  });
});

describe('slices of different column sets in one file (a planted conjunction, --all)', () => {
  it('lists the conjunction first and the folded one-column slices after it, rank 0', () => {
    expect(runs.planted.code, runs.planted.stderr).toBe(0);
    expect(plantedFound.map((s) => [s.label, s.rank, s.explained_by])).toEqual([
      ['station=S2 · lighting=dome', 1, []],
      ['station=S2', 0, ['station=S2 · lighting=dome']],
      ['lighting=dome', 0, ['station=S2 · lighting=dome']],
    ]);
    expect(manifest('planted-rows.csv').slices.map((s: { key: Record<string, string> }) => s.key)).toEqual([{ station: 'S2', lighting: 'dome' }, { station: 'S2' }, { lighting: 'dome' }]);
  });

  it('writes every row of station=S2 or lighting=dome once, listing each slice it lies in', async () => {
    const rows = await readExport(out('planted-rows.csv'));
    // counted in this test over the CSV
    const want = planted.rows.filter((r) => r.v.station === 'S2' || r.v.lighting === 'dome');
    expect(want).toHaveLength(1000); // hand arithmetic: S2 400 + dome 800 − S2·dome 200
    expect(rows.map((r) => r.id).sort()).toEqual(want.map((r) => r.v.id).sort());
    const first = rows.find((r) => r.station === 'S2' && r.lighting === 'dome')!;
    expect(first.fg_slice).toBe('station=S2 · lighting=dome | station=S2 | lighting=dome');
    expect(first.fg_rank).toBe('1 | 0 | 0');
    expect(first.fg_focus).toBe('bias | bias | bias');
    // hand arithmetic on the invented table: S2·dome train error 40/100 − floor 0.05 = +35.0 points, the
    // rest of lighting=dome (and of S2) at the floor, so lift +35.0; station=S2: (40 + 5)/200 − 0.05 = +17.5
    expect(first.fg_reason).toMatch(/^bias \+35\.0 pts, lift \+35\.0 over the rest of (lighting=dome|station=S2), q<0\.001 \| bias \+17\.5 pts, lift \+17\.5 over all other rows, q<0\.001, explained by station=S2 · lighting=dome \| /);
    const ring = rows.find((r) => r.station === 'S2' && r.lighting === 'ring')!;
    expect([ring.fg_slice, ring.fg_rank]).toEqual(['station=S2', '0']);
  });
});

describe('refused combinations: one line, exit 2, nothing written', () => {
  const refused: [string, string, RegExp][] = [
    ['--from with --discovered', 'bothModes', /^floorgap: --from and --discovered choose slices in two ways \(a saved discovery, or a search now\); give one of them$/],
    ['--from with --slice', 'fromSlice', /^floorgap: --from and --slice choose slices in two ways; give one of them$/],
    ['--discovered with --slice', 'discoveredSlice', /^floorgap: --discovered and --slice choose slices in two ways; give one of them$/],
    ['--from with a search option', 'fromDepth', /^floorgap: --from takes the slices of a saved search, so --depth does nothing; leave it out, or search again with --discovered$/],
    ['a search option without --discovered', 'depthAlone', /^floorgap: --depth is an option of the search: give it with --discovered$/],
    ['--discovered with --by', 'discoveredBy', /^floorgap: --discovered: discovered slices are conditions on the slice columns \(--slice-cols\), not a --by grouping; leave out --by$/],
  ];
  const files: Record<string, string> = { bothModes: 'both.csv', fromSlice: 'from-slice.csv', discoveredSlice: 'discovered-slice.csv', fromDepth: 'from-depth.csv', depthAlone: 'depth-alone.csv', discoveredBy: 'discovered-by.csv' };
  for (const [name, job, message] of refused) {
    it(name, () => {
      const r = runs[job];
      expect(r.code, r.stderr).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr.trimEnd()).toMatch(message);
      expect(existsSync(out(files[job]))).toBe(false);
    });
  }

  it('leaves no temporary file in the folder', () => {
    expect(readdirSync(dir).filter((n) => n.includes('.tmp-'))).toEqual([]);
  });
});
