/**
 * The explorer's export (src/cli/commands/explore-terminal.tsx, explorerExporter), in this process
 * without a screen: the slices marked on screen are written as `floorgap export --slice KEY …` would
 * write them, and the manifest records the explorer's command line as it was run (it once read
 * `floorgap explore explore … --out F`) and names the chosen slices by their keys.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import yargs from 'yargs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyze } from '../../src/app/analysis.js';
import { explorerData, foundReason } from '../../src/app/explorer-data.js';
import type { DiscoveredSlice } from '../../src/discover/types.js';
import { explorerExporter, sliceKeyText } from '../../src/cli/commands/explore-terminal.js';
import type { ExploreArgs } from '../../src/cli/commands/explore.js';
import { analysisRequest, commandOptions } from '../../src/cli/options.js';
import type { SliceReport } from '../../src/triage/types.js';
import { Captured } from '../helpers/run-main.js';
import { parseCsv, records } from '../helpers/engine-fixture.js';

const ARGV = ['explore', 'data-samples/solder-joints.csv', '--floor-table', 'data-samples/inspector-floors.csv', '--threads', '1'];

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'floorgap-explore-export-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The explorer's arguments as the CLI parses them. */
async function parsed(argv: readonly string[]): Promise<ExploreArgs> {
  let args: ExploreArgs | null = null;
  await yargs([...argv])
    .strict()
    .command('explore [files..]', '', (y) => commandOptions(y, 'explore'), (a) => {
      args = a as unknown as ExploreArgs;
    })
    .parseAsync();
  return args!;
}

describe("the explorer's export", () => {
  it('records the command as run and the keys of the slices chosen in the explorer', async () => {
    const args = await parsed(ARGV);
    const io = { stdout: new Captured(), stderr: new Captured(), env: process.env, cwd: process.cwd() };
    const { report } = await analyze(analysisRequest(args, io));
    // two slices of different columns, as marked on the overview (the demo's planted S3 and QFN)
    const chosen = ['station=S3', 'package=QFN'].map((label) => report.slices.find((s) => s.label === label)) as SliceReport[];
    expect(chosen.every(Boolean)).toBe(true);
    const out = join(dir, 'marked.csv');
    const line = await explorerExporter(args, io, ARGV)(chosen, out, false);
    expect(line).toMatch(/^wrote \d+ rows of 2 slices to /);

    const manifest = JSON.parse(readFileSync(`${out}.manifest.json`, 'utf8')) as {
      argv: string[];
      file: string;
      selection: { mode: string; named: string[]; chosen_in: string; by: string[] | null; splits: string[] };
      slices: { key: Record<string, string>; chosen: string; named: string | null }[];
    };
    expect(manifest.argv).toEqual(['floorgap', ...ARGV]);
    expect(manifest.file).toBe(out);
    expect(manifest.selection).toMatchObject({ mode: 'named', named: ['station=S3', 'package=QFN'], chosen_in: 'explorer', by: null, splits: ['train', 'dev'] });
    expect(manifest.slices.map((s) => [s.key, s.named]).sort()).toEqual([
      [{ package: 'QFN' }, 'package=QFN'],
      [{ station: 'S3' }, 'station=S3'],
    ]);
  }, 60_000);

  it('writes discovered slices of different columns and depths to one file, each with its part as focus and why it was found', async () => {
    const args = await parsed(ARGV);
    const io = { stdout: new Captured(), stderr: new Captured(), env: process.env, cwd: process.cwd() };
    const analysis = await analyze(analysisRequest(args, io));
    const data = explorerData(null, analysis, explorerExporter(args, io, ARGV));
    const discovery = await data.discover(() => undefined, new AbortController().signal);
    // what discover() finds on the sample: one-condition slices only; a second slice with two conditions
    // stands beside the first (its key and label edited, hand-built), so one file holds two depths
    const [first, second] = discovery.slices;
    expect(first && second).toBeTruthy();
    const twoConditions: DiscoveredSlice = { ...second, key: { station: 'S2', lighting: 'dome' }, conditions: { station: 'S2', lighting: 'dome' }, label: 'station=S2 · lighting=dome', rank: 2 };
    const out = join(dir, 'found.csv');
    const line = await data.exportFound([first, twoConditions], out, false);

    // the rows of the train and dev splits (the export's default) in either slice, counted in the sample itself
    const rows = records(parseCsv(readFileSync('data-samples/solder-joints.csv', 'utf8')));
    const inFirst = (r: Record<string, string>) => Object.entries(first.key).every(([k, v]) => r[k] === v);
    const inSecond = (r: Record<string, string>) => r.station === 'S2' && r.lighting === 'dome';
    const want = rows.filter((r) => (r.split === 'train' || r.split === 'dev') && (inFirst(r) || inSecond(r))).length;
    expect(want).toBeGreaterThan(0);
    expect(line).toBe(`wrote ${want} rows of 2 slices to ${out} (manifest ${out}.manifest.json)`);

    const manifest = JSON.parse(readFileSync(`${out}.manifest.json`, 'utf8')) as {
      selection: { mode: string; named: string[]; chosen_in: string };
      slices: { rank: number; key: Record<string, string>; focus: string; reason: string; rows: { total: number } }[];
      rows: { total: number };
    };
    expect(manifest.rows.total).toBe(want);
    expect(manifest.selection).toMatchObject({ mode: 'named', chosen_in: 'explorer', named: [sliceKeyText(first), 'station=S2,lighting=dome'] });
    expect(manifest.slices.map((s) => [s.rank, s.key, s.focus, s.reason])).toEqual([
      [first.rank, first.key, first.part, foundReason(first)],
      [2, { station: 'S2', lighting: 'dome' }, second.part, foundReason(twoConditions)],
    ]);
    // the reason names the part's gap and the lift over the weakest parent's rest (a one-condition slice's parent is all rows)
    expect(foundReason(first)).toMatch(new RegExp(`^${first.part} [+-]\\d+\\.\\d pts, lift [+-]\\d+\\.\\d over all other rows$`));
    // every written row names the slices it lies in, with their parts as focus
    const written = records(parseCsv(readFileSync(out, 'utf8')));
    expect(written).toHaveLength(want);
    for (const r of written) {
      const focus = [inFirst(r) ? first.part : null, inSecond(r) ? second.part : null].filter(Boolean).join(' | ');
      expect(r.fg_focus).toBe(focus);
    }
  }, 60_000);

  it('a key names its slice as --slice reads it: commas, = and backslashes escaped', () => {
    const slice = { key: { 'a=b': 'x,y', c: 'back\\slash' } } as unknown as SliceReport;
    expect(sliceKeyText(slice)).toBe('a\\=b=x\\,y,c=back\\\\slash');
  });
});
