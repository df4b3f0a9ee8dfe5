/**
 * The cells cache: a second report on an unchanged file reads its cells from the user's cache folder
 * instead of scanning the rows again. An entry is found by a key made of floorgap's version and build, every
 * input's path, size, modification time and a SHA-256 of its first and last MB, and every option that
 * shapes the cells (column roles, --where, --by, slice columns, bins, --max-cells, floors, annotators,
 * the floor and cost tables' whole content). A changed file changes its key; nothing is reused then.
 *
 * Entry format: `FGCELLS3\n`, the SHA-256 of everything after it (32 bytes), a 4-byte little-endian
 * header length, the header (JSON: what was loaded besides the cells, and where each array sits), then
 * the cells' typed arrays, 8-byte aligned. An entry whose checksum does not match (a disk error, a copy
 * cut short, an edit) is removed and the rows are scanned again.
 */
import { createHash, randomBytes } from 'node:crypto';
import { promises as fs, statSync } from 'node:fs';
import { homedir } from 'node:os';
import { isAbsolute, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { auditFieldCount, cellColumns, cellTable, SUM_COLUMNS, type AuditShape, type SumColumn } from './cell-table.js';
import type { Loaded } from './load.js';
import type { LoadOptions } from './plan.js';
import { releaseTemp, trackTemp } from '../output/temp-files.js';
import { checkDestination, moveInto } from '../output/write-atomic.js';

const MAGIC = 'FGCELLS3\n';
/** SHA-256 of everything after it, right after the magic: a damaged or cut entry is never trusted. */
const SUM = 32;
/** Change when the entry layout or the meaning of a cached field changes. */
const FORMAT = 3;
/** Entries kept; the least recently used beyond this are removed. */
const MAX_ENTRIES = 32;
/** Total size kept (bytes). */
const MAX_BYTES = 512 * 1024 * 1024;
const EDGE = 1024 * 1024;

/**
 * The folder holding cached cells: `$XDG_CACHE_HOME/floorgap/cells`, else `~/.cache/floorgap/cells`.
 * @example
 * cacheDir({ XDG_CACHE_HOME: '/tmp/c' }); // => '/tmp/c/floorgap/cells'
 */
export function cacheDir(env: Readonly<Record<string, string | undefined>>): string {
  const xdg = env.XDG_CACHE_HOME;
  const base = xdg && isAbsolute(xdg) ? xdg : join(env.HOME || homedir(), '.cache');
  return join(base, 'floorgap', 'cells');
}

/** SHA-256 of a file's first and last MB (the whole file when it is at most 2 MB), with its size and time. */
async function fileStamp(path: string, cwd: string): Promise<Record<string, unknown> | null> {
  const abs = resolve(cwd, path);
  let handle: fs.FileHandle | null = null;
  try {
    const s = await fs.stat(abs);
    if (!s.isFile()) return null;
    handle = await fs.open(abs, 'r');
    const hash = createHash('sha256');
    const read = async (at: number, n: number) => {
      const buf = Buffer.alloc(n);
      const { bytesRead } = await handle!.read(buf, 0, n, at);
      hash.update(buf.subarray(0, bytesRead));
    };
    if (s.size <= 2 * EDGE) await read(0, s.size);
    else {
      await read(0, EDGE);
      await read(s.size - EDGE, EDGE);
    }
    return { path, abs, bytes: s.size, mtime: s.mtimeMs, edges: hash.digest('hex') };
  } catch {
    return null;
  } finally {
    await handle?.close();
  }
}

/** SHA-256 of a whole (small) file, or null when it cannot be read. */
async function contentHash(path: string, cwd: string): Promise<string | null> {
  try {
    return createHash('sha256').update(await fs.readFile(resolve(cwd, path))).digest('hex');
  } catch {
    return null;
  }
}

/**
 * The cache key of a load, or null when an input cannot be read (the load then reports the problem).
 * @param version floorgap's version (a new version never reads an older one's cells)
 */
export async function cacheKey(options: LoadOptions, version: string, cwd: string): Promise<string | null> {
  const inputs: unknown[] = [];
  for (const f of options.source.files) {
    const stamp = await fileStamp(f, cwd);
    if (!stamp) return null;
    inputs.push(stamp);
  }
  for (const [split, f] of Object.entries(options.source.perSplit)) {
    if (!f) continue;
    const stamp = await fileStamp(f, cwd);
    if (!stamp) return null;
    inputs.push({ split, ...stamp });
  }
  const tables: Record<string, string | null> = {};
  for (const [name, path] of [['floorTable', options.floorTable], ['costTable', options.costTable ?? null]] as const) {
    if (!path) continue;
    const h = await contentHash(path, cwd);
    if (h === null) return null;
    tables[name] = h;
  }
  const shape = {
    format: FORMAT,
    version,
    build: buildStamp(),
    inputs,
    union: options.source.union === true,
    tables,
    roles: options.roles,
    where: options.where,
    by: options.by,
    sliceCols: options.sliceCols,
    bins: options.bins,
    binMethod: options.binMethod ?? 'quantile',
    maxCells: options.maxCells,
    maxSlices: options.maxSlices ?? null,
    floor: options.floor,
    floorTable: options.floorTable,
    costTable: options.costTable ?? null,
    annotators: options.annotators ?? null,
  };
  return createHash('sha256').update(JSON.stringify(shape)).digest('hex');
}

/**
 * When this copy of floorgap was built (the time of this module's file): a rebuilt floorgap of the same
 * version, e.g. while developing it, never reads cells an older build made.
 */
function buildStamp(): number {
  try {
    return statSync(fileURLToPath(import.meta.url)).mtimeMs;
  } catch {
    return 0;
  }
}

type Typed = Int32Array | Float64Array;

interface Header {
  readonly format: number;
  readonly key: string;
  readonly meta: Omit<Loaded, 'table'>;
  readonly table: { size: number; columns: string[]; dicts: string[][]; runs: string[]; audit: AuditShape | null };
  readonly arrays: { name: string; kind: 'i32' | 'f64'; offset: number; length: number }[];
}

/** JSON keeps a Map (the column kinds of a Parquet source) as a Map, not as `{}`. */
function replacer(_key: string, value: unknown): unknown {
  return value instanceof Map ? { __map: [...value.entries()] } : value;
}

function reviver(_key: string, value: unknown): unknown {
  return value && typeof value === 'object' && '__map' in value && Array.isArray((value as { __map: unknown }).__map)
    ? new Map((value as { __map: [unknown, unknown][] }).__map)
    : value;
}

/** Serialises a load (its metadata and its cell table). */
export function encodeEntry(key: string, loaded: Loaded): Buffer {
  const c = cellColumns(loaded.table);
  const named: [string, Typed][] = [
    ['split', c.split],
    ['run', c.run],
    ...SUM_COLUMNS.map((n) => [n, c.sums[n]] as [string, Typed]),
    ['floorEntry', c.floorEntry],
    ['floorN', c.floorN],
    ...c.codes.map((a, i) => [`code${i}`, a] as [string, Typed]),
    ...(c.audit?.fields ?? []).map((f, i) => [`audit${i}`, f] as [string, Typed]),
  ];
  const arrays: Header['arrays'] = [];
  let offset = 0;
  for (const [name, a] of named) {
    arrays.push({ name, kind: a instanceof Int32Array ? 'i32' : 'f64', offset, length: a.length });
    offset += Math.ceil(a.byteLength / 8) * 8;
  }
  const { table, ...meta } = loaded;
  const header: Header = {
    format: FORMAT,
    key,
    meta,
    table: { size: table.size, columns: [...table.columns], dicts: table.dicts.map((d) => [...d]), runs: [...table.runs], audit: table.audit },
    arrays,
  };
  const json = Buffer.from(JSON.stringify(header, replacer), 'utf8');
  const body = MAGIC.length + SUM;
  const start = Math.ceil((body + 4 + json.length) / 8) * 8;
  const out = Buffer.alloc(start + offset);
  out.write(MAGIC, 0, 'latin1');
  out.writeUInt32LE(json.length, body);
  json.copy(out, body + 4);
  for (let i = 0; i < named.length; i++) {
    const a = named[i][1];
    Buffer.from(a.buffer, a.byteOffset, a.byteLength).copy(out, start + arrays[i].offset);
  }
  createHash('sha256').update(out.subarray(body)).digest().copy(out, MAGIC.length);
  return out;
}

/**
 * The inverse of {@link encodeEntry}; null when the bytes are not an entry for `key`.
 * @throws when the checksum does not match or the entry is cut short
 */
export function decodeEntry(buf: Buffer, key: string): Loaded | null {
  const body = MAGIC.length + SUM;
  if (buf.length < body + 4 || buf.toString('latin1', 0, MAGIC.length) !== MAGIC) return null;
  const sum = createHash('sha256').update(buf.subarray(body)).digest();
  if (!sum.equals(buf.subarray(MAGIC.length, body))) throw new Error('cache entry is damaged (checksum)');
  const len = buf.readUInt32LE(body);
  const header = JSON.parse(buf.toString('utf8', body + 4, body + 4 + len), reviver) as Header;
  if (header.format !== FORMAT || header.key !== key) return null;
  const start = Math.ceil((body + 4 + len) / 8) * 8;
  const get = <T extends Typed>(name: string): T => {
    const spec = header.arrays.find((a) => a.name === name);
    if (!spec) throw new Error(`cache entry lacks ${name}`);
    const bytes = spec.length * (spec.kind === 'i32' ? 4 : 8);
    const from = start + spec.offset;
    if (from + bytes > buf.length) throw new Error('cache entry is truncated');
    // copy into a fresh, aligned buffer
    const copy = new Uint8Array(bytes);
    copy.set(buf.subarray(from, from + bytes));
    return (spec.kind === 'i32' ? new Int32Array(copy.buffer) : new Float64Array(copy.buffer)) as T;
  };
  const t = header.table;
  const table = cellTable({
    columns: t.columns,
    dicts: t.dicts,
    runs: t.runs,
    codes: t.columns.map((_, i) => get<Int32Array>(`code${i}`)),
    split: get<Int32Array>('split'),
    run: get<Int32Array>('run'),
    sums: Object.fromEntries(SUM_COLUMNS.map((n) => [n, get<Float64Array>(n)])) as Record<SumColumn, Float64Array>,
    floorEntry: get<Int32Array>('floorEntry'),
    floorN: get<Float64Array>('floorN'),
    audit: t.audit ? { ...t.audit, fields: Array.from({ length: auditFieldCount(t.audit.annotators, t.audit.classes) }, (_, i) => get<Float64Array>(`audit${i}`)) } : null,
  });
  return { ...header.meta, table };
}

/** The cached load for `key`, or null (a damaged entry is removed). */
export async function readCache(dir: string, key: string): Promise<Loaded | null> {
  const path = join(dir, `${key}.fgcells`);
  let buf: Buffer;
  try {
    // only a regular file is an entry (reading a named pipe would wait for a writer forever)
    if (!(await fs.lstat(path)).isFile()) return null;
    buf = await fs.readFile(path);
  } catch {
    return null;
  }
  try {
    const entry = decodeEntry(buf, key);
    if (entry) {
      // the entry's time says when it was last used, for eviction
      const now = new Date();
      await fs.utimes(path, now, now).catch(() => undefined);
    }
    return entry;
  } catch {
    await fs.rm(path, { force: true }).catch(() => undefined);
    return null;
  }
}

/**
 * Stores a load under `key` (atomically: a temporary file renamed into place), then trims the cache
 * to its limits. Failures are ignored: the cache only saves time.
 */
export async function writeCache(dir: string, key: string, loaded: Loaded): Promise<void> {
  let tmp: string | null = null;
  try {
    await fs.mkdir(dir, { recursive: true });
    const path = join(dir, `${key}.fgcells`);
    tmp = trackTemp(join(dir, `.${key}.tmp-${process.pid}-${randomBytes(4).toString('hex')}`));
    await checkDestination(path, { overwrite: true }); // a regular file or nothing; else the entry is not written
    await fs.writeFile(tmp, encodeEntry(key, loaded));
    await moveInto(tmp, await checkDestination(path, { overwrite: true }));
    releaseTemp(tmp);
    await trim(dir);
  } catch {
    if (tmp) await fs.rm(tmp, { force: true }).catch(() => undefined);
    // a read-only or full disk only costs the next report a scan
  }
}

async function trim(dir: string): Promise<void> {
  const names = (await fs.readdir(dir)).filter((n) => n.endsWith('.fgcells'));
  const entries = await Promise.all(
    names.map(async (n) => {
      const s = await fs.stat(join(dir, n)).catch(() => null);
      return s ? { path: join(dir, n), size: s.size, time: s.mtimeMs } : null;
    }),
  );
  const live = entries.filter((e): e is NonNullable<typeof e> => e !== null).sort((a, b) => b.time - a.time);
  let total = 0;
  for (const [i, e] of live.entries()) {
    total += e.size;
    if (i >= MAX_ENTRIES || total > MAX_BYTES) await fs.rm(e.path, { force: true }).catch(() => undefined);
  }
}
