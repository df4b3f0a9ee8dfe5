/**
 * `--where` is accepted only as one checked expression (src/sql/where.ts). Expected canonical texts
 * are what DuckDB prints back from the checked tree: @duckdb/node-api 1.5.6-r.1,
 * `SELECT json_deserialize_sql(json_serialize_sql('SELECT (<where>)'))`, output pasted beside each.
 * The refused cases are the ones a tester reproduced (a second statement that wrote a file, a subquery
 * that read /etc/passwd) and their relatives.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDuck, type Duck } from '../../src/sql/duck.js';
import { printableWhere, safeWhere, whereTreeProblem } from '../../src/sql/where.js';
import { tableRef } from '../../src/cells/warehouse.js';
import { failure } from '../helpers/failure.js';

let duck: Duck;
beforeAll(async () => {
  duck = await openDuck({ threads: 1 });
});
afterAll(() => duck.close());

describe('safeWhere: what runs is DuckDB\'s own text of the checked tree', () => {
  const accepted: [string, string][] = [
    // DuckDB 1.5.6 json_deserialize_sql printed: SELECT ((station != 'S5') AND (TRY_CAST(x AS DOUBLE) > 0.5))
    [`station <> 'S5' AND TRY_CAST(x AS DOUBLE) > 0.5`, `(((station != 'S5') AND (TRY_CAST(x AS DOUBLE) > 0.5)))`],
    // printed: SELECT ((a != 'x') OR (b IS NOT NULL))
    [`NOT (a = 'x') OR b IS NOT NULL`, `(((a != 'x') OR (b IS NOT NULL)))`],
    // printed: SELECT (x BETWEEN 1 AND 2)
    [`x BETWEEN 1 AND 2`, `((x BETWEEN 1 AND 2))`],
    // printed: SELECT ((a ~~* 'x%') AND (b !~~ '%y'))
    [`a ILIKE 'x%' AND b NOT LIKE '%y'`, `(((a ~~* 'x%') AND (b !~~ '%y')))`],
    // printed: SELECT ("weird ""col" = 'a''b')
    [`"weird ""col" = 'a''b'`, `(("weird ""col" = 'a''b'))`],
    // printed: SELECT (COALESCE(a, 'x') = 'x')
    [`coalesce(a, 'x') = 'x'`, `((COALESCE(a, 'x') = 'x'))`],
  ];
  for (const [given, runs] of accepted) {
    it(`accepts ${given}`, async () => {
      expect(await safeWhere(duck, given)).toBe(runs);
    });
  }

  it('leaves no filter as no filter', async () => {
    expect(await safeWhere(duck, null)).toBeNull();
  });

  const refused: [string, string, RegExp][] = [
    // the tester's two cases: a COPY after a closed parenthesis wrote x.csv; a subquery printed a line of /etc/passwd
    ['a second statement that writes a file', `true); COPY (SELECT 42) TO 'x.csv'; SELECT (1`, /more than one statement/],
    ['a subquery that reads a file', `(SELECT column0 FROM read_csv('/etc/passwd', header=false, sep='|') LIMIT 1)=1`, /holds a subquery/],
    // a naive wrap is not enough: these two parse without error
    ['two SELECTs', `true); SELECT (1`, /more than one statement/],
    ['a table function in the FROM of the wrap', `1) FROM read_csv('/etc/passwd') --`, /reads from a table or a table function/],
    ['a table function as a value', `(SELECT count(*) FROM glob('/*')) > 0`, /holds a subquery/],
    ['EXISTS', `EXISTS (SELECT 1)`, /holds a subquery/],
    ['ANY over a subquery', `a = ANY (SELECT 1)`, /holds a subquery/],
    ['an environment variable', `getenv('HOME') = 'x'`, /calls getenv\(\)/],
    ['a setting', `current_setting('threads') = '2'`, /calls current_setting\(\)/],
    ['a file read as a scalar', `read_text('/etc/passwd') IS NULL`, /calls read_text\(\)/],
    ['an aggregate', `count(*) > 1`, /calls count_star\(\)/],
    ['a window', `sum(x) OVER () > 1`, /a window function/],
    ['a lambda', `list_filter([1], x -> x > 0) = [1]`, /calls list_value\(\)|calls list_filter\(\)|a lambda/],
    ['a qualified column', `t.a = 1`, /with a qualifier/],
    ['a parameter', `a = ?`, /a parameter/],
    // the parser reads a parenthesised list as row(...)
    ['a comma', `a = 1, b = 2`, /calls row\(\)/],
    ['a schema-qualified function', `pg_catalog.lower(a) = 'x'`, /calls lower\(\)/],
    ['a syntax error', `a = 1 OR`, /syntax error/],
  ];
  for (const [what, given, why] of refused) {
    it(`refuses ${what}`, async () => {
      const e = await failure(safeWhere(duck, given));
      expect(e.message).toContain(`--where "${given}": not accepted: `);
      expect(e.message).toMatch(why);
      expect((e as { exitCode?: number }).exitCode).toBe(2);
    });
  }

  it('the text that runs is wrapped once more in parentheses', async () => {
    // printed: SELECT regexp_full_match(a, 'x.*') — a function call, not parenthesised by DuckDB
    expect(await safeWhere(duck, `a SIMILAR TO 'x.*'`)).toBe(`(regexp_full_match(a, 'x.*'))`);
  });

  it('refuses an empty condition', async () => {
    expect((await failure(safeWhere(duck, '  '))).message).toMatch(/expected a condition/);
  });

  it('the tree check alone: two statements, a FROM, a second select item', () => {
    // hand-built trees in the shape json_serialize_sql gives (fields not used by the check left out)
    const select = (over: Record<string, unknown>) => ({ node: { type: 'SELECT_NODE', modifiers: [], cte_map: { map: [] }, select_list: [{ class: 'CONSTANT', type: 'VALUE_CONSTANT' }], from_table: { type: 'EMPTY' }, ...over } });
    expect(whereTreeProblem({ error: false, statements: [select({})] })).toBeNull();
    expect(whereTreeProblem({ error: false, statements: [select({}), select({})] })).toMatch(/more than one statement/);
    expect(whereTreeProblem({ error: false, statements: [select({ from_table: { type: 'TABLE_FUNCTION' } })] })).toMatch(/reads from a table/);
    expect(whereTreeProblem({ error: false, statements: [select({ select_list: [{ class: 'CONSTANT' }, { class: 'CONSTANT' }] })] })).toMatch(/not one expression/);
    expect(whereTreeProblem({ error: false, statements: [select({ modifiers: [{ type: 'LIMIT_MODIFIER' }] })] })).toMatch(/ORDER BY, LIMIT/);
  });
});

describe('printableWhere: a condition printed for another engine stays one expression', () => {
  it('accepts conditions with quoted strings and names, parentheses and doubled quotes', () => {
    for (const w of [`station <> 'S5'`, `(a = 'x;y' OR "b--c" = 'it''s')`, 'lower(`col`) LIKE \'%/*%\'']) expect(printableWhere(w)).toBe(w);
  });
  const refused: [string, RegExp][] = [
    [`true); DROP TABLE victim; SELECT (1`, /a ";" would end the query|without its/],
    [`a = 1) OR (b = 2`, /a "\)" without its "\("/],
    [`a = 1 -- rest`, /a comment/],
    [`a = 1 /* x */`, /a comment/],
    [`a = 'x\\'; DROP TABLE t; --'`, /a backslash/],
    [`a = $$x$$`, /"\$" outside quotes/],
    [`a = 'unterminated`, /never closed/],
    [`a = 1\nOR b = 2`, /line break or control character/],
    [`(a = 1`, /never closed/],
  ];
  for (const [w, why] of refused) {
    it(`refuses ${JSON.stringify(w)}`, () => {
      expect(() => printableWhere(w)).toThrow(why);
    });
  }
});

describe('tableRef: --table is a table name, nothing more', () => {
  it('accepts plain and quoted dotted names', () => {
    expect(tableRef('trino', 'lake.ml.preds')).toBe('lake.ml.preds');
    expect(tableRef('ansi', '"my schema"."pre""ds"')).toBe('"my schema"."pre""ds"');
    expect(tableRef('bigquery', '`my-proj.ds.preds`')).toBe('`my-proj.ds.preds`');
    expect(tableRef('bigquery', 'my-proj.ds.preds')).toBe('my-proj.ds.preds');
  });
  const refused: [string, string, RegExp][] = [
    ['trino', 'preds; DROP TABLE preds', /";" is not part of a name/],
    ['ansi', 'preds\nDROP TABLE victim;\n--', /line break or control character/],
    ['spark', 'preds --', /is not part of a name/],
    ['ansi', '"never closed', /never closed/],
    ['ansi', 'a.', /ends with a dot/],
    ['duckdb', "read_csv('/etc/passwd')", /"\(" is not part of a name/],
  ];
  for (const [d, t, why] of refused) {
    it(`refuses ${JSON.stringify(t)} (${d})`, () => {
      expect(() => tableRef(d as 'ansi', t)).toThrow(why);
    });
  }
});
