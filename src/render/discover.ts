/**
 * The discovery (`floorgap.discover/1`) as text for a terminal, markdown, CSV and JSON. Text from data
 * is sanitised (text, CSV) or escaped (markdown); JSON escapes what a terminal would act on.
 */
import type { DiscoveredSlice, Discovery, Part } from '../discover/types.js';
import { error } from '../core/errors.js';
import type { Style } from '../terminal/ansi.js';
import { sanitize } from '../terminal/sanitize.js';
import { displayWidth, truncate } from '../terminal/width.js';
import { wrap } from '../terminal/wrap.js';
import { CSV_COLUMNS, cell, num, sliceValues, text, type Value } from './csv.js';
import { count, levelPercent, NULL_MARK, percent, points, pointsInterval, pValue, signedPoints } from './format.js';
import type { Format } from './index.js';
import { renderJson } from './json.js';
import { escapeMarkdown } from './markdown.js';
import { keyedLines, layTable, line, naturalWidth, type Column, type Line } from './text/layout.js';
import { FDR_METHOD_NAME } from './words.js';

/** The caution every discovery carries. */
const DISCOVERY_CAUTION_ITEMS: readonly string[] = [
  'a discovered slice is a lead to investigate, not a verdict',
  'floors are estimates',
  'a model for a safety-critical use needs its own validation',
];
const DISCOVERY_CAUTION = DISCOVERY_CAUTION_ITEMS.join('; ');

const PART_WORD: Readonly<Record<Part, string>> = { bias: 'bias', variance: 'variance', mismatch: 'mismatch' };
const PART_STYLE: Readonly<Record<Part, readonly Style[]>> = { bias: ['red'], variance: ['yellow'], mismatch: ['magenta'] };

/** A parent's conditions as the table names them: "all rows" for none. */
function overLabel(over: Readonly<Record<string, string>>): string {
  const parts = Object.entries(over).map(([k, v]) => `${k}=${v}`);
  return parts.length ? `rest of ${parts.join(' · ')}` : 'all other rows';
}

function overlapText(s: DiscoveredSlice, ranks: ReadonlyMap<string, number>): string {
  if (s.overlap.length === 0) return NULL_MARK;
  return s.overlap
    .map((o) => `#${ranks.get(o.label) ?? '?'} ${o.share === null ? 'unknown' : percent(o.share, 0)}`)
    .join(', ');
}

function searchLines(d: Discovery, width: number, color: boolean): Line[] {
  const c = d.counts;
  const method = FDR_METHOD_NAME[d.settings.fdr_method] ?? d.settings.fdr_method;
  return [
    ...keyedLines(
      'searched',
      [
        `${count(c.candidates)} candidate slices of 1 to ${d.settings.depth} conditions`,
        `${count(c.examined)} examined`,
        `${count(c.thin)} thin (under ${count(d.settings.min_rows)} train or dev rows)`,
        `${count(c.skipped)} skipped by the headroom bound`,
        `${count(c.nested)} the same rows as a simpler slice`,
      ],
      width,
      color,
    ),
    ...keyedLines(
      'tests',
      [
        `${count(c.hypotheses)} tests, false discovery rate ${levelPercent(d.settings.fdr)} (${method})`,
        `lift at least ${points(d.settings.min_lift)} points over every simpler slice's rest`,
        `part headroom at least ${points(d.settings.min_headroom)} points`,
        `${count(c.found)} found, ${count(c.folded)} explained by slices within them`,
      ],
      width,
      color,
    ),
  ];
}

/** The columns of the text table; optional ones are dropped (last first) to fit the width. */
function tableColumns(slices: readonly DiscoveredSlice[]): { columns: Column[]; optional: string[] } {
  const ranks = new Map(slices.map((s) => [s.label, s.rank]));
  const columns: Column[] = [
    { id: 'rank', header: '#', align: 'right', cells: slices.map((s) => (s.rank > 0 ? String(s.rank) : '-')) },
    { id: 'conditions', header: 'conditions', align: 'left', cells: slices.map((s) => sanitize(s.label)) },
    { id: 'part', header: 'part', align: 'left', cells: slices.map((s) => PART_WORD[s.part]) },
    { id: 'headroom', header: 'headroom', align: 'right', cells: slices.map((s) => `${points(s.part_headroom.lo, 2)} (${points(s.part_headroom.value, 2)})`) },
    { id: 'gap', header: 'gap', align: 'right', cells: slices.map((s) => signedPoints(partGapValue(s))) },
    { id: 'lift', header: 'lift', align: 'right', cells: slices.map((s) => signedPoints(s.lift.value)) },
    { id: 'over', header: 'weakest parent', align: 'left', cells: slices.map((s) => sanitize(overLabel(s.lift.over))) },
    { id: 'q', header: 'q', align: 'right', cells: slices.map((s) => pValue(s.q)) },
    { id: 'dev', header: 'dev', align: 'right', cells: slices.map((s) => points(s.error.dev?.value)) },
    { id: 'floor', header: 'floor', align: 'right', cells: slices.map((s) => points(s.floor.value)) },
    { id: 'share', header: 'share', align: 'right', cells: slices.map((s) => percent(s.share)) },
    { id: 'overlap', header: 'overlap', align: 'left', cells: slices.map((s) => (s.explained_by.length > 0 ? `in ${s.explained_by.map((x) => sanitize(x)).join(', ')}` : overlapText(s, ranks))) },
  ];
  return { columns, optional: ['overlap', 'share', 'floor', 'over', 'dev', 'gap'] };
}

function partGapValue(s: DiscoveredSlice): number | null {
  const g = s.part === 'bias' ? s.gaps.avoidable_bias : s.part === 'variance' ? s.gaps.variance : s.gaps.mismatch;
  return g?.value ?? null;
}

function slicesTable(d: Discovery, width: number, color: boolean): { lines: Line[]; dropped: string[] } {
  const { columns: all, optional } = tableColumns(d.slices);
  let columns = all;
  const dropped: string[] = [];
  const gap = 2;
  const widths = () => columns.map(naturalWidth);
  const total = (w: number[]) => w.reduce((a, b) => a + b, 0) + gap * (columns.length - 1);
  const minConditions = 24;
  for (const id of optional) {
    const w = widths();
    const ci = columns.findIndex((c) => c.id === 'conditions');
    const without = total(w) - w[ci] + Math.min(w[ci], minConditions);
    if (without <= width) break;
    columns = columns.filter((c) => c.id !== id);
    dropped.push(all.find((c) => c.id === id)!.header);
  }
  const w = widths();
  const ci = columns.findIndex((c) => c.id === 'conditions');
  const over = total(w) - width;
  if (over > 0) w[ci] = Math.max(8, w[ci] - over);
  columns = columns.map((c, i) => ({ ...c, cells: c.cells.map((x) => (displayWidth(x) > w[i] ? truncate(x, w[i]) : x)) }));
  const rows = d.slices.map((s) => ({ styles: (s.explained_by.length > 0 ? ['dim'] : []) as Style[], cellStyles: { part: PART_STYLE[s.part] } }));
  const laid = layTable(columns, w, gap, rows, color, ['bold']);
  const lines = [laid.header, laid.rule, ...laid.body].map((l) => (displayWidth(l.plain) <= width ? l : line(truncate(l.plain, width), [], false)));
  return { lines, dropped };
}

/**
 * Renders the discovery for a terminal: the search, the overall slice, the table of found slices and a
 * legend; no line is wider than `width`.
 * @example
 * process.stdout.write(renderDiscoveryText(discovery, { color: false, width: 80 }));
 */
function renderDiscoveryText(d: Discovery, options: { readonly color: boolean; readonly width?: number }): string {
  const width = Math.max(40, Math.floor(options.width ?? 100));
  const color = options.color;
  const blank: Line = { plain: '', styled: '' };
  const found = d.slices.filter((s) => s.explained_by.length === 0).length;
  const lines: Line[] = [
    line(truncate(`floorgap discover · ${count(found)} slice${found === 1 ? '' : 's'} found · depth ${d.settings.depth} over ${count(d.settings.columns.length)} columns`, width), ['bold'], color),
    ...keyedLines('inputs', d.source.inputs.length ? d.source.inputs.map((i) => sanitize(i.path)) : [NULL_MARK], width, color),
    ...keyedLines('columns', d.settings.columns.map((c) => sanitize(c)), width, color),
    ...(d.run !== null ? keyedLines('run', [sanitize(d.run)], width, color) : []),
    ...(d.source.where !== null ? keyedLines('filter', [sanitize(d.source.where)], width, color) : []),
    ...searchLines(d, width, color),
    ...keyedLines(
      'overall',
      [`dev error ${points(d.overall.error.dev?.value)} ${pointsInterval(d.overall.error.dev?.lo, d.overall.error.dev?.hi)}`, `floor ${points(d.overall.floor.value)}`, `train error ${points(d.overall.error.train?.value)}`],
      width,
      color,
    ),
    ...keyedLines('caution', DISCOVERY_CAUTION_ITEMS, width, color),
  ];
  if (d.warnings.length > 0) lines.push(blank, ...d.warnings.flatMap((w) => wrap(`note: ${sanitize(w)}`, width).map((t) => line(t, ['yellow'], color))));
  lines.push(blank);
  if (d.slices.length === 0) {
    lines.push(line(truncate('No slice passed: none has a gap that is significant after false-discovery control and adds to every simpler slice.', width), [], color));
    return `${lines.map((l) => l.styled).join('\n')}\n`;
  }
  const table = slicesTable(d, width, color);
  lines.push(...table.lines, blank);
  const legend = [
    'points of error (7.0 = 7%)',
    'part = the gap the slice was found on (bias = train - floor, variance = train_dev - train or dev - train, mismatch = dev - train_dev)',
    "headroom = points of overall dev error the part would give back, the lower end of its interval (point value in brackets); slices are ranked by it",
    "lift = the slice's gap minus the gap of the weakest parent's other rows",
    'q = false-discovery q of the slice having the gap and adding to every parent',
    'overlap = share of its dev rows also in a higher-ranked slice (#rank); headroom is never summed across overlapping slices',
    table.dropped.length > 0 ? `hidden to fit ${width} columns: ${table.dropped.join(', ')}` : '',
  ].filter(Boolean);
  lines.push(...wrap(legend.join('; '), width).map((t) => line(t, ['dim'], color)));
  return `${lines.map((l) => l.styled).join('\n')}\n`;
}

/** The discovery as markdown: the search, the caution, and one table row per found slice. */
function renderDiscoveryMarkdown(d: Discovery): string {
  const c = d.counts;
  const method = FDR_METHOD_NAME[d.settings.fdr_method] ?? d.settings.fdr_method;
  const out = [
    `## floorgap discover: ${d.slices.filter((s) => s.explained_by.length === 0).length} slices found`,
    '',
    `> ${DISCOVERY_CAUTION}.`,
    '',
    `Searched ${count(c.candidates)} slices of 1 to ${d.settings.depth} conditions over ${d.settings.columns.map((x) => `\`${escapeMarkdown(x)}\``).join(', ')}: ` +
      `${count(c.examined)} examined, ${count(c.thin)} thin, ${count(c.skipped)} skipped by the headroom bound, ${count(c.nested)} the same rows as a simpler slice; ` +
      `${count(c.hypotheses)} tests at a false discovery rate of ${levelPercent(d.settings.fdr)} (${method}); ${count(c.folded)} found slices explained by slices within them.`,
    '',
    `Overall dev error ${points(d.overall.error.dev?.value)} points, floor ${points(d.overall.floor.value)}.`,
    '',
  ];
  for (const w of d.warnings) out.push(`- Note: ${escapeMarkdown(w)}`);
  if (d.warnings.length > 0) out.push('');
  if (d.slices.length === 0) return `${[...out, 'No slice passed.'].join('\n')}\n`;
  const ranks = new Map(d.slices.map((s) => [s.label, s.rank]));
  out.push('| # | conditions | part | headroom (lower end) | headroom | gap | lift | weakest parent | q | dev error | floor | share | overlap |');
  out.push('|---:|---|---|---:|---:|---:|---:|---|---:|---:|---:|---:|---|');
  for (const s of d.slices) {
    out.push(
      `| ${s.rank > 0 ? s.rank : '-'} | ${escapeMarkdown(s.label)} | ${s.part} | ${points(s.part_headroom.lo, 2)} | ${points(s.part_headroom.value, 2)} | ${signedPoints(partGapValue(s))} | ` +
        `${signedPoints(s.lift.value)} | ${escapeMarkdown(overLabel(s.lift.over))} | ${pValue(s.q)} | ${points(s.error.dev?.value)} | ${points(s.floor.value)} | ${percent(s.share)} | ` +
        `${s.explained_by.length > 0 ? `explained by ${s.explained_by.map(escapeMarkdown).join(', ')}` : escapeMarkdown(overlapText(s, ranks))} |`,
    );
  }
  out.push('', 'Points of error. Headroom: points of overall dev error the part would give back. Lift: the gap minus the gap of the weakest parent\'s other rows.');
  return `${out.join('\n')}\n`;
}

/** The CSV columns of a discovery: a report slice's, then the search's. */
const DISCOVER_CSV_COLUMNS: readonly string[] = [
  ...CSV_COLUMNS,
  'conditions',
  'depth',
  'part',
  'part_headroom',
  'part_headroom_lo',
  'lift',
  'lift_lo',
  'lift_hi',
  'lift_p',
  'lift_over',
  'q_discover',
  'overlap',
  'explained_by',
];

/** The discovery as CSV (RFC 4180, CRLF): one row per found slice. */
function renderDiscoveryCsv(d: Discovery): string {
  const rows = d.slices.map((s) => {
    const extra: Value[] = [
      text(JSON.stringify(s.conditions)),
      num(Object.keys(s.conditions).length),
      text(s.part),
      num(s.part_headroom.value),
      num(s.part_headroom.lo),
      num(s.lift.value),
      num(s.lift.lo),
      num(s.lift.hi),
      num(s.lift.p),
      text(JSON.stringify(s.lift.over)),
      num(s.q),
      text(s.overlap.map((o) => `${o.label}: ${o.share === null ? 'unknown' : o.share}`).join('; ')),
      text(s.explained_by.join('; ')),
    ];
    return [...sliceValues(s, false), ...extra].map(cell).join(',');
  });
  return `${[DISCOVER_CSV_COLUMNS.join(','), ...rows].join('\r\n')}\r\n`;
}

/**
 * Renders the discovery in one of the output formats.
 * @example
 * process.stdout.write(renderDiscovery(discovery, 'json', { color: false }));
 */
export function renderDiscovery(d: Discovery, format: Format, options: { readonly color: boolean; readonly width?: number }): string {
  switch (format) {
    case 'text':
      return renderDiscoveryText(d, options);
    case 'md':
      return renderDiscoveryMarkdown(d);
    case 'csv':
      return renderDiscoveryCsv(d);
    case 'json':
      return renderJson(d);
    default:
      throw error(`unknown output format "${String(format)}"`);
  }
}

