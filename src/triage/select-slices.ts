/**
 * Which slices of a report `floorgap export` writes rows for, and the one-line reason shown beside each
 * exported row. Pure: plain data in, plain data out.
 */
import { error } from '../core/errors.js';
import type { Report, SliceReport } from './types.js';

/** A slice named on the command line (`--slice "station=S5,lighting=dome"`), as pairs in the order given. */
export interface NamedSlice {
  /** the text as given, for messages and the manifest */
  readonly text: string;
  readonly pairs: readonly (readonly [column: string, value: string])[];
}

/** How slices are chosen: the flagged ones, the first N in the report's order, or named ones. */
export type Selection =
  | { readonly kind: 'flagged' }
  | { readonly kind: 'top'; readonly n: number }
  | { readonly kind: 'named'; readonly slices: readonly NamedSlice[] };

/** A chosen slice and why it was chosen. */
export interface ChosenSlice {
  readonly slice: SliceReport;
  /** `flagged`, `top` (among the first N) or `named` */
  readonly chosen: 'flagged' | 'top' | 'named';
  /** the `--slice` text that named it, for named slices */
  readonly named: string | null;
  /** e.g. "dev error 9.1 % vs floor 2.0 %, mismatch 6.4 pts" */
  readonly reason: string;
}

/**
 * Parses a `--slice` value: `col=value` pairs separated by commas. A backslash escapes the next
 * character, so `\,` is a literal comma, `\=` a literal `=` and `\\` a backslash. The first unescaped
 * `=` of a pair ends the column name; names and values are trimmed (slice values are trimmed text).
 * @param text e.g. `station=S5,lighting=dome`
 * @returns the pairs in the order given
 * @throws FloorgapError on an empty pair, a pair without `=`, an empty column name or a repeated column
 * @example
 * parseSliceKey('sharpness=[0.583\\, 0.649)').pairs; // => [['sharpness', '[0.583, 0.649)']]
 */
export function parseSliceKey(text: string): NamedSlice {
  const pairs: [string, string][] = [];
  let name = '';
  let value = '';
  let inValue = false;
  const end = (): void => {
    const col = name.trim();
    if (!inValue) {
      throw error(
        `--slice "${text}": expected col=value pairs separated by commas, got "${name.trim()}"; write \\, for a comma inside a value`,
      );
    }
    if (col === '') throw error(`--slice "${text}": a pair has no column name before "="`);
    if (pairs.some(([c]) => c === col)) throw error(`--slice "${text}": column "${col}" is named twice`);
    pairs.push([col, value.trim()]);
    name = '';
    value = '';
    inValue = false;
  };
  for (let i = 0; i < text.length; i++) {
    let ch = text[i];
    if (ch === '\\' && i + 1 < text.length) {
      ch = text[++i];
    } else if (ch === ',') {
      end();
      continue;
    } else if (ch === '=' && !inValue) {
      inValue = true;
      continue;
    }
    if (inValue) value += ch;
    else name += ch;
  }
  end();
  return { text, pairs };
}

/**
 * The grouping that holds named slices: their columns when every named slice has the same columns
 * (in the order the first one names them); the overview (null) when each names one column but not
 * all the same one.
 * @param named the parsed `--slice` values (at least one)
 * @returns the `--by` columns, or null for the overview
 * @throws FloorgapError when slices of two or more columns name different columns
 * @example
 * namedGrouping([parseSliceKey('station=S5'), parseSliceKey('station=S1')]); // => ['station']
 * namedGrouping([parseSliceKey('station=S5'), parseSliceKey('package=QFN')]); // => null
 */
export function namedGrouping(named: readonly NamedSlice[]): string[] | null {
  const first = named[0].pairs.map(([c]) => c);
  const same = (s: NamedSlice) => s.pairs.length === first.length && s.pairs.every(([c]) => first.includes(c));
  if (named.every(same)) return first;
  if (named.every((s) => s.pairs.length === 1)) return null;
  const other = named.find((s) => !same(s))!;
  throw error(
    `--slice "${other.text}" names other columns than --slice "${named[0].text}"; slices of several columns must all name the same columns (one-column slices may mix columns); export them separately`,
  );
}

function sameKey(slice: SliceReport, pairs: readonly (readonly [string, string])[]): boolean {
  const entries = Object.entries(slice.key);
  return entries.length === pairs.length && pairs.every(([c, v]) => slice.key[c] === v);
}

function percentText(x: number): string {
  const s = (x * 100).toFixed(1);
  return s === '-0.0' ? '0.0' : s;
}

/**
 * The one-line reason beside an exported row: the slice's dev error, its floor and its focus, with the
 * focus part (the gap the focus names) in percentage points.
 * @param slice a slice of the report
 * @returns e.g. `dev error 16.2 % vs floor 5.6 %, mismatch 11.6 pts`
 * @example
 * sliceReason(s5); // => 'dev error 16.2 % vs floor 5.6 %, mismatch 11.6 pts'
 */
export function sliceReason(slice: SliceReport): string {
  const dev = slice.error.dev;
  const head = `dev error ${dev ? `${percentText(dev.value)} %` : 'n/a'} vs floor ${percentText(slice.floor.value)} %`;
  const gap =
    slice.focus === 'bias' ? slice.gaps.avoidable_bias : slice.focus === 'variance' ? slice.gaps.variance : slice.focus === 'mismatch' ? slice.gaps.mismatch : null;
  if (gap) return `${head}, ${slice.focus} ${percentText(gap.value)} pts`;
  return `${head}, ${slice.focus}`;
}

function valuesOf(report: Report, column: string): string[] {
  const values = new Set<string>();
  for (const s of report.slices) if (column in s.key) values.add(s.key[column]);
  return [...values].sort();
}

/**
 * Chooses the slices to export from a report, in rank order.
 * - `flagged`: every flagged slice;
 * - `top`: the first N slices in the report's order (fewer when the report has fewer);
 * - `named`: the slices whose keys the user named; a column the report's slices do not have, or a key
 *   that matches no slice, is an error naming the values there are.
 * @param report the slice report the `report` command would print with the same options
 * @param selection how to choose
 * @returns the chosen slices, best rank first, each once
 * @throws FloorgapError for a named slice that is not in the report
 * @example
 * selectSlices(report, { kind: 'top', n: 2 }).map((c) => c.slice.rank); // => [1, 2]
 */
export function selectSlices(report: Report, selection: Selection): ChosenSlice[] {
  const ranked = [...report.slices].sort((a, b) => a.rank - b.rank);
  const make = (slice: SliceReport, chosen: ChosenSlice['chosen'], named: string | null = null): ChosenSlice => ({
    slice,
    chosen,
    named,
    reason: sliceReason(slice),
  });
  if (selection.kind === 'flagged') return ranked.filter((s) => s.flagged).map((s) => make(s, 'flagged'));
  if (selection.kind === 'top') {
    if (!Number.isInteger(selection.n) || selection.n <= 0) throw error(`--top ${selection.n}: expected a whole number > 0`);
    return ranked.slice(0, selection.n).map((s) => make(s, 'top'));
  }
  const columns = new Set(ranked.flatMap((s) => Object.keys(s.key)));
  const found = new Map<SliceReport, string>();
  for (const named of selection.slices) {
    for (const [c] of named.pairs) {
      if (!columns.has(c)) {
        const known = [...columns].map((x) => JSON.stringify(x)).join(', ');
        throw error(`--slice "${named.text}": the report has no slices of column "${c}"; its slice columns are ${known || '(none)'} (add the column to --slice-cols)`);
      }
    }
    const hit = ranked.find((s) => sameKey(s, named.pairs));
    if (!hit) {
      const absent = named.pairs.find(([c, v]) => !ranked.some((s) => s.key[c] === v));
      if (absent) {
        const [col, value] = absent;
        const values = valuesOf(report, col);
        const shown = values.slice(0, 12).map((v) => JSON.stringify(v)).join(', ') + (values.length > 12 ? ', …' : '');
        throw error(`--slice "${named.text}": no row has ${col}=${JSON.stringify(value)}; the values of "${col}" are ${shown}`);
      }
      const sameColumns = ranked.some((s) => Object.keys(s.key).length === named.pairs.length && named.pairs.every(([c]) => c in s.key));
      throw error(
        sameColumns
          ? `--slice "${named.text}": no row has this combination of values`
          : `--slice "${named.text}": the report's slices are not keyed by exactly ${named.pairs.map(([c]) => c).join(', ')}`,
      );
    }
    if (!found.has(hit)) found.set(hit, named.text);
  }
  return ranked.filter((s) => found.has(s)).map((s) => make(s, 'named', found.get(s)!));
}
