/**
 * The discovered view's model: the table of the slices the search found (its columns, cells and the
 * lines shown when there is nothing to list), its header lines and the part of the detail pane that
 * only a discovered slice has (the part it was found on, its lift, its parents, its overlaps). Pure.
 */
import type { DiscoveredSlice, Discovery } from '../discover/types.js';
import { count, levelPercent, NULL_MARK, points, pointsInterval, pValue, signedPoints } from '../render/format.js';
import { sanitize } from '../terminal/sanitize.js';
import { pad, truncate } from '../terminal/width.js';
import type { Report } from '../triage/types.js';
import { FOCUS_COLOR, type Span } from './theme.js';

/** What the discovered view says wherever a discovered slice is shown. */
export const FOUND_CAUTION = 'a discovered slice is a lead to investigate, not a verdict';

/** The status of a search that runs: column sets rolled up of all (0 of 0 before the first). */
export function searchNote(step: { readonly done: number; readonly total: number }): string {
  return step.total > 0 ? `searching slices: column sets ${step.done} of ${step.total}` : 'searching slices…';
}

/**
 * The line the discovered table shows when the search listed nothing, with what it looked at.
 * @example
 * noSlicePassed(discovery); // => 'no slice passed: 451 examined, 1,353 tests at a false discovery rate of 5%'
 */
export function noSlicePassed(d: Discovery): string {
  return `no slice passed: ${count(d.counts.examined)} examined, ${count(d.counts.hypotheses)} tests at a false discovery rate of ${levelPercent(d.settings.fdr)}`;
}

/** Where a parent's rest lies, as the tables name it: "all other rows" for the whole data. */
function restOf(over: Readonly<Record<string, string>>): string {
  const parts = Object.entries(over).map(([k, v]) => `${k}=${v}`);
  return parts.length > 0 ? `the rest of ${sanitize(parts.join(' · '))}` : 'all other rows';
}

function partGap(s: DiscoveredSlice) {
  return s.part === 'bias' ? s.gaps.avoidable_bias : s.part === 'variance' ? s.gaps.variance : s.gaps.mismatch;
}

// ---------------------------------------------------------------------------------------------------
// The table

export type FoundColumnId = 'mark' | 'rank' | 'label' | 'part' | 'headroom' | 'lift' | 'gap' | 'q' | 'dev' | 'floor' | 'share';

export interface FoundColumn {
  readonly id: FoundColumnId;
  readonly header: string;
  readonly width: number;
  readonly align: 'left' | 'right';
}

const BASE: Readonly<Record<Exclude<FoundColumnId, 'label'>, FoundColumn>> = {
  mark: { id: 'mark', header: '', width: 1, align: 'left' },
  rank: { id: 'rank', header: '#', width: 3, align: 'right' },
  part: { id: 'part', header: 'part', width: 8, align: 'left' },
  headroom: { id: 'headroom', header: 'headroom (pt)', width: 13, align: 'right' },
  lift: { id: 'lift', header: 'lift', width: 6, align: 'right' },
  gap: { id: 'gap', header: 'gap', width: 6, align: 'right' },
  q: { id: 'q', header: 'q', width: 6, align: 'right' },
  dev: { id: 'dev', header: 'dev', width: 5, align: 'right' },
  floor: { id: 'floor', header: 'floor', width: 5, align: 'right' },
  share: { id: 'share', header: 'share', width: 5, align: 'right' },
};

/** Optional columns of the discovered table, least important first: narrower terminals drop them in this order. */
export const FOUND_DROP_ORDER: readonly FoundColumnId[] = ['share', 'floor', 'dev', 'q', 'gap'];

const MIN_LABEL = 24;
const MAX_LABEL = 44;

/**
 * The discovered table's columns for a terminal width: the conditions take what is left (24–44
 * columns, at least 6), the optional columns going first when they would get narrower.
 * @example
 * foundColumns(80).map((c) => c.id); // => ['mark', 'rank', 'label', 'part', 'headroom', 'lift', 'gap', 'q', 'dev']
 */
export function foundColumns(width: number): FoundColumn[] {
  let ids: FoundColumnId[] = ['mark', 'rank', 'label', 'part', 'headroom', 'lift', 'gap', 'q', 'dev', 'floor', 'share'];
  const fixedWidth = (list: FoundColumnId[]) => list.filter((id) => id !== 'label').reduce((a, id) => a + BASE[id as Exclude<FoundColumnId, 'label'>].width + 1, 0);
  for (const drop of FOUND_DROP_ORDER) {
    if (width - fixedWidth(ids) >= MIN_LABEL) break;
    ids = ids.filter((id) => id !== drop);
  }
  const labelWidth = Math.max(6, Math.min(MAX_LABEL, width - fixedWidth(ids)));
  return ids.map((id) => (id === 'label' ? { id, header: 'conditions', width: labelWidth, align: 'left' } : BASE[id]));
}

/** The text of one cell of the discovered table (numbers in percentage points). */
function foundCellText(s: DiscoveredSlice, id: FoundColumnId, marked: boolean): string {
  switch (id) {
    case 'mark':
      return marked ? '+' : ' ';
    case 'rank':
      return String(s.rank);
    case 'label':
      return sanitize(s.label);
    case 'part':
      return s.part;
    case 'headroom':
      return `${points(s.part_headroom.lo, 2)} (${points(s.part_headroom.value, 2)})`;
    case 'lift':
      return signedPoints(s.lift.value);
    case 'gap':
      return signedPoints(partGap(s)?.value);
    case 'q':
      return pValue(s.q);
    case 'dev':
      return points(s.error.dev?.value);
    case 'floor':
      return points(s.floor.value);
    case 'share':
      return `${Math.round(s.share * 100)}%`;
  }
}

/** Pads or cuts a cell to its column. */
function fitFound(text: string, column: FoundColumn): string {
  return pad(text, column.width, column.align);
}

/** The table's header line. */
export function foundHeaderText(columns: readonly FoundColumn[]): string {
  return columns.map((c) => fitFound(c.header, c)).join(' ');
}

/** One discovered slice as a row: the part coloured (decoration only: the word carries it). */
export function foundRowSpans(s: DiscoveredSlice, columns: readonly FoundColumn[], marked: boolean): Span[] {
  return columns.map((c, i) => ({ text: (i === 0 ? '' : ' ') + fitFound(foundCellText(s, c.id, marked), c), color: c.id === 'part' ? FOCUS_COLOR[s.part] : undefined }));
}

// ---------------------------------------------------------------------------------------------------
// Header

/**
 * The header's second and third lines in the discovered view: that it is the discovered view, what the
 * search found and how to go back; the caution.
 * @example
 * foundHeaderLines(discovery, null, 80)[0]; // => [{ text: 'discovered slices (f: back) · 3 found · 451 examined · 1,353 tests', bold: true }]
 */
export function foundHeaderLines(d: Discovery | null, search: { readonly done: number; readonly total: number } | null, width: number): Span[][] {
  const what = d
    ? `discovered slices (f: back) · ${count(d.slices.length)} found · ${count(d.counts.examined)} examined · ${count(d.counts.hypotheses)} tests`
    : `discovered slices (f: back) · ${search ? searchNote(search) : 'not searched'}`;
  return [[{ text: truncate(what, width), bold: true }], [{ text: truncate(`caution: ${FOUND_CAUTION}`, width), color: 'yellow' }]];
}

// ---------------------------------------------------------------------------------------------------
// Detail

/**
 * The detail pane's lines that only a discovered slice has: the part it was found on with its
 * headroom and q, the lift over its weakest parent's rest, the caution, each parent's numbers with
 * the slice's lift over that parent's rest, and its overlap with higher-ranked discovered slices.
 * @param ranks each listed discovered slice's rank by label (to name the overlaps)
 * @example
 * foundDetailLines(s, report, ranks, 80)[0]; // => [{ text: 'found on mismatch · headroom 1.22 (point 1.98) · q 0.014', bold: true }]
 */
export function foundDetailLines(s: DiscoveredSlice, report: Report, ranks: ReadonlyMap<string, number>, width: number): Span[][] {
  const out: Span[][] = [];
  const conf = levelPercent(report.confidence);
  out.push([
    { text: 'found on ', bold: true },
    { text: s.part, bold: true, color: FOCUS_COLOR[s.part] },
    { text: truncate(` · headroom ${points(s.part_headroom.lo, 2)} (point ${points(s.part_headroom.value, 2)}) of overall dev error · q ${pValue(s.q)}`, Math.max(10, width - 9 - s.part.length)) },
  ]);
  out.push([{ text: truncate(`  lift ${signedPoints(s.lift.value)} ${pointsInterval(s.lift.lo, s.lift.hi, true)} over ${restOf(s.lift.over)} (the weakest parent)`, width) }]);
  out.push([{ text: truncate(`  ${FOUND_CAUTION}`, width), color: 'yellow' }]);
  const name = Math.max(10, Math.min(24, width - 56));
  out.push([{ text: truncate(`  ${'parent'.padEnd(name)} ${'gap'.padStart(6)} ${'dev'.padStart(5)} ${'floor'.padStart(5)} ${'share'.padStart(5)} ${'lift'.padStart(6)}  ${conf} interval`, width), dim: true }]);
  for (const p of s.parents) {
    const label = Object.keys(p.conditions).length === 0 ? 'all rows' : sanitize(p.label);
    const share = `${Math.round(p.share * 100)}%`;
    out.push([
      {
        text: truncate(
          `  ${truncate(label, name).padEnd(name)} ${signedPoints(p.gap?.value).padStart(6)} ${points(p.dev_error?.value).padStart(5)} ${points(p.floor).padStart(5)} ${share.padStart(5)} ${signedPoints(p.lift.value).padStart(6)}  ${pointsInterval(p.lift.lo, p.lift.hi, true)}`,
          width,
        ),
      },
    ]);
  }
  if (s.parents.length === 0) out.push([{ text: `  ${NULL_MARK}`, dim: true }]);
  const overlaps = s.overlap.map((o) => `#${ranks.get(o.label) ?? '?'} ${sanitize(o.label)} ${o.share === null ? 'unknown' : `${Math.round(o.share * 100)}%`}`);
  out.push([{ text: truncate(`overlap  ${overlaps.length > 0 ? `${overlaps.join(' · ')} of its dev rows` : 'none with a higher-ranked discovered slice'}`, width) }]);
  return out;
}
