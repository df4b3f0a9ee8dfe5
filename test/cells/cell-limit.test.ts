/**
 * The memory guard of the scan: a cell query that gives more cells than the plan's limit fails with
 * advice before any cell is read into JS. Expected counts: the fixture below, counted by hand.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { scanCells } from '../../src/cells/scan.js';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { cellLimit, type LoadOptions } from '../../src/cells/plan.js';
import { planScan } from '../../src/cells/plan-scan.js';
import { openSource } from '../../src/read/source.js';
import { failure } from '../helpers/failure.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

describe('cell limit', () => {
  let duck: Duck;
  let dir: string;
  let options: LoadOptions;
  beforeAll(async () => {
    duck = await openDuck({ threads: 1 });
    dir = makeTempDir();
    // 4 stations × 2 splits = 8 cells of the full cross
    const rows = ['id,split,station,label,pred'];
    for (let i = 0; i < 40; i++) rows.push(`r${i},${i % 2 ? 'dev' : 'train'},S${Math.floor(i / 2) % 4},a,${i % 3 ? 'a' : 'b'}`);
    writeFileSync(join(dir, 't.csv'), rows.join('\n') + '\n');
    options = { source: { files: [join(dir, 't.csv')], perSplit: {} }, roles: {}, where: null, by: null, sliceCols: ['station'], bins: 5, maxCells: 1000, floor: 0, floorTable: null };
  });
  afterAll(async () => {
    duck.close();
    removeTempDir(dir);
  });

  it('at the limit the cells are read; one past it, a clear error', async () => {
    const planned = await planScan(duck, options, await openSource(duck, options.source));
    const ok = await scanCells(duck, { ...planned.plan, cellLimit: 8 }, { kind: 'cross' });
    expect(ok.table.size).toBe(8);
    const e = await failure(scanCells(duck, { ...planned.plan, cellLimit: 7 }, { kind: 'cross' }));
    expect(e.message).toBe(
      'the slice columns give 8 cells (combinations of their values × split), more than the 7 floorgap holds in memory (5 × --max-cells, at least 1,000,000); use fewer or coarser --by / --slice-cols columns, fewer --bins, or narrow the rows with --where',
    );
  });

  it('the limit is 5 × --max-cells and at least 1,000,000', () => {
    expect(cellLimit(200_000)).toBe(1_000_000);
    expect(cellLimit(1)).toBe(1_000_000);
    expect(cellLimit(400_000)).toBe(2_000_000);
  });
});
