/**
 * The overview (`buildReport` with by = null): every one-column slice of every overview column,
 * ranked together in one FDR family, shares adding to 1 within each column. Reference values:
 * statsmodels 0.13.5 (Debian 0.13.5+dfsg) with /usr/bin/python3.
 */
import { describe, expect, it } from 'vitest';
import type { CellRecord as Cell } from '../helpers/cell-records.js';
import { buildReport } from '../../src/triage/report.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { CONTEXT, cell, options, sliceCells } from '../helpers/cells.js';
import { expectClose, expectRelClose } from '../stats/expect-close.js';
import { cellsOf } from '../helpers/cell-records.js';

const LIBRARY = 1e-12; // same formulas as statsmodels: agreement to rounding
const EXACT = 1e-15; // hand arithmetic on invented numbers

// fixture (hand-built): invented numbers; default floor 2 %.
// station × lighting: train rows, train errors, dev rows, dev errors
const SPEC: readonly [string, string, number, number, number, number][] = [
  ['S1', 'ring', 2000, 80, 1000, 70],
  ['S1', 'dome', 2000, 120, 500, 45],
  ['S2', 'ring', 2000, 60, 300, 15],
  ['S2', 'dome', 2000, 100, 200, 14],
];
const cross: Cell[] = SPEC.flatMap(([station, lighting, tr, te, dv, de]) =>
  sliceCells({ station, lighting }, { train: { rows: tr, errors: te, floor: 0.02 }, dev: { rows: dv, errors: de, floor: 0.02 } }),
);

/** The same rows as grouping-set cells: one set per column, the other column null. */
function groupingSets(): Cell[] {
  const out: Cell[] = [];
  for (const column of ['station', 'lighting'] as const) {
    const values = [...new Set(SPEC.map((s) => (column === 'station' ? s[0] : s[1])))];
    for (const v of values) {
      const rows = SPEC.filter((s) => (column === 'station' ? s[0] : s[1]) === v);
      const sum = (i: 2 | 3 | 4 | 5) => rows.reduce((a, r) => a + r[i], 0);
      const key = column === 'station' ? { station: v, lighting: null } : { station: null, lighting: v };
      out.push(cell(key, 'train', { rows: sum(2), errors: sum(3), floor: 0.02 }));
      out.push(cell(key, 'dev', { rows: sum(4), errors: sum(5), floor: 0.02 }));
    }
  }
  return out;
}

function get(r: Report, label: string): SliceReport {
  const s = r.slices.find((x) => x.label === label);
  if (!s) throw new Error(`no slice ${label}; have ${r.slices.map((x) => x.label).join(', ')}`);
  return s;
}

describe('overview: by = null', () => {
  const r = buildReport(cellsOf(cross), null, ['station', 'lighting'], CONTEXT, options());

  it('has every one-column slice of each overview column, and by = null', () => {
    expect(r.by).toBeNull();
    expect(r.slices.map((s) => s.label).sort()).toEqual(['lighting=dome', 'lighting=ring', 'station=S1', 'station=S2']);
    for (const s of r.slices) expect(Object.keys(s.key)).toHaveLength(1);
  });

  it('shares add up to 1 within each column', () => {
    // invented numbers, hand arithmetic: dev rows 1000 + 500 + 300 + 200 = 2000;
    //   station S1 1500/2000 = 0.75, S2 500/2000 = 0.25; lighting ring 1300/2000 = 0.65, dome 700/2000 = 0.35
    expectClose(get(r, 'station=S1').share, 0.75, EXACT);
    expectClose(get(r, 'station=S2').share, 0.25, EXACT);
    expectClose(get(r, 'lighting=ring').share, 0.65, EXACT);
    expectClose(get(r, 'lighting=dome').share, 0.35, EXACT);
    for (const column of ['station', 'lighting']) {
      const total = r.slices.filter((s) => column in s.key).reduce((a, s) => a + s.share, 0);
      expectClose(total, 1, EXACT);
    }
  });

  it('rows roll up over the other column', () => {
    // invented numbers, hand arithmetic: station=S1 train 2000 + 2000, dev 1000 + 500
    expect(get(r, 'station=S1').rows).toEqual({ train: 4000, train_dev: null, dev: 1500, test: null });
    expect(get(r, 'lighting=dome').rows).toEqual({ train: 4000, train_dev: null, dev: 700, test: null });
  });

  it('all slices of all columns form one FDR family (m = 8)', () => {
    // statsmodels 0.13.5:
    //   proportions_ztest(200, 4000, value=0.02, prop_var=0.02) -> (13.55261854357877, 7.645336270369591e-42)      station=S1 bias
    //   proportions_ztest([115, 200], [1500, 4000]) -> (3.7904960198680304, 0.00015034674199214767)                station=S1 variance
    //   proportions_ztest(160, 4000, value=0.02, prop_var=0.02) -> (9.035079029052513, 1.6388396909054647e-19)      station=S2 bias
    //   proportions_ztest([29, 160], [500, 4000]) -> (1.8917940112423086, 0.058518431544569934)                     station=S2 variance
    //   proportions_ztest(140, 4000, value=0.02, prop_var=0.02) -> (6.776309271789386, 1.2328462652263226e-11)      lighting=ring bias
    //   proportions_ztest([85, 140], [1300, 4000]) -> (4.720457236031196, 2.3531507882388654e-06)                  lighting=ring variance
    //   proportions_ztest(220, 4000, value=0.02, prop_var=0.02) -> (15.8113883008419, 2.5968070393400377e-56)       lighting=dome bias
    //   proportions_ztest([59, 220], [700, 4000]) -> (3.024972331105364, 0.002486558739592285)                     lighting=dome variance
    //   multipletests([...the eight p-values above, in that order...], method='fdr_bh')[1]
    //   -> [3.0581345081478366e-41, 0.0002004623226561969, 4.370239175747906e-19, 0.058518431544569934,
    //       2.4656925304526453e-11, 3.7650412611821845e-06, 2.07744563147203e-55, 0.002841781416676897]
    const expected: [string, number, number, number, number][] = [
      ['station=S1', 7.645336270369591e-42, 0.00015034674199214767, 3.0581345081478366e-41, 0.0002004623226561969],
      ['station=S2', 1.6388396909054647e-19, 0.058518431544569934, 4.370239175747906e-19, 0.058518431544569934],
      ['lighting=ring', 1.2328462652263226e-11, 2.3531507882388654e-6, 2.4656925304526453e-11, 3.7650412611821845e-6],
      ['lighting=dome', 2.5968070393400377e-56, 0.002486558739592285, 2.07744563147203e-55, 0.002841781416676897],
    ];
    for (const [label, pBias, pVar, qBias, qVar] of expected) {
      const s = get(r, label);
      expectRelClose(s.gaps.avoidable_bias?.p, pBias, 1e-9);
      expectClose(s.gaps.variance?.p, pVar, LIBRARY);
      expectRelClose(s.gaps.avoidable_bias?.q, qBias, 1e-9);
      expectClose(s.gaps.variance?.q, qVar, LIBRARY);
    }
  });

  it('ranks the slices of both columns together, 1..N', () => {
    expect(r.slices.map((s) => s.rank)).toEqual([1, 2, 3, 4]);
    // station=S2's variance q 0.0585 > 0.05 and its bias part 0.25 × 0.02 = 0.005 is the only significant one
    expect(get(r, 'station=S2').focus).toBe('bias');
  });

  it('the overall slice covers every row once', () => {
    // invented numbers, hand arithmetic: 4 × 2000 train rows, 2000 dev rows
    expect(r.overall.rows).toEqual({ train: 8000, train_dev: null, dev: 2000, test: null });
    expect(r.overall.share).toBe(1);
  });

  it('grouping-set cells (one set per column) give the same report as cross cells', () => {
    const g = buildReport(cellsOf(groupingSets()), null, ['station', 'lighting'], CONTEXT, options());
    expect(g.overall).toEqual(r.overall);
    const byLabel = (rep: Report) => Object.fromEntries(rep.slices.map((s) => [s.label, s]));
    expect(byLabel(g)).toEqual(byLabel(r));
  });

  it('with by = [station, lighting] the slices are the cross instead', () => {
    const c = buildReport(cellsOf(cross), ['station', 'lighting'], ['station', 'lighting'], CONTEXT, options());
    expect(c.by).toEqual(['station', 'lighting']);
    expect(c.slices.map((s) => s.label).sort()).toEqual([
      'station=S1 · lighting=dome',
      'station=S1 · lighting=ring',
      'station=S2 · lighting=dome',
      'station=S2 · lighting=ring',
    ]);
    expectClose(c.slices.reduce((a, s) => a + s.share, 0), 1, EXACT);
  });
});
