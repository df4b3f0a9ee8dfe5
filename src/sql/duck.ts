import type { DuckDBConnection } from '@duckdb/node-api';
import { resolve } from 'node:path';
import { DEFAULTS } from '../core/defaults.js';

/** Resource settings for the embedded scan engine. */
export interface DuckSettings {
  /** worker threads; default min(2, cores) for a shared training box */
  readonly threads?: number;
  /** DuckDB memory limit, e.g. "2GB" */
  readonly memoryLimit?: string;
}

/**
 * The files a locked engine may touch: the exact paths a command reads (its inputs, floor and cost
 * tables, cells files, a baseline) and the exact temporary files it writes (never a folder: the working
 * folder may hold `.git/hooks`). Everything else — other files, folders, the network, extensions,
 * environment variables, settings — is refused by the engine itself once it is open.
 */
export interface EngineAccess {
  readonly read: readonly string[];
  readonly write: readonly string[];
  /** an empty folder of the caller's own where the engine spills what does not fit in memory */
  readonly spill: string;
}
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

function listLiteral(paths: readonly string[]): string {
  return `[${paths.map((p) => `'${p.replace(/'/g, "''")}'`).join(', ')}]`;
}

/**
 * Opens an in-memory DuckDB with explicit `threads` and `memory_limit`. With `access`, the engine is
 * locked before it is returned: it may read and write only the files listed there and spill only to the
 * folder named there, it has no other file, network or extension access, and no
 * setting can be changed any more (`lock_configuration`). Every command of the CLI opens its engine
 * locked; tests of the engine's functions may open it unlocked.
 * @example
 * const duck = await openDuck({ threads: 2, memoryLimit: '1GB' }, { read: ['preds.csv'], write: [], spill: '/tmp/floorgap-spill-x' });
 * await duck.all('select 1 as one'); // => [{ one: 1 }]
 * await duck.all("select * from read_csv('/etc/passwd')"); // throws: file system operations are disabled
 */
export async function openDuck(settings: DuckSettings = {}, access?: EngineAccess): Promise<Duck> {
  const threads = settings.threads ?? DEFAULTS.threads;
  const memoryLimit = settings.memoryLimit ?? DEFAULTS.memoryLimit;
  // loaded on first use: a report served from the cache never loads the engine
  const { DuckDBInstance } = await import('@duckdb/node-api');
  const instance = await DuckDBInstance.create(':memory:', {
    threads: String(threads),
    memory_limit: memoryLimit,
    ...(access ? { temp_directory: access.spill } : {}),
  });
  const connection = await instance.connect();
  // track progress from the start, for watchProgress, without DuckDB printing a bar of its own
  await connection.run('SET enable_progress_bar = true');
  await connection.run('SET enable_progress_bar_print = false');
  await connection.run('SET progress_bar_time = 0');
  if (access) {
    const files = [...new Set([...access.read, ...access.write].map((p) => resolve(p)))];
    await connection.run(`SET allowed_paths = ${listLiteral(files)}`);
    await connection.run(`SET allowed_directories = ${listLiteral([`${resolve(access.spill)}/`])}`);
    await connection.run('SET enable_external_access = false');
    await connection.run('SET lock_configuration = true');
  }
  open.add(connection);
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
