/**
 * `--where`: a row filter the user writes in SQL. It is accepted only as ONE boolean expression over the
 * input's columns, built from an allow-list of expression kinds and scalar functions: no subquery, no
 * table function, no second statement, no access to files or settings. The check does not trust the
 * text: DuckDB's own parser turns `SELECT (<where>)` into a syntax tree (`json_serialize_sql`), the tree
 * is checked node by node here, and what runs afterwards is the text DuckDB prints back from that tree
 * (`json_deserialize_sql`), never the user's text. A naive wrap is not enough: `true); SELECT (1` parses
 * as two statements, and `1) FROM read_csv('/etc/passwd') --` as one SELECT with a table function in
 * its FROM; both are refused here.
 */
import type { Duck } from './duck.js';
import { literal } from './quote.js';
import { error } from '../core/errors.js';

/** Expression kinds (the serialised tree's `class`) a condition may use. */
const CLASSES = new Set(['BETWEEN', 'CASE', 'CAST', 'COLLATE', 'COLUMN_REF', 'COMPARISON', 'CONJUNCTION', 'CONSTANT', 'FUNCTION', 'OPERATOR']);

/** OPERATOR types a condition may use (not: ARRAY_EXTRACT, STRUCT_EXTRACT and the like). */
const OPERATORS = new Set(['OPERATOR_NOT', 'OPERATOR_IS_NULL', 'OPERATOR_IS_NOT_NULL', 'COMPARE_IN', 'COMPARE_NOT_IN', 'OPERATOR_COALESCE', 'OPERATOR_NULLIF']);

/**
 * Scalar functions and operators a condition may call: comparisons of text and numbers, string tests,
 * arithmetic, rounding, dates. Nothing that reads files, settings or the environment, and no aggregate.
 */
const WHERE_FUNCTIONS: ReadonlySet<string> = new Set([
  // operators DuckDB's parser turns into functions
  '+', '-', '*', '/', '//', '%', '^', '**', '||',
  '~~', '!~~', '~~*', '!~~*', '~~~', '!~~~', 'like_escape', 'not_like_escape', 'ilike_escape', 'not_ilike_escape',
  'regexp_matches', 'regexp_full_match',
  // text
  'lower', 'upper', 'lcase', 'ucase', 'trim', 'ltrim', 'rtrim', 'length', 'strlen', 'substr', 'substring', 'left', 'right',
  'replace', 'concat', 'starts_with', 'ends_with', 'prefix', 'suffix', 'contains', 'strpos', 'instr', 'position', 'lpad', 'rpad',
  'nullif', 'ifnull',
  // numbers
  'abs', 'round', 'floor', 'ceil', 'ceiling', 'sqrt', 'ln', 'log', 'log2', 'log10', 'exp', 'pow', 'power', 'sign',
  'least', 'greatest', 'isnan', 'isinf', 'isfinite',
  // dates and times
  'strptime', 'try_strptime', 'date_part', 'datepart', 'date_trunc', 'datetrunc', 'year', 'month', 'day', 'hour', 'minute',
  'dayofweek', 'dayofyear', 'week', 'quarter', 'epoch',
]);

type Node = Record<string, unknown>;

function parsedJson(text: string): Node {
  try {
    return JSON.parse(text) as Node;
  } catch (e) {
    throw new Error(`--where: the parser's tree is not JSON (${(e as Error).message})`);
  }
}

/** Why the tree of `SELECT (<where>)` is not one plain condition, or null when it is. */
export function whereTreeProblem(tree: Node): string | null {
  if (tree.error) {
    const why = String(tree.error_message ?? 'a syntax error');
    // a second statement that is not a SELECT (COPY, ATTACH, SET …) cannot be serialised at all
    return /Only SELECT statements/i.test(why) ? 'it holds more than one statement (a ";" or an unbalanced parenthesis)' : why;
  }
  const statements = tree.statements as Node[] | undefined;
  if (!Array.isArray(statements) || statements.length !== 1) return 'it holds more than one statement (a ";" or an unbalanced parenthesis)';
  const node = statements[0].node as Node | undefined;
  if (!node || node.type !== 'SELECT_NODE') return 'it is not one expression';
  const from = node.from_table as Node | undefined;
  if (!from || from.type !== 'EMPTY') return 'it reads from a table or a table function (a parenthesis closed early?)';
  const list = node.select_list as Node[] | undefined;
  if (!Array.isArray(list) || list.length !== 1) return 'it is not one expression (a comma outside parentheses?)';
  const empty = (v: unknown) => v === null || v === undefined || (Array.isArray(v) && v.length === 0);
  if (!empty(node.where_clause) || !empty(node.group_expressions) || !empty(node.group_sets) || !empty(node.having) || !empty(node.qualify) || !empty(node.sample)) {
    return 'it is more than an expression (WHERE, GROUP BY, HAVING, QUALIFY or SAMPLE)';
  }
  if (!empty(node.modifiers)) return 'it is more than an expression (ORDER BY, LIMIT or DISTINCT)';
  const ctes = (node.cte_map as Node | undefined)?.map;
  if (!empty(ctes)) return 'it holds a WITH clause';
  return expressionProblem(list[0]);
}

function expressionProblem(root: unknown): string | null {
  const stack: unknown[] = [root];
  while (stack.length > 0) {
    const v = stack.pop();
    if (Array.isArray(v)) {
      stack.push(...v);
      continue;
    }
    if (v === null || typeof v !== 'object') continue;
    const n = v as Node;
    if ('subquery' in n || n.type === 'SELECT_NODE' || n.type === 'SET_OPERATION_NODE' || n.type === 'CTE_NODE' || n.type === 'RECURSIVE_CTE_NODE') {
      return 'it holds a subquery; a condition may only compare the row\'s own columns';
    }
    if (typeof n.class === 'string') {
      const cls = n.class;
      if (!CLASSES.has(cls)) {
        const what: Record<string, string> = {
          SUBQUERY: 'a subquery',
          WINDOW: 'a window function',
          STAR: 'a *',
          PARAMETER: 'a parameter',
          LAMBDA: 'a lambda',
          POSITIONAL_REFERENCE: 'a positional reference',
        };
        return `it uses ${what[cls] ?? `an expression of kind ${cls.toLowerCase()}`}, which a condition may not`;
      }
      if (cls === 'OPERATOR' && !OPERATORS.has(String(n.type))) return `it uses the operator ${String(n.type).toLowerCase()}, which a condition may not`;
      if (cls === 'COLUMN_REF') {
        const names = n.column_names as unknown[];
        if (!Array.isArray(names) || names.length !== 1) return `it names ${Array.isArray(names) ? names.join('.') : 'a column'} with a qualifier; name the column alone`;
      }
      if (cls === 'FUNCTION') {
        const name = String(n.function_name ?? '').toLowerCase();
        const schema = String(n.schema ?? '');
        const catalog = String(n.catalog ?? '');
        if ((schema !== '' && schema !== 'main') || catalog !== '' || !WHERE_FUNCTIONS.has(name)) {
          return `it calls ${name}(), which a condition may not (allowed: comparisons, AND/OR/NOT, IN, BETWEEN, LIKE, CASE, casts, arithmetic and scalar functions such as lower, trim, length, abs, round, regexp_matches, strptime)`;
        }
        const orders = (n.order_bys as Node | undefined)?.orders;
        if (n.distinct || (n.filter !== null && n.filter !== undefined) || (Array.isArray(orders) && orders.length > 0) || n.export_state) {
          return `it calls ${name}() with DISTINCT, FILTER or ORDER BY, which a condition may not`;
        }
      }
    }
    for (const child of Object.values(n)) if (child !== null && typeof child === 'object') stack.push(child);
  }
  return null;
}

async function serialize(duck: Duck, expression: string): Promise<string> {
  const [row] = await duck.all(`SELECT json_serialize_sql(${literal(`SELECT (${expression})`)}) AS j`);
  return String(row.j);
}

/**
 * Checks a `--where` expression and returns the text that runs in its place: DuckDB's own rendering of
 * the checked tree, in parentheses. Null stays null.
 * @throws FloorgapError naming what is not allowed
 * @example
 * await safeWhere(duck, "station <> 'S5'"); // => "(station != 'S5')"
 * await safeWhere(duck, "true); COPY (SELECT 42) TO 'x.csv'; SELECT (1"); // throws: more than one statement
 */
export async function safeWhere(duck: Duck, where: string | null): Promise<string | null> {
  if (where === null) return null;
  const shown = `--where "${where}"`;
  if (where.trim() === '') throw error(`${shown}: expected a condition, e.g. --where "station <> 'S5'"`);
  if (where.length > 100_000) throw error(`--where: the condition is ${where.length.toLocaleString('en-US')} characters long; expected at most 100,000`);
  const refuse = (why: string) => error(`${shown}: not accepted: ${why}; expected one condition on the columns, e.g. station <> 'S5'`);
  const json = await serialize(duck, where);
  const problem = whereTreeProblem(parsedJson(json));
  if (problem) throw refuse(problem);
  let text: string;
  try {
    const [row] = await duck.all(`SELECT json_deserialize_sql(${literal(json)}) AS s`);
    text = String(row.s);
  } catch (e) {
    // e.g. a number literal out of range, which the tree cannot carry back
    throw refuse(`DuckDB cannot write the condition back (${e instanceof Error ? e.message.split('\n')[0] : String(e)})`);
  }
  if (!text.startsWith('SELECT ')) throw refuse('it is not one expression');
  const expression = `(${text.slice('SELECT '.length)})`;
  // the text that runs passes the same check
  const again = whereTreeProblem(parsedJson(await serialize(duck, expression)));
  if (again) throw refuse(again);
  return expression;
}

/**
 * A `--where` that goes into a query printed for another engine (`floorgap sql --dialect …`), which
 * DuckDB's parser need not understand: checked by its characters instead, conservatively, so that every
 * engine reads it as one expression inside `WHERE (…)` and the printed text stays one statement. Quoted
 * strings and names ('…', "…", `…`, a doubled quote inside) are skipped as units; outside them there may
 * be no `;`, comment, `$` (dollar quoting) or unbalanced parenthesis. No backslash anywhere (engines
 * disagree on whether it escapes a quote) and no line break or control character.
 * @example
 * printableWhere("station <> 'S5'"); // => "station <> 'S5'"
 */
export function printableWhere(where: string): string {
  const shown = `--where "${where}"`;
  const refuse = (why: string) => error(`${shown}: not accepted in a printed query: ${why}; expected one condition on one line, e.g. station <> 'S5'`);
  if (where.trim() === '') throw error(`${shown}: expected a condition, e.g. --where "station <> 'S5'"`);
  if (/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/.test(where)) throw refuse('a line break or control character');
  if (where.includes('\\')) throw refuse('a backslash (engines disagree on what it escapes)');
  let depth = 0;
  for (let i = 0; i < where.length; i++) {
    const c = where[i];
    if (c === "'" || c === '"' || c === '`') {
      const end = closingQuote(where, i);
      if (end < 0) throw refuse(`a quote ${c} that is never closed`);
      i = end;
      continue;
    }
    if (c === ';') throw refuse('a ";" would end the query');
    if ((c === '-' && where[i + 1] === '-') || (c === '/' && where[i + 1] === '*') || c === '#') throw refuse('a comment');
    if (c === '$') throw refuse('a "$" outside quotes');
    if (c === '(') depth++;
    if (c === ')' && --depth < 0) throw refuse('a ")" without its "("');
  }
  if (depth !== 0) throw refuse('a "(" that is never closed');
  return where;
}

/** The index of the quote that closes the one at `start` (a doubled quote stays inside), or -1. */
function closingQuote(text: string, start: number): number {
  const q = text[start];
  for (let i = start + 1; i < text.length; i++) {
    if (text[i] !== q) continue;
    if (text[i + 1] === q) {
      i++;
      continue;
    }
    return i;
  }
  return -1;
}
