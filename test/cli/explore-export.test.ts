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
import { explorerExporter, sliceKeyText } from '../../src/cli/commands/explore-terminal.js';
import type { ExploreArgs } from '../../src/cli/commands/explore.js';
import { analysisRequest, commandOptions } from '../../src/cli/options.js';
import type { SliceReport } from '../../src/triage/types.js';
import { Captured } from '../helpers/run-main.js';

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

  it('a key names its slice as --slice reads it: commas, = and backslashes escaped', () => {
    const slice = { key: { 'a=b': 'x,y', c: 'back\\slash' } } as unknown as SliceReport;
    expect(sliceKeyText(slice)).toBe('a\\=b=x\\,y,c=back\\\\slash');
  });
});
