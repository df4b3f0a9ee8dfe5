/** Quotes an SQL identifier (column name) for DuckDB and ANSI SQL. */
export function ident(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

/** Quotes an SQL string literal. */
export function literal(value: string): string {
  return `'${value.replace(/'/g, "''")}'`;
}

/** A number as an SQL literal that round-trips exactly. */
export function numberLiteral(value: number): string {
  if (!Number.isFinite(value)) throw new RangeError(`not a finite number: ${value}`);
  return Number.isInteger(value) ? `${value}` : `${value}::DOUBLE`;
}
