/**
 * Discovered slices as `floorgap export` writes them: the slices of a search run now (`--discovered`)
 * or of a discovery saved with `floorgap discover --format json` (`--from F`), checked field by field
 * against the schema and against the input, each with the one-line reason beside its rows.
 */
import { promises as fs } from 'node:fs';
import { error } from '../core/errors.js';
import type { CellTable } from '../cells/cell-table.js';
import { PARTS, type DiscoveredSlice, type Discovery } from '../discover/types.js';
import { pValue, signedPoints } from '../render/format.js';
import type { ExportSlice } from '../rows/export-sql.js';

const EXPECTED = 'expected a discovery saved with floorgap discover --format json (schema floorgap.discover/1)';

/** What export reads of a saved discovery: its settings and run as saved, and its slices in order. */
export interface SavedDiscovery {
  readonly settings: Discovery['settings'];
  readonly run: string | null;
  readonly slices: readonly DiscoveredSlice[];
}

/** A value as an error shows it: scalars as JSON, containers by kind. */
function shown(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (Array.isArray(v)) return 'an array';
  if (v !== null && typeof v === 'object') return 'an object';
  const s = JSON.stringify(v);
  return s.length > 40 ? `${s.slice(0, 39)}…` : s;
}

const isObject = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);

/**
 * Reads a saved discovery (`--from F`) and checks it ({@link checkDiscovery}).
 * @param path the file, as given
 * @throws FloorgapError for a missing file, a folder, text that is not JSON, or a document that is not
 *   a floorgap.discover/1 discovery with the fields export reads
 * @example
 * await readDiscovery('found.json'); // => { settings: { depth: 2, … }, run: null, slices: [{ label: 'station=S5', … }] }
 */
export async function readDiscovery(path: string): Promise<SavedDiscovery> {
  const stat = await fs.stat(path).catch((e: NodeJS.ErrnoException) => {
    throw error(`${path}: ${e.code === 'ENOENT' ? 'no such file' : `cannot read (${e.code})`}; ${EXPECTED}`, e);
  });
  if (!stat.isFile()) throw error(`${path}: ${stat.isDirectory() ? 'is a folder' : 'is not a regular file'}; ${EXPECTED}`);
  const text = await fs.readFile(path, 'utf8').catch((e: NodeJS.ErrnoException) => {
    throw error(`${path}: cannot read (${e.code}); ${EXPECTED}`, e);
  });
  let value: unknown;
  try {
    value = JSON.parse(text.replace(/^\ufeff/, ''));
  } catch (e) {
    throw error(`${path}: not valid JSON (${(e as Error).message}); ${EXPECTED}`, e);
  }
  return checkDiscovery(path, value);
}

/**
 * Checks a parsed JSON document as a saved discovery: the schema, then every field export reads of each
 * slice (`conditions`, `label`, `rank`, `part`, that part's gap, `lift`, `q`, `explained_by`).
 * @param path the file, for the message
 * @param value the parsed document
 * @throws FloorgapError `found.json: slices[1].part: expected "bias", "variance" or "mismatch", got "noise"`
 * @example
 * checkDiscovery('r.json', { schema: 'floorgap.report/1' });
 * // => FloorgapError('r.json: a JSON document with schema "floorgap.report/1"; expected a discovery saved with …')
 */
export function checkDiscovery(path: string, value: unknown): SavedDiscovery {
  if (!isObject(value)) throw error(`${path}: a JSON document (${value === null ? 'null' : Array.isArray(value) ? 'an array' : typeof value}); ${EXPECTED}`);
  if (!('schema' in value)) throw error(`${path}: a JSON document (an object without a "schema" key); ${EXPECTED}`);
  if (value.schema !== 'floorgap.discover/1') throw error(`${path}: a JSON document with schema ${shown(value.schema)}; ${EXPECTED}`);
  const bad = (field: string, what: string, v: unknown) => error(`${path}: ${field}: expected ${what}, got ${shown(v)}`);
  const number = (field: string, v: unknown) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) throw bad(field, 'a number', v);
  };
  const values = (field: string, v: unknown) => {
    if (!isObject(v)) throw bad(field, 'an object of column values', v);
    for (const [col, x] of Object.entries(v)) if (typeof x !== 'string') throw bad(`${field}[${JSON.stringify(col)}]`, 'a string', x);
  };
  if (!isObject(value.settings)) throw bad('settings', 'the search settings (an object)', value.settings);
  if (value.run !== null && typeof value.run !== 'string') throw bad('run', 'null or a run name', value.run);
  if (!Array.isArray(value.slices)) throw bad('slices', 'an array', value.slices);
  value.slices.forEach((s: unknown, i) => {
    const at = `slices[${i}]`;
    if (!isObject(s)) throw bad(at, 'a slice (an object)', s);
    values(`${at}.conditions`, s.conditions);
    if (Object.keys(s.conditions as object).length === 0) throw bad(`${at}.conditions`, 'at least one condition', 'an empty object');
    if (typeof s.label !== 'string') throw bad(`${at}.label`, 'a string', s.label);
    if (typeof s.rank !== 'number' || !Number.isInteger(s.rank) || s.rank < 0) throw bad(`${at}.rank`, 'a whole number ≥ 0', s.rank);
    if (!(PARTS as readonly unknown[]).includes(s.part)) throw bad(`${at}.part`, PARTS.map((p) => JSON.stringify(p)).join(', ').replace(/, ([^,]+)$/, ' or $1'), s.part);
    const gaps = s.gaps;
    if (!isObject(gaps)) throw bad(`${at}.gaps`, 'an object of gaps', gaps);
    const gapName = gapField(s.part as DiscoveredSlice['part']);
    const gap = gaps[gapName];
    if (gap !== null) {
      if (!isObject(gap)) throw bad(`${at}.gaps.${gapName}`, 'null or a gap (an object)', gap);
      number(`${at}.gaps.${gapName}.value`, gap.value);
    }
    if (!isObject(s.lift)) throw bad(`${at}.lift`, 'a lift (an object)', s.lift);
    number(`${at}.lift.value`, s.lift.value);
    values(`${at}.lift.over`, s.lift.over);
    number(`${at}.q`, s.q);
    if (!Array.isArray(s.explained_by) || !s.explained_by.every((x) => typeof x === 'string')) throw bad(`${at}.explained_by`, 'an array of slice labels', s.explained_by);
  });
  return { settings: value.settings as unknown as Discovery['settings'], run: value.run as string | null, slices: value.slices as DiscoveredSlice[] };
}

function gapField(part: DiscoveredSlice['part']): 'avoidable_bias' | 'variance' | 'mismatch' {
  return part === 'bias' ? 'avoidable_bias' : part;
}

/** Where a slice sits in the saved file, for a message: `found.json: slices[0] ("station=S5")`. */
const sliceAt = (path: string, s: DiscoveredSlice, i: number) => `${path}: slices[${i}] (${JSON.stringify(s.label)})`;

/**
 * Checks that every condition of a saved discovery names a column of the input, as `--slice` does.
 * @param path the file, for the message
 * @param saved the checked discovery
 * @param inputColumns the input's columns
 * @throws FloorgapError `found.json: slices[0] ("conveyor=C2"): no column "conveyor"; the columns are "id", …`
 */
export function checkDiscoveryColumns(path: string, saved: SavedDiscovery, inputColumns: readonly string[]): void {
  saved.slices.forEach((s, i) => {
    for (const c of Object.keys(s.conditions)) {
      if (!inputColumns.includes(c)) {
        throw error(`${sliceAt(path, s, i)}: no column ${JSON.stringify(c)}; the columns are ${inputColumns.map((x) => JSON.stringify(x)).join(', ')}`);
      }
    }
  });
}

/**
 * Checks that a saved discovery's slices can be found in the analysis' cells: every condition names a
 * slice column with a value its rows have (bins cut as the discovery's were), and the run is the one
 * the analysis reports.
 * @param path the file, for the message
 * @param saved the checked discovery
 * @param cells the analysis' cells (their slice columns and values)
 * @param run the run the analysis reports (null: the input has no runs)
 * @param binned the slice columns cut into bins (a value there depends on --bins and --bin-method)
 * @throws FloorgapError `found.json: slices[2] ("sharpness=[0.5, 0.6)"): no row has sharpness="[0.5, 0.6)"; …`
 */
export function checkDiscoveryCells(path: string, saved: SavedDiscovery, cells: CellTable, run: string | null, binned: readonly string[]): void {
  saved.slices.forEach((s, i) => {
    for (const [c, v] of Object.entries(s.conditions)) {
      const ci = cells.columns.indexOf(c);
      if (ci < 0) {
        throw error(
          `${sliceAt(path, s, i)}: column ${JSON.stringify(c)} is not a slice column of this analysis; its slice columns are ${cells.columns.map((x) => JSON.stringify(x)).join(', ')} (give the --slice-cols the discovery was made with)`,
        );
      }
      if (!cells.dicts[ci].includes(v)) {
        const known = cells.dicts[ci];
        const list = known.slice(0, 12).map((x) => JSON.stringify(x)).join(', ') + (known.length > 12 ? ', …' : '');
        const hint = binned.includes(c) ? ' (give the --bins and --bin-method the discovery was made with)' : '';
        throw error(`${sliceAt(path, s, i)}: no row has ${c}=${JSON.stringify(v)}; the values of ${JSON.stringify(c)} are ${list}${hint}`);
      }
    }
  });
  if (saved.run !== run) {
    throw error(
      `${path}: a discovery of ${saved.run === null ? 'a table without runs' : `run ${JSON.stringify(saved.run)}`}; this analysis reports ${run === null ? 'no run' : `run ${JSON.stringify(run)}`}${saved.run === null ? '' : ` (give --run ${saved.run})`}`,
    );
  }
}

/** Conditions as the discovery names them: `station=S2 · lighting=dome`. */
function conditionsText(conditions: Readonly<Record<string, string>>): string {
  return Object.entries(conditions).map(([k, v]) => `${k}=${v}`).join(' · ');
}

/**
 * The one-line reason beside an exported row of a discovered slice: the part it was found on and that
 * gap, its lift over the weakest parent's rest, its q-value, and for a folded slice what explains it.
 * @param s a discovered slice
 * @returns e.g. `bias +12.3 pts, lift +10.1 over the rest of station=S2, q<0.001`
 * @example
 * discoveredReason(s5); // => 'mismatch +11.6 pts, lift +11.0 over all other rows, q=0.014'
 */
export function discoveredReason(s: DiscoveredSlice): string {
  const gap = s.gaps[gapField(s.part)];
  const over = Object.keys(s.lift.over).length === 0 ? 'all other rows' : `the rest of ${conditionsText(s.lift.over)}`;
  const q = pValue(s.q);
  const head = `${s.part} ${signedPoints(gap?.value ?? null)} pts, lift ${signedPoints(s.lift.value)} over ${over}, q${q.startsWith('<') ? q : `=${q}`}`;
  return s.explained_by.length > 0 ? `${head}, explained by ${s.explained_by.join(', ')}` : head;
}

/**
 * Discovered slices as the export query takes them: their conditions as the key, the part as the focus.
 * @param slices in the order they are written (rank order; folded slices, rank 0, after)
 * @example
 * exportSlicesOf(discovery.slices)[0]; // => { key: { station: 'S5' }, label: 'station=S5', focus: 'mismatch', rank: 1, reason: 'mismatch +11.6 pts, …' }
 */
export function exportSlicesOf(slices: readonly DiscoveredSlice[]): ExportSlice[] {
  return slices.map((s) => ({ key: s.conditions, label: s.label, focus: s.part, rank: s.rank, reason: discoveredReason(s) }));
}
