/**
 * `floorgap sql --out` scans the rows once: COPY writes the cells and says how many it wrote, so no
 * second pass over the input counts them (it did before). Every query the engine runs is recorded.
 * Expected count: the cells of the demo sample by station (6 stations × 4 splits = 24, from the
 * demo's scenario), which the cells file holds as well.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { runMain } from '../helpers/run-main.js';

const queries: string[] = [];
vi.mock('../../src/sql/duck.js', async (original) => {
  const actual = await original<typeof import('../../src/sql/duck.js')>();
  return {
    ...actual,
    openDuck: async (...args: Parameters<typeof actual.openDuck>) => {
      const duck = await actual.openDuck(...args);
      return {
        ...duck,
        all: (sql: string) => (queries.push(sql), duck.all(sql)),
        run: (sql: string) => (queries.push(sql), duck.run(sql)),
      };
    },
  };
});

const dir = mkdtempSync(join(tmpdir(), 'floorgap-sql-out-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('sql --out', () => {
  it('runs the cell query once (the COPY) and reports the cells it wrote', async () => {
    const out = join(dir, 'cells.csv');
    const r = await runMain(['sql', 'data-samples/solder-joints.csv', '--slice-cols', 'station', '--out', out]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^wrote 24 cells to /);
    // the cell query is the only query with its first-level CTE (src/cells/cell-query.ts)
    const cellQueries = queries.filter((q) => q.includes('fg_row AS ('));
    expect(cellQueries).toHaveLength(1);
    expect(cellQueries[0]).toMatch(/^COPY \(/);
    const check = await runMain(['report', '--cells', out, '--format', 'json']);
    expect(JSON.parse(check.stdout).slices).toHaveLength(6);
  });
});
