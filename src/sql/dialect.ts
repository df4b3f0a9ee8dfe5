/**
 * SQL dialects the cell query is written in: DuckDB (the local engine) and the SQL of the engines a
 * warehouse table usually lives in. Only the pieces that differ between engines are here: quoting,
 * type names, a cast that yields NULL for text that is not a number, the test for NaN and infinities,
 * a constant table, and GREATEST.
 */

import { hasUnsafeChars, isUnsafeCode } from '../core/unsafe-chars.js';

/** Dialects `floorgap sql --dialect` writes. */
export const DIALECTS = ['ansi', 'duckdb', 'spark', 'trino', 'bigquery'] as const;
export type DialectName = (typeof DIALECTS)[number];

/** A column of a constant table: its name and SQL type. */
export interface ValuesColumn {
  readonly name: string;
  readonly type: 'int' | 'double' | 'text';
}

/** What the cell query needs to know about an SQL dialect. */
export interface Dialect {
  readonly name: DialectName;
  /** a quoted identifier (column or alias name) */
  ident(name: string): string;
  /** a quoted string literal of exactly `value`; unsafe characters (core/unsafe-chars.ts) are written as escapes */
  str(value: string): string;
  /** a number literal of type DOUBLE (or the dialect's double type) */
  num(value: number): string;
  /** SQL type names */
  readonly types: { readonly int: string; readonly double: string; readonly text: string };
  /** the value as a double, NULL when it is not a number (ANSI: a plain CAST, which fails instead) */
  toNumber(text: string): string;
  /** a condition true for a NaN value (FALSE where the dialect has no NaN test) */
  isNan(x: string): string;
  /** a condition true for a finite number (not NaN, not ±infinity) */
  isFinite(x: string): string;
  /** a constant table as a FROM item named `alias`; `rows` holds SQL literals */
  values(alias: string, columns: readonly ValuesColumn[], rows: readonly (readonly string[])[]): string;
  /** the largest of some integer expressions */
  greatest(exprs: readonly string[]): string;
}

function doubleQuoted(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

function backQuoted(name: string): string {
  return '`' + name.replace(/`/g, '``') + '`';
}

/** '…' with '' for a quote: ANSI, DuckDB, Trino. */
function standardString(value: string): string {
  return `'${value.replace(/'/g, "''")}'`;
}

const hex4 = (code: number) => code.toString(16).toUpperCase().padStart(4, '0');

/**
 * The value split into runs of safe text and single unsafe code units (see core/unsafe-chars.ts): a
 * literal carries the exact value, with the unsafe characters written as escapes, so that the printed
 * query holds no control character, line break or bidi control, and still matches the data.
 */
function pieces(value: string): (string | number)[] {
  const out: (string | number)[] = [];
  let run = '';
  for (let i = 0; i < value.length; i++) {
    const code = value.charCodeAt(i);
    if (code >= 0xd800 && code <= 0xdbff && i + 1 < value.length) {
      const next = value.charCodeAt(i + 1);
      if (next >= 0xdc00 && next <= 0xdfff) {
        run += value[i] + value[i + 1];
        i++;
        continue;
      }
    }
    if (isUnsafeCode(code)) {
      if (run) out.push(run);
      run = '';
      out.push(code);
    } else run += value[i];
  }
  if (run || out.length === 0) out.push(run);
  return out;
}

/** DuckDB: '…', and chr(n) joined with || for an unsafe character. */
function duckString(value: string): string {
  if (!hasUnsafeChars(value)) return standardString(value);
  return `(${pieces(value).map((p) => (typeof p === 'number' ? `chr(${p})` : standardString(p))).join(' || ')})`;
}

/** ANSI and Trino: '…', or a Unicode escape literal U&'…\XXXX…' (SQL:2003) when it holds an unsafe character. */
function unicodeString(value: string): string {
  if (!hasUnsafeChars(value)) return standardString(value);
  const body = pieces(value)
    .map((p) => (typeof p === 'number' ? `\\${hex4(p)}` : p.replace(/\\/g, '\\\\').replace(/'/g, "''")))
    .join('');
  return `U&'${body}'`;
}

/** '…' with backslash escapes: Spark SQL and BigQuery read \' and \\, \n, \r, \t and \uXXXX inside string literals. */
function backslashString(value: string): string {
  const short: Record<string, string> = { '\\': '\\\\', "'": "\\'", '\n': '\\n', '\r': '\\r', '\t': '\\t' };
  const body = pieces(value)
    .map((p) => (typeof p === 'number' ? short[String.fromCharCode(p)] ?? `\\u${hex4(p)}` : p.replace(/[\\']/g, (c) => short[c])))
    .join('');
  return `'${body}'`;
}

function numberText(value: number): string {
  if (!Number.isFinite(value)) throw new RangeError(`not a finite number: ${value}`);
  // String() round-trips doubles exactly; an integer gets a decimal point so it types as a double
  const s = String(value);
  return /[.eE]/.test(s) ? s : `${s}.0`;
}

function caseGreatest(exprs: readonly string[]): string {
  if (exprs.length === 1) return exprs[0];
  // ANSI has no GREATEST: the first expression not below any other
  const whens = exprs.slice(0, -1).map((e, i) => {
    const others = exprs.filter((_, j) => j !== i).map((o) => `${e} >= ${o}`);
    return `WHEN ${others.join(' AND ')} THEN ${e}`;
  });
  return `(CASE ${whens.join(' ')} ELSE ${exprs[exprs.length - 1]} END)`;
}

function typed(value: string, type: string): string {
  return value === 'NULL' ? `CAST(NULL AS ${type})` : value;
}

function valuesList(alias: string, columns: readonly ValuesColumn[], rows: readonly (readonly string[])[], typeName: (c: ValuesColumn) => string, ident: (n: string) => string, bare: boolean): string {
  const body = rows.map((r) => `(${r.map((v, i) => `CAST(${typed(v, typeName(columns[i]))} AS ${typeName(columns[i])})`).join(', ')})`).join(', ');
  const names = columns.map((c) => ident(c.name)).join(', ');
  return bare ? `VALUES ${body} AS ${alias}(${names})` : `(VALUES ${body}) AS ${alias}(${names})`;
}

const DUCKDB: Dialect = {
  name: 'duckdb',
  ident: doubleQuoted,
  str: duckString,
  num: numberText,
  types: { int: 'BIGINT', double: 'DOUBLE', text: 'VARCHAR' },
  toNumber: (t) => `TRY_CAST(${t} AS DOUBLE)`,
  isNan: (x) => `isnan(${x})`,
  isFinite: (x) => `isfinite(${x})`,
  values(alias, columns, rows) {
    return valuesList(alias, columns, rows, (c) => this.types[c.type], this.ident, false);
  },
  greatest: (exprs) => (exprs.length === 1 ? exprs[0] : `greatest(${exprs.join(', ')})`),
};

const ANSI: Dialect = {
  name: 'ansi',
  ident: doubleQuoted,
  str: unicodeString,
  num: numberText,
  types: { int: 'BIGINT', double: 'DOUBLE PRECISION', text: 'VARCHAR' },
  // ANSI SQL has no cast that yields NULL on bad input: a value that is not a number fails the query
  toNumber: (t) => `CAST(NULLIF(TRIM(${t}), '') AS DOUBLE PRECISION)`,
  isNan: () => 'FALSE',
  // x − x is 0 for a finite x and NaN (never 0) for NaN and ±infinity
  isFinite: (x) => `(${x} - ${x}) = 0`,
  values(alias, columns, rows) {
    return valuesList(alias, columns, rows, (c) => this.types[c.type], this.ident, false);
  },
  greatest: caseGreatest,
};

const TRINO: Dialect = {
  name: 'trino',
  ident: doubleQuoted,
  str: unicodeString,
  num: numberText,
  types: { int: 'BIGINT', double: 'DOUBLE', text: 'VARCHAR' },
  toNumber: (t) => `TRY_CAST(${t} AS DOUBLE)`,
  isNan: (x) => `is_nan(${x})`,
  isFinite: (x) => `is_finite(${x})`,
  values(alias, columns, rows) {
    return valuesList(alias, columns, rows, (c) => this.types[c.type], this.ident, false);
  },
  greatest: (exprs) => (exprs.length === 1 ? exprs[0] : `greatest(${exprs.join(', ')})`),
};

const SPARK: Dialect = {
  name: 'spark',
  ident: backQuoted,
  str: backslashString,
  num: numberText,
  types: { int: 'BIGINT', double: 'DOUBLE', text: 'STRING' },
  toNumber: (t) => `TRY_CAST(${t} AS DOUBLE)`,
  isNan: (x) => `isnan(${x})`,
  // Spark orders NaN above +infinity, so this is false for NaN and both infinities
  isFinite: (x) => `abs(${x}) < CAST('Infinity' AS DOUBLE)`,
  values(alias, columns, rows) {
    return valuesList(alias, columns, rows, (c) => this.types[c.type], this.ident, true);
  },
  greatest: (exprs) => (exprs.length === 1 ? exprs[0] : `greatest(${exprs.join(', ')})`),
};

const BIGQUERY: Dialect = {
  name: 'bigquery',
  ident: (name) => '`' + name.replace(/[\\`]/g, (c) => '\\' + c) + '`',
  str: backslashString,
  num: numberText,
  types: { int: 'INT64', double: 'FLOAT64', text: 'STRING' },
  toNumber: (t) => `SAFE_CAST(${t} AS FLOAT64)`,
  isNan: (x) => `IS_NAN(${x})`,
  isFinite: (x) => `(NOT IS_NAN(${x}) AND NOT IS_INF(${x}))`,
  values(alias, columns, rows) {
    // BigQuery has no VALUES table: an array of structs, unnested
    const structs = rows.map((r) => `STRUCT(${r.map((v, i) => `CAST(${typed(v, this.types[columns[i].type])} AS ${this.types[columns[i].type]}) AS ${this.ident(columns[i].name)}`).join(', ')})`);
    return `UNNEST([${structs.join(', ')}]) AS ${alias}`;
  },
  greatest: (exprs) => (exprs.length === 1 ? exprs[0] : `GREATEST(${exprs.join(', ')})`),
};

const BY_NAME: Record<DialectName, Dialect> = { duckdb: DUCKDB, ansi: ANSI, trino: TRINO, spark: SPARK, bigquery: BIGQUERY };

/**
 * The dialect of that name.
 * @example
 * dialect('spark').ident('station'); // => '`station`'
 */
export function dialect(name: DialectName): Dialect {
  return BY_NAME[name];
}
