import type { Duck } from '../sql/duck.js';
import { checkColumnNames, detectTable, headerNames, readError, tableSql } from './table.js';
import { error } from '../core/errors.js';

/**
 * The domain of a labelling cost (cost tables and `--label-cost`): a finite number from `min` to `max`.
 * With weights of at most 1e100 over up to 1e12 rows, Σw·cost stays below 1e124; with weights of at
 * least 1e-100, w·cost stays a normal number, so a slice's mean cost is never 0 and the yield it divides
 * stays finite (docs/method.md, "Labelling cost").
 */
export const COST_RANGE = { min: 1e-12, max: 1e12 } as const;

/** What a valid cost is, in words, for messages. */
export const COST_EXPECTED = 'a cost from 1e-12 to 1e12 (e.g. 1, or 4 for a slice four times dearer to label)';

/** True when `value` is a labelling cost ({@link COST_RANGE}). */
function validCost(value: number): boolean {
  return Number.isFinite(value) && value >= COST_RANGE.min && value <= COST_RANGE.max;
}

/** One entry of a floor table: key values (a subset of slice columns), the floor, and its sample size. */
export interface FloorEntry {
  /** line in the file (CSV/TSV: header is line 1) */
  readonly line: number;
  /** column → value; a column left empty in the file is not part of this entry's key */
  readonly keys: Readonly<Record<string, string>>;
  /** human-level error, a fraction in [0, 1] */
  readonly floor: number;
  /** rows the human estimate came from, or null when unknown (the floor is then taken as exact) */
  readonly n: number | null;
}

export interface FloorTable {
  readonly path: string;
  readonly keyColumns: readonly string[];
  readonly entries: readonly FloorEntry[];
}

/**
 * Reads a floor table (CSV, TSV or JSON Lines): key columns + `floor` (fraction in [0, 1]) + optional
 * `n`. Rejects floors outside [0, 1] (costs outside {@link COST_RANGE}), non-positive `n`, and two entries with the same key
 * (naming both lines, and their values when they differ).
 * @example
 * // package,floor,n
 * // 0201,0.12,500
 * await readFloorTable(duck, 'floors.csv'); // => { keyColumns: ['package'], entries: [{ keys: { package: '0201' }, floor: 0.12, n: 500, line: 2 }] }
 */
export async function readFloorTable(duck: Duck, path: string, valueColumn = 'floor'): Promise<FloorTable> {
  const input = await detectTable(path);
  if (input.format === 'parquet') throw error(`${path}: a floor table must be CSV, TSV or JSON Lines`);
  let rows: Record<string, unknown>[];
  try {
    const expr = await tableSql(duck, input);
    rows = await duck.all(`SELECT * FROM ${expr}`);
  } catch (e) {
    throw readError(path, e);
  }
  const columns = rows.length > 0 ? Object.keys(rows[0]) : [];
  // the header as written: the engine would rename a repeated name (floor_1) and an empty one (column1)
  const unnamed = checkColumnNames(path, (await headerNames(duck, input)) ?? columns);
  if (unnamed.length > 0) {
    throw error(`${path}: column ${unnamed[0]} has no name; name every column of the table (its keys and "${valueColumn}")`);
  }
  if (rows.length === 0) throw error(`${path}: no entries; expected a header and at least one row with a "${valueColumn}" column`);
  if (!columns.includes(valueColumn)) {
    throw error(`${path}: no "${valueColumn}" column; the columns are ${columns.map((c) => JSON.stringify(c)).join(', ')}`);
  }
  const keyColumns = columns.filter((c) => c !== valueColumn && c !== 'n');
  if (keyColumns.length === 0) throw error(`${path}: no key columns; add slice columns (e.g. package) beside "${valueColumn}"`);
  const lineOffset = input.format === 'jsonl' ? 1 : 2;
  const seen = new Map<string, { line: number; value: number; n: number | null }>();
  const entries: FloorEntry[] = rows.map((row, i) => {
    const line = i + lineOffset;
    const rawValue = String(row[valueColumn] ?? '').trim();
    const value = Number(rawValue);
    const isFloor = valueColumn === 'floor';
    const bad = rawValue === '' || (isFloor ? !Number.isFinite(value) || value < 0 || value > 1 : !validCost(value));
    if (bad) {
      // a cost divides the yield: zero would make any slice infinitely cheap
      const expected = isFloor ? 'a fraction in [0, 1] (e.g. 0.02 for 2 %)' : COST_EXPECTED;
      throw error(`${path}: line ${line}, column "${valueColumn}": expected ${expected}, got "${rawValue}"`);
    }
    let n: number | null = null;
    if (columns.includes('n')) {
      const rawN = String(row.n ?? '').trim();
      if (rawN !== '') {
        n = Number(rawN);
        if (!Number.isFinite(n) || n <= 0) throw error(`${path}: line ${line}, column "n": expected a number of rows > 0, got "${rawN}"`);
      }
    }
    const keys: Record<string, string> = {};
    for (const c of keyColumns) {
      const v = row[c];
      // keys are written into the cell query, whose SQL ends a string at a NUL
      if (typeof v === 'string' && v.includes('\0')) throw error(`${path}: line ${line}, column ${JSON.stringify(c)}: the value ${JSON.stringify(v)} holds a NUL byte; expected text`);
      if (v !== null && v !== undefined && String(v).trim() !== '') keys[c] = String(v).trim();
    }
    const id = JSON.stringify(Object.entries(keys).sort());
    const prev = seen.get(id);
    if (prev !== undefined) {
      const same = prev.value === value && prev.n === n;
      throw error(
        same
          ? `${path}: line ${line} repeats line ${prev.line} (${describeKey(keys)}); keep one`
          : `${path}: lines ${prev.line} and ${line} give ${describeKey(keys)} different values (${valueColumn} ${prev.value} and ${value}${prev.n !== n ? `, n ${prev.n ?? 'none'} and ${n ?? 'none'}` : ''}); keep one`,
      );
    }
    seen.set(id, { line, value, n });
    return { line, keys, floor: value, n };
  });
  return { path, keyColumns, entries };
}

/** "package=0201 · station=S5", or "(every row)" for an empty key. */
export function describeKey(keys: Readonly<Record<string, string>>): string {
  const parts = Object.entries(keys).map(([k, v]) => `${k}=${v}`);
  return parts.length ? parts.join(' · ') : '(every row)';
}
