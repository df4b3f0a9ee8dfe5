/**
 * The annotator audit's SQL inside the cell query (cell-query.ts): per row, each annotator's label, how
 * many annotators agree with it, the row's majority-vote panel error and pairwise agreement; then their sums.
 */
import type { Dialect } from '../sql/dialect.js';

/** The audit's SQL for each level of the cell query. */
export interface AuditParts {
  /** per-row values: labels fg_a<j> and the true class fg_lab */
  readonly level1: string[];
  /** per-row values from level 1: agreement counts fg_c<j> and labels given fg_nlab */
  readonly level2: string[];
  /** the sums of the first GROUP BY, and their aliases in order */
  readonly sums: string[];
  readonly sumNames: string[];
}

/**
 * Per-row SQL for the annotator audit: labels a_j, agreement counts c_j, the row's panel error and sums.
 * @example
 * auditParts(dialect('duckdb'), ['inspector_a', 'inspector_b'], ['bridge', 'void'], 'TRIM(label)', (c) => `TRIM(${c})`);
 */
export function auditParts(
  d: Dialect,
  anns: readonly string[],
  classes: readonly string[],
  label: string,
  value: (col: string) => string,
): AuditParts {
  const a = anns.map((_, j) => `fg_a${j}`);
  const dbl = d.types.double;
  // a row without a true class (possible with an error column) cannot be scored: its labels are left out
  const level1 = [...anns.map((col, j) => `CASE WHEN ${label} IS NULL THEN NULL ELSE ${value(col)} END AS fg_a${j}`), `${label} AS fg_lab`];
  const level2 = [
    ...a.map((aj, j) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE ${a.map((ai) => `CASE WHEN ${ai} = ${aj} THEN 1 ELSE 0 END`).join(' + ')} END AS fg_c${j}`),
    `${a.map((aj) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE 1 END`).join(' + ')} AS fg_nlab`,
  ];
  const c = a.map((_, j) => `fg_c${j}`);
  const m = d.greatest(c);
  const top = (j: number) => `(${c[j]} = ${m} AND ${a[j]} IS NOT NULL)`;
  const topWrong = a.map((aj, j) => `CASE WHEN ${top(j)} AND ${aj} <> fg_lab THEN 1 ELSE 0 END`).join(' + ');
  const topAll = a.map((_, j) => `CASE WHEN ${top(j)} THEN 1 ELSE 0 END`).join(' + ');
  const panel = 'fg_nlab >= 2';
  const sums: string[] = [];
  const sumNames: string[] = [];
  const add = (expr: string, name: string) => {
    sums.push(`${expr} AS ${name}`);
    sumNames.push(name);
  };
  add(`SUM(CASE WHEN fg_nlab >= 1 THEN 1 ELSE 0 END)`, 'fg_x_audited');
  add(`SUM(CASE WHEN ${panel} THEN 1 ELSE 0 END)`, 'fg_x_panel_rows');
  // majority vote: among the k labels tied for most votes, the share that is wrong
  add(`COALESCE(SUM(CASE WHEN ${panel} THEN CAST(${topWrong} AS ${dbl}) / (${topAll}) END), 0)`, 'fg_x_panel_errors');
  // pairwise agreement of the row: Σ_j (c_j − 1) / (n (n − 1)) = Σ_c n_c (n_c − 1) / (n (n − 1))
  add(
    `COALESCE(SUM(CASE WHEN ${panel} THEN CAST(${a.map((aj, j) => `CASE WHEN ${aj} IS NULL THEN 0 ELSE ${c[j]} - 1 END`).join(' + ')} AS ${dbl}) / (fg_nlab * (fg_nlab - 1)) END), 0)`,
    'fg_x_agree_sum',
  );
  a.forEach((aj, j) => {
    add(`SUM(CASE WHEN ${aj} IS NULL THEN 0 ELSE 1 END)`, `fg_x_r${j}`);
    add(`SUM(CASE WHEN ${aj} IS NOT NULL AND ${aj} IS DISTINCT FROM fg_lab THEN 1 ELSE 0 END)`, `fg_x_e${j}`);
    classes.forEach((cls, k) => add(`SUM(CASE WHEN ${panel} AND ${aj} = ${d.str(cls)} THEN 1 ELSE 0 END)`, `fg_x_c${j}_${k}`));
    add(
      `SUM(CASE WHEN ${panel} AND ${aj} IS NOT NULL${classes.length ? ` AND ${aj} NOT IN (${classes.map(d.str).join(', ')})` : ''} THEN 1 ELSE 0 END)`,
      `fg_x_c${j}_${classes.length}`,
    );
  });
  return { level1, level2, sums, sumNames };
}
