import type { DuckDBConnection } from '@duckdb/node-api';
import { cpus } from 'node:os';

/** Resource settings for the embedded scan engine. */
export interface DuckSettings {
  /** worker threads; default min(2, cores) for a shared training box */
  readonly threads?: number;
  /** DuckDB memory limit, e.g. "2GB" */
  readonly memoryLimit?: string;
}

export const DEFAULT_THREADS = Math.max(1, Math.min(2, cpus().length));
export const DEFAULT_MEMORY_LIMIT = '2GB';

/** An open in-process DuckDB database with helpers that return plain JS values (BIGINT → number). */
export interface Duck {
  readonly connection: DuckDBConnection;
  /** runs a query and returns its rows as objects; BIGINT and HUGEINT become numbers */
  all(sql: string): Promise<Record<string, unknown>[]>;
  run(sql: string): Promise<void>;
  close(): void;
}

/** Connections of every open database, so that an interrupted run can stop their queries. */
const open = new Set<DuckDBConnection>();

/**
 * Stops the running query of every open database (each fails with an "interrupted" error). For the
 * CLI's signal handling: the process can then exit without waiting for a long scan or export.
 */
export function interruptAll(): void {
  for (const c of open) {
    try {
      c.interrupt();
    } catch {
      // a connection that is closing
    }
  }
}

function plain(value: unknown): unknown {
  if (typeof value === 'bigint') return Number(value);
  return value;
}

/**
 * Opens an in-memory DuckDB with explicit `threads` and `memory_limit`.
 * @example
 * const duck = await openDuck({ threads: 2, memoryLimit: '1GB' });
 * await duck.all('select 1 as one'); // => [{ one: 1 }]
 */
export async function openDuck(settings: DuckSettings = {}): Promise<Duck> {
  const threads = settings.threads ?? DEFAULT_THREADS;
  const memoryLimit = settings.memoryLimit ?? DEFAULT_MEMORY_LIMIT;
  // loaded on first use: a report served from the cache never loads the engine
  const { DuckDBInstance } = await import('@duckdb/node-api');
  const instance = await DuckDBInstance.create(':memory:', {
    threads: String(threads),
    memory_limit: memoryLimit,
  });
  const connection = await instance.connect();
  open.add(connection);
  // track progress from the start, for watchProgress, without DuckDB printing a bar of its own
  await connection.run('SET enable_progress_bar = true');
  await connection.run('SET enable_progress_bar_print = false');
  await connection.run('SET progress_bar_time = 0');
  return {
    connection,
    async all(sql: string) {
      const reader = await connection.runAndReadAll(sql);
      const names = reader.columnNames();
      const rows = reader.getRows();
      return rows.map((row) => {
        const out: Record<string, unknown> = {};
        for (let i = 0; i < names.length; i++) out[names[i]] = plain(row[i]);
        return out;
      });
    },
    async run(sql: string) {
      await connection.run(sql);
    },
    close() {
      open.delete(connection);
      connection.closeSync();
      instance.closeSync();
    },
  };
}
