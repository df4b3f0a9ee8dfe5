/**
 * The explorer's data side on real cells: the breakdown of a slice by another column (the detail
 * pane's `d`) gives the numbers a report grouped by both columns gives, whether the cells are a full
 * cross or grouping sets. Expected values: the same rows through `report --by station,lighting`.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeWith, openEngine } from '../../src/app/analysis.js';
import { explorerData } from '../../src/app/explorer-data.js';
import { analysisRequest, type AnalysisArgs } from '../../src/cli/options.js';
import { DEFAULTS } from '../../src/core/defaults.js';
import type { Duck } from '../../src/sql/duck.js';
import { FLOORS, SAMPLE, sampleArgs } from '../helpers/sample-analysis.js';
import { ROOT } from '../helpers/run-cli.js';

const args = sampleArgs;

let duck: Duck;
beforeAll(async () => {
  duck = await openEngine({ threads: 1, memoryLimit: '1GB' }, { read: [SAMPLE, FLOORS], write: [] });
});
afterAll(() => duck.close());

async function analysis(over: Partial<AnalysisArgs>) {
  const a = args(over);
  return analyzeWith(duck, analysisRequest(a, { env: {}, cwd: ROOT }));
}

describe('the breakdown of a slice', () => {
  for (const [mode, maxCells] of [['a full cross', DEFAULTS.maxCells], ['grouping sets', 100]] as const) {
    it(`station=S5 by lighting, from ${mode}: the numbers of the station × lighting report`, async () => {
      const { report: byBoth } = await analysis({ by: 'station,lighting' });
      const an = await analysis({ 'max-cells': maxCells });
      if (maxCells === 100) expect(an.loaded.grouping.kind).toBe('sets');
      const data = explorerData(duck, an, null);
      const s5 = an.report.slices.find((s) => s.label === 'station=S5')!;
      const parts = await data.drill(s5, 'lighting');
      const want = byBoth.slices.filter((s) => s.key.station === 'S5');
      expect(parts.map((p) => p.key.lighting).sort()).toEqual(want.map((w) => w.key.lighting).sort());
      expect(parts.length).toBeGreaterThan(1);
      for (const p of parts) {
        const w = want.find((x) => x.key.lighting === p.key.lighting)!;
        expect(p.rows).toEqual(w.rows);
        expect(p.error.dev?.value).toBeCloseTo(w.error.dev!.value, 12);
        expect(p.floor.value).toBeCloseTo(w.floor.value, 12);
      }
      // the parts add up to the slice
      expect(parts.reduce((a, p) => a + (p.rows.dev ?? 0), 0)).toBe(s5.rows.dev);
    });
  }
});
