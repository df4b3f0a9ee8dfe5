/** Quotes an SQL identifier (column name) for DuckDB and ANSI SQL. */
export function ident(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

/** Quotes an SQL string literal. */
export function literal(value: string): string {
  return `'${value.replace(/'/g, "''")}'`;
}
