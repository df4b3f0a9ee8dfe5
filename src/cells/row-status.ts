/**
 * The rules of a row, in one place: whether it can be used (its status), its error, its split, and
 * which floor- or cost-table entry it takes. Written once as SQL for any dialect, and used by every
 * SQL writer — the local cell scan, the warehouse query, export, examples, paired rows, the queries
 * that locate a bad row — and by the JS that reads their results (the status pseudo-splits).
 */
import { SPLITS, SPLIT_SPELLINGS, type Split } from '../core/split.js';
import type { Dialect } from '../sql/dialect.js';
import type { FloorEntry } from '../read/keyed-table.js';
import type { Roles } from '../read/roles.js';
import { MISSING } from './plan.js';

/** A row's status: usable, or why the analysis leaves it out (the code the cell query groups by). */
export const ROW_STATUS = { usable: 0, unlabelled: 2, badScore: 3, badWeight: 4, badError: 5 } as const;
export type RowProblem = Exclude<keyof typeof ROW_STATUS, 'usable'>;

/**
 * Pseudo-split values that carry the rows left out through a cell result (a cells file's `fg_split`):
 * never valid split spellings.
 */
export const STATUS_SPLITS: Readonly<Record<RowProblem, string>> = {
  unlabelled: '!unlabelled',
  badScore: '!score',
  badWeight: '!weight',
  badError: '!error',
};

/**
 * The problem a pseudo-split names, or null for any other value.
 * @example
 * problemOfSplit('!weight'); // => 'badWeight'
 */
export function problemOfSplit(value: string): RowProblem | null {
  for (const [problem, v] of Object.entries(STATUS_SPLITS)) if (v === value) return problem as RowProblem;
  return null;
}

/** Values of an error column that mean "an error" (compared trimmed and in lower case). */
const TRUE_WORDS: readonly string[] = ['1', '1.0', 'true', 't', 'yes', 'y'];
/** Values of an error column that mean "no error". */
const FALSE_WORDS: readonly string[] = ['0', '0.0', 'false', 'f', 'no', 'n'];
/** What an error column holds, in words, for messages. */
export const ERROR_WORDS_EXPECTED = '0 or 1 (or true/false)';

/**
 * The domain of a row's weight: 0, or a finite number from `min` to `max`. Over up to 1e12 rows every
 * sum stays finite (Σw ≤ 1e112, Σw² ≤ 1e212, (Σw)² ≤ 1e224) and every non-zero sum stays a normal number
 * (w² ≥ 1e-200); docs/method.md, "Weights".
 */
export const WEIGHT_RANGE = { min: 1e-100, max: 1e100 } as const;

/** What a valid weight is, in words, for messages. */
export const WEIGHT_EXPECTED = 'a weight of 0 or between 1e-100 and 1e100';

/**
 * SQL condition true when `w` (a double; NULL for a value that is not a number) is not a valid weight
 * ({@link WEIGHT_RANGE}).
 * @example
 * badWeightSql(dialect('duckdb'), 'w'); // => "(w IS NULL OR NOT (isfinite(w)) OR w < 0 OR w > 1e+100 OR (w > 0 AND w < 1e-100))"
 */
export function badWeightSql(d: Dialect, w: string): string {
  return `(${w} IS NULL OR NOT (${d.isFinite(w)}) OR ${w} < 0 OR ${w} > ${d.num(WEIGHT_RANGE.max)} OR (${w} > 0 AND ${w} < ${d.num(WEIGHT_RANGE.min)}))`;
}

/**
 * SQL condition true for text that is empty after trimming. DuckDB first tests whether the value
 * starts below '!' (cheap), so the trim runs on almost no rows.
 */
function blankSql(d: Dialect, text: string): string {
  return d.name === 'duckdb' ? `(${text} < '!' AND TRIM(${text}) = '')` : `TRIM(${text}) = ''`;
}

/** The value of a column as text, trimmed, NULL when empty. */
export function trimmedSql(text: string): string {
  return `NULLIF(TRIM(${text}), '')`;
}

/**
 * SQL condition true when a score is present but not a finite number (an empty score is no score).
 * @param text the score as text
 * @param number the score as a double when the column is numeric already (typed Parquet), else null
 */
export function badScoreSql(d: Dialect, text: string, number: string | null = null): string {
  if (number !== null) return `NOT (${d.isFinite(number)})`;
  return `NOT COALESCE(${d.isFinite(d.toNumber(text))}, ${text} IS NULL OR ${blankSql(d, text)})`;
}

/** A row's error (1 or 0) and the conditions that leave it out. */
export interface ErrorRule {
  /** 1 when the model erred, else 0 (meaningful on rows that are not left out) */
  readonly error: string;
  /** the error column holds a value that is neither an error word nor a no-error word */
  readonly badError: string;
  /** no label or prediction (or an empty error value): the row is left out */
  readonly unlabelled: string;
}

/**
 * A row's error: `label ≠ pred` compared as trimmed text, or as numbers when both are numbers (1 = 1.0;
 * not in ANSI SQL, which has no cast that returns NULL for text that is not a number); or the 0/1 error
 * column (the `correct` column inverted). The trimmed comparison runs only where the raw values differ.
 * @param text a column's value as text (the dialect's cast where the column is not text)
 * @example
 * errorRule(dialect('duckdb'), roles, (c) => `"${c}"`).unlabelled; // => '"label" IS NULL OR "pred" IS NULL OR …'
 */
export function errorRule(d: Dialect, roles: Pick<Roles, 'label' | 'pred' | 'error' | 'errorIsCorrect'>, text: (col: string) => string): ErrorRule {
  if (roles.error) {
    const e = `LOWER(${trimmedSql(text(roles.error))})`;
    const one = roles.errorIsCorrect ? FALSE_WORDS : TRUE_WORDS;
    return {
      error: `CASE WHEN ${e} IN (${one.map(d.str).join(', ')}) THEN 1 ELSE 0 END`,
      badError: `(${e} IS NOT NULL AND ${e} NOT IN (${[...TRUE_WORDS, ...FALSE_WORDS].map(d.str).join(', ')}))`,
      unlabelled: `(${e} IS NULL)`,
    };
  }
  const l = text(roles.label!);
  const p = text(roles.pred!);
  const sameNumber = d.name === 'ansi' ? '' : `WHEN ${d.toNumber(`TRIM(${l})`)} = ${d.toNumber(`TRIM(${p})`)} THEN 0 `;
  return {
    error: `CASE WHEN ${l} = ${p} THEN 0 WHEN TRIM(${l}) = TRIM(${p}) THEN 0 ${sameNumber}ELSE 1 END`,
    badError: 'FALSE',
    unlabelled: `(${l} IS NULL OR ${p} IS NULL OR ${blankSql(d, l)} OR ${blankSql(d, p)})`,
  };
}

/**
 * A row's status code ({@link ROW_STATUS}), the first problem that applies in this order: a bad
 * weight, a bad score, a bad error value, no label.
 */
export function statusSql(problems: { readonly badWeight?: string; readonly badScore?: string; readonly badError?: string; readonly unlabelled: string }): string {
  const whens: string[] = [];
  if (problems.badWeight) whens.push(`WHEN ${problems.badWeight} THEN ${ROW_STATUS.badWeight}`);
  if (problems.badScore) whens.push(`WHEN ${problems.badScore} THEN ${ROW_STATUS.badScore}`);
  if (problems.badError && problems.badError !== 'FALSE') whens.push(`WHEN ${problems.badError} THEN ${ROW_STATUS.badError}`);
  whens.push(`WHEN ${problems.unlabelled} THEN ${ROW_STATUS.unlabelled}`);
  return `CASE ${whens.join(' ')} ELSE ${ROW_STATUS.usable} END`;
}

/**
 * A row's split as its canonical name ('train', 'train_dev', 'dev', 'test') from its text, whatever
 * accepted spelling it has; `otherwise` for any other value (default NULL).
 * @example
 * splitSql(dialect('duckdb'), '"split"'); // => "CASE LOWER(TRIM(\"split\")) WHEN 'train' THEN 'train' … END"
 */
export function splitSql(d: Dialect, text: string, otherwise = 'NULL'): string {
  const whens = SPLITS.flatMap((s) => SPLIT_SPELLINGS[s].map((w) => `WHEN ${d.str(w)} THEN ${d.str(s)}`));
  return `CASE LOWER(TRIM(${text})) ${whens.join(' ')} ELSE ${otherwise} END`;
}

/**
 * A condition true for the rows of one of the given splits.
 * @example
 * inSplitsSql(dialect('duckdb'), '"split"', ['dev']); // => "LOWER(TRIM(\"split\")) IN ('dev', 'val', 'valid', 'validation')"
 */
export function inSplitsSql(d: Dialect, text: string, splits: readonly Split[]): string {
  const words = splits.flatMap((s) => SPLIT_SPELLINGS[s]);
  return `LOWER(TRIM(${text})) IN (${words.map(d.str).join(', ')})`;
}

/**
 * The floor- or cost-table entry a row (or a group of rows) takes: the most specific matching entry
 * (most key columns), earlier lines first among equally specific ones; -1 (the default) when none
 * matches.
 * @param value a key column's value as the rows hold it (trimmed text, or a cell key)
 * @param missing the condition for a missing value of a key column (`IS NULL` on trimmed text, `=
 * '(missing)'` on cell keys)
 */
export function entrySql(d: Dialect, entries: readonly FloorEntry[], value: (col: string) => string, missing: (col: string) => string): string {
  if (entries.length === 0) return '-1';
  const order = entries.map((e, i) => ({ e, i })).sort((a, b) => Object.keys(b.e.keys).length - Object.keys(a.e.keys).length || a.i - b.i);
  const whens = order.map(({ e, i }) => {
    const conds = Object.entries(e.keys).map(([col, v]) => (v === MISSING ? missing(col) : `${value(col)} = ${d.str(v)}`));
    return `WHEN ${conds.length ? conds.join(' AND ') : '1 = 1'} THEN ${i}`;
  });
  return `CASE ${whens.join(' ')} ELSE -1 END`;
}
