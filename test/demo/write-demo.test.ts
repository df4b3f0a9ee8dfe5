import { createHash } from 'node:crypto';
import { mkdtemp, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { demoFloorCsvLines, demoRowsToCsvLines } from '../../src/demo/csv.js';
import { generateDemoRows } from '../../src/demo/draws.js';
import { DEMO_DEFAULTS } from '../../src/demo/scenario.js';
import { writeDemo } from '../../src/demo/write-demo.js';

const root = await mkdtemp(join(tmpdir(), 'floorgap-demo-'));
afterAll(() => rm(root, { recursive: true, force: true }));

describe('writeDemo', () => {
  it('creates a missing folder and writes both files', async () => {
    const dir = join(root, 'a', 'b');
    const out = await writeDemo(dir, { rows: 5000, seed: 3 });
    expect(out).toEqual({ table: join(dir, 'solder-joints.csv'), floors: join(dir, 'inspector-floors.csv'), rows: 5000 });
    const table = await readFile(out.table, 'utf8');
    const expected = [...demoRowsToCsvLines(generateDemoRows({ rows: 5000, seed: 3 }))].join('\n') + '\n';
    expect(table).toBe(expected);
    expect(await readFile(out.floors, 'utf8')).toBe([...demoFloorCsvLines()].join('\n') + '\n');
    expect((await readdir(dir)).sort()).toEqual(['inspector-floors.csv', 'solder-joints.csv']);
  });

  it('refuses to overwrite either file unless asked', async () => {
    const dir = join(root, 'c');
    await writeDemo(dir, { rows: 10, seed: 1 });
    await rm(join(dir, 'solder-joints.csv'));
    // floors file still there: nothing is written
    await expect(writeDemo(dir, { rows: 10, seed: 1 })).rejects.toThrow(/file exists/);
    expect((await readdir(dir)).sort()).toEqual(['inspector-floors.csv']);
    await writeFile(join(dir, 'solder-joints.csv'), 'old\n');
    const out = await writeDemo(dir, { rows: 10, seed: 2, overwrite: true });
    expect((await readFile(out.table, 'utf8')).split('\n')).toHaveLength(12);
  });

  it('passes runs through: rows is the run-independent dataset, the table holds every run', async () => {
    const dir = join(root, 'runs');
    const out = await writeDemo(dir, { rows: 2000, seed: 4, runs: 3 });
    const expected = [...demoRowsToCsvLines(generateDemoRows({ rows: 2000, seed: 4, runs: 3 }))];
    expect(await readFile(out.table, 'utf8')).toBe(expected.join('\n') + '\n');
    expect(expected[0]).toBe(
      'id,split,run,station,lighting,package,finish,shift,sharpness,label,pred,score,insp_a,insp_b,insp_c',
    );
    // every non-train row three times, the train rows once in full plus about 1/2 and 1/4 of them again
    const base = [...generateDemoRows({ rows: 2000, seed: 4 })];
    const train = base.filter((r) => r.split === 'train').length;
    expect(out.rows).toBe(3 * (2000 - train) + Math.ceil(train / 4) + Math.ceil(train / 2) + train);
    expect(out.rows).toBe(expected.length - 1);
  });

  it('rejects bad options with a user-facing error', async () => {
    await expect(writeDemo(join(root, 'd'), { rows: -1, seed: 1 })).rejects.toMatchObject({
      name: 'FloorgapError',
      message: expect.stringMatching(/rows must be a positive integer/),
    });
    await expect(writeDemo(join(root, 'd'), { rows: 10, seed: 1, runs: 0 })).rejects.toMatchObject({
      name: 'FloorgapError',
      message: expect.stringMatching(/runs must be an integer from 1 to 10/),
    });
  });

  it('ships data-samples/ exactly as a fresh generation with DEMO_DEFAULTS', async () => {
    const shipped = await readFile(new URL('../../data-samples/solder-joints.csv', import.meta.url), 'utf8');
    const fresh = [...demoRowsToCsvLines(generateDemoRows(DEMO_DEFAULTS))];
    const lines = shipped.split('\n');
    // planted by the demo generator (our own scenario): a header and 20,000 rows, one newline at the end,
    // one run (no run column) and the three inspector columns last
    expect(lines).toHaveLength(20_000 + 2);
    expect(lines.at(-1)).toBe('');
    expect(lines[0]).toBe('id,split,station,lighting,package,finish,shift,sharpness,label,pred,score,insp_a,insp_b,insp_c');
    expect(DEMO_DEFAULTS.runs).toBe(1);
    // name the first differing line instead of dumping a 1 MB diff
    const first = fresh.findIndex((line, i) => line !== lines[i]);
    expect(first === -1 ? null : { line: first + 1, shipped: lines[first], fresh: fresh[first] }).toBeNull();
    expect(shipped === fresh.join('\n') + '\n').toBe(true);

    const floors = await readFile(new URL('../../data-samples/inspector-floors.csv', import.meta.url), 'utf8');
    expect(floors).toBe([...demoFloorCsvLines()].join('\n') + '\n');
  });

  it('rewrites the shipped files byte for byte with DEMO_DEFAULTS', async () => {
    const out = await writeDemo(join(root, 'defaults'), DEMO_DEFAULTS);
    expect(out.rows).toBe(DEMO_DEFAULTS.rows);
    for (const [written, name] of [
      [out.table, 'solder-joints.csv'],
      [out.floors, 'inspector-floors.csv'],
    ] as const) {
      const shipped = await readFile(new URL(`../../data-samples/${name}`, import.meta.url));
      expect((await readFile(written)).equals(shipped), name).toBe(true);
    }
  });

  it('writes the table of several runs byte for byte, every column but pred and score as before the interaction', async () => {
    const out = await writeDemo(join(root, 'four-runs'), { rows: 20_000, seed: 24, runs: 4 });
    const table = await readFile(out.table, 'utf8');
    const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');
    // sha256sum of solder-joints.csv from `floorgap demo --out X --rows 20000 --seed 24 --runs 4`, run on
    // commit 753d391, which planted the S6 · dome interaction (on commit aa77190, before the generator was
    // split into scenario, draws and CSV, and still on 6e4a4e2, before the interaction: cfeca6e0…)
    expect(sha256(table)).toBe('af09b0a094db21c8a5315e67029091a2b14cd1441e25d4a54dfdba519d88b49c');
    // the interaction changed pred and score only: `cut -d, -f1-10,13- solder-joints.csv | sha256sum` (every
    // column but pred and score) gives the same on commit 6e4a4e2 as now
    const withoutPrediction = table.split('\n').map((line) => line.split(',').filter((_, i) => i !== 10 && i !== 11).join(',')).join('\n');
    expect(table.split('\n', 1)[0].split(',').slice(10, 12)).toEqual(['pred', 'score']);
    expect(sha256(withoutPrediction)).toBe('50617f49f7c8f0070c6b90e8907919ed5e964ec1caf067f17d5da26c0d7b8596');
    // hand arithmetic on the 8,026 train rows of the seed-24 sample (counted in data-samples/solder-joints.csv):
    // 4 runs × 11,974 other rows + ceil(8,026 · 2^(r−4)) train rows = 47,896 + 1,004 + 2,007 + 4,013 + 8,026
    expect(out.rows).toBe(62_946);
  });
});
