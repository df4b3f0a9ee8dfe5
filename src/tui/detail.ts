/**
 * The detail pane's lines for one slice: every number with its interval, the lever in plain words, the
 * breakdown by another column and the most confident errors. Pure: the pane scrolls through them.
 */
import type { ErrorExample } from '../rows/examples.js';
import { count, levelPercent, NULL_MARK, points, pointsInterval, pValue, signedPoints } from '../render/format.js';
import { sanitize } from '../terminal/sanitize.js';
import { truncate } from '../terminal/width.js';
import { wrap } from '../terminal/wrap.js';
import type { Gap, Report, SliceReport } from '../triage/types.js';
import { LEVER } from './model.js';
import { FOCUS_COLOR, type Span } from './theme.js';

const SPLIT_NAMES = ['train', 'train_dev', 'dev', 'test'] as const;

function line(...spans: Span[]): Span[] {
  return spans;
}

function gapRow(name: string, g: Gap | null): Span[] {
  if (!g) return line({ text: `  ${name.padEnd(15)}${NULL_MARK}`, dim: true });
  return line({
    text: `  ${name.padEnd(15)}${signedPoints(g.value).padStart(6)}  ${pointsInterval(g.lo, g.hi, true).padEnd(15)}  ${pValue(g.p).padEnd(9)}  ${pValue(g.q)}`,
  });
}

/** What the detail pane knows beyond the slice itself (loaded on demand). */
export interface DetailExtras {
  readonly drillColumn: string | null;
  readonly drill: readonly SliceReport[] | 'loading' | null;
  readonly examples: readonly ErrorExample[] | string | 'loading' | null;
}

/**
 * Lines of the detail pane.
 * @example
 * detailLines(slice, report, { drillColumn: 'lighting', drill: [...], examples: [...] }, 80)[0]; // => [{ text: 'station=S5', bold: true }, …]
 */
export function detailLines(s: SliceReport, report: Report, extras: DetailExtras, width: number): Span[][] {
  const out: Span[][] = [];
  const conf = levelPercent(report.confidence);
  out.push(
    line(
      { text: truncate(sanitize(s.label), Math.max(10, width - 40)), bold: true },
      { text: '  focus ' },
      { text: s.focus, color: FOCUS_COLOR[s.focus], bold: true },
      { text: s.flagged ? '  * flagged' : '  not flagged' },
      { text: s.rank > 0 ? `  rank ${s.rank}` : '' },
    ),
  );
  for (const l of wrap(`what to do: ${LEVER[s.focus]}`, width - 2)) out.push(line({ text: `  ${l}` }));
  for (const h of s.hints) for (const l of wrap(`note: ${sanitize(h)}`, width - 2)) out.push(line({ text: `  ${l}`, color: 'yellow' }));
  out.push([]);
  out.push(
    line({
      text: `rows     ${SPLIT_NAMES.map((sp) => `${sp} ${s.rows[sp] === null ? NULL_MARK : count(s.rows[sp])}`).join('  ')}   share ${(s.share * 100).toFixed(1)}% of dev`,
    }),
  );
  const f = s.floor;
  const floorBits = [`floor    ${points(f.value)} ${pointsInterval(f.lo, f.hi)}`, `source ${f.source}${f.rule ? ` (${f.rule} rule)` : ''}`];
  if (f.n !== null) floorBits.push(`n ${count(Math.round(f.n))}`);
  if (f.audited !== null && f.audited !== undefined) floorBits.push(`${count(f.audited)} audited`);
  if (f.raw) floorBits.push(`raw ${points(f.raw.value)} ${pointsInterval(f.raw.lo, f.raw.hi)}`);
  out.push(line({ text: floorBits.join('  ') }));
  if (s.agreement) {
    out.push(line({ text: `agreement ${s.agreement.method} kappa ${s.agreement.kappa === null ? NULL_MARK : s.agreement.kappa.toFixed(2)} over ${count(s.agreement.audited)} rows with 2+ labels` }));
  }
  out.push(line({ text: `error    (${conf} intervals)`, dim: true }));
  for (const sp of SPLIT_NAMES) {
    const r = s.error[sp];
    if (!r) continue;
    out.push(line({ text: `  ${sp.padEnd(15)}${points(r.value).padStart(6)}  ${pointsInterval(r.lo, r.hi).padEnd(15)}  n ${count(Math.round(r.n))}` }));
  }
  out.push(line({ text: `gaps                value  interval         p          q`, dim: true }));
  out.push(gapRow('avoidable bias', s.gaps.avoidable_bias));
  out.push(gapRow('variance', s.gaps.variance));
  if (s.gaps.mismatch || report.overall.gaps.mismatch) out.push(gapRow('mismatch', s.gaps.mismatch));
  if (s.gaps.dev_overfit || report.overall.gaps.dev_overfit) out.push(gapRow('dev overfit', s.gaps.dev_overfit));
  const h = s.headroom;
  out.push(line({ text: h ? `headroom ${points(h.total, 2)} points of overall dev error` : `headroom ${NULL_MARK}` }));
  if (h) out.push(line({ text: `         bias ${points(h.bias, 2)} · variance ${points(h.variance, 2)}${h.mismatch !== null ? ` · mismatch ${points(h.mismatch, 2)}` : ''}`, dim: true }));
  out.push(line({ text: `yield    ${s.yield === null ? NULL_MARK : `${points(s.yield, 3)} pts per 1,000 new labelled rows`}   cost ${s.cost} per row` }));
  out.push(
    line({
      text: `curve    β ${s.curve.beta.toFixed(2)} (${s.curve.source === 'fit' ? `fitted over ${s.curve.runs} runs, ${pointsIntervalPlain(s.curve.lo, s.curve.hi)}` : 'default'})   rows to halve the gap ${s.labels_to_halve === null ? NULL_MARK : count(Math.round(s.labels_to_halve))}`,
    }),
  );
  out.push([]);
  if (extras.drillColumn) {
    out.push(line({ text: `by ${sanitize(extras.drillColumn)}`, bold: true }, { text: '  (d: next column)', dim: true }));
    if (extras.drill === 'loading') out.push(line({ text: '  …', dim: true }));
    else if (extras.drill && extras.drill.length > 0) {
      out.push(line({ text: `  ${'value'.padEnd(22)} ${'dev rows'.padStart(8)} ${'floor'.padStart(6)} ${'dev'.padStart(6)} ${'bias'.padStart(6)} ${'var'.padStart(6)}  focus`, dim: true }));
      for (const d of extras.drill) {
        const value = truncate(sanitize(Object.values(d.key).join(' · ')), 22).padEnd(22);
        out.push(
          line(
            { text: `  ${value} ${count(d.rows.dev).padStart(8)} ${points(d.floor.value).padStart(6)} ${points(d.error.dev?.value).padStart(6)} ${signedPoints(d.gaps.avoidable_bias?.value).padStart(6)} ${signedPoints(d.gaps.variance?.value).padStart(6)}  ` },
            { text: d.focus, color: FOCUS_COLOR[d.focus] },
          ),
        );
      }
    } else out.push(line({ text: '  nothing to break down', dim: true }));
    out.push([]);
  }
  out.push(line({ text: 'most confident dev errors', bold: true }));
  const ex = extras.examples;
  if (ex === 'loading' || ex === null) out.push(line({ text: '  …', dim: true }));
  else if (typeof ex === 'string') out.push(line({ text: `  ${sanitize(ex)}`, dim: true }));
  else if (ex.length === 0) out.push(line({ text: '  none: the model made no dev error here', dim: true }));
  else {
    out.push(line({ text: `  ${'id'.padEnd(16)} ${'label'.padEnd(14)} ${'prediction'.padEnd(14)} score`, dim: true }));
    for (const e of ex) {
      out.push(
        line({
          text: `  ${truncate(sanitize(e.id ?? NULL_MARK), 16).padEnd(16)} ${truncate(sanitize(e.label ?? NULL_MARK), 14).padEnd(14)} ${truncate(sanitize(e.pred ?? NULL_MARK), 14).padEnd(14)} ${e.score === null ? NULL_MARK : e.score.toFixed(3)}`,
        }),
      );
    }
  }
  return out;
}

function pointsIntervalPlain(lo: number | null, hi: number | null): string {
  return lo === null || hi === null ? 'no interval' : `[${lo.toFixed(2)}, ${hi.toFixed(2)}]`;
}

