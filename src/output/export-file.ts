/**
 * Writing exported rows: DuckDB streams the query into a temporary file beside the destination
 * (`COPY (…) TO`), the manifest is written to a second temporary file, and both are renamed into place
 * only when complete. On any failure both temporaries are removed and files already at the destination
 * are left untouched.
 */
import { createHash } from 'node:crypto';
import { createReadStream, promises as fs } from 'node:fs';
import { extname } from 'node:path';
import type { Duck } from '../sql/duck.js';
import { literal } from '../sql/quote.js';
import { error } from '../core/errors.js';
import { checkDestination, moveInto, tempPathFor, writeError, type Destination } from './write-atomic.js';

/** File formats `floorgap export` writes. */
export type ExportFormat = 'csv' | 'jsonl' | 'parquet';

const EXTENSIONS: Record<string, ExportFormat> = {
  '.csv': 'csv',
  '.jsonl': 'jsonl',
  '.ndjson': 'jsonl',
  '.parquet': 'parquet',
  '.pq': 'parquet',
};

/**
 * The format of an export file, from its extension: `.csv` → CSV, `.jsonl`/`.ndjson` → JSON Lines,
 * `.parquet`/`.pq` → Parquet, anything else (or none) → CSV. `.json` is refused, because the file holds
 * one object a line rather than one JSON document.
 * @param path the destination
 * @returns the format
 * @throws FloorgapError for `.json` and compressed extensions
 * @example
 * exportFormatFor('rows.ndjson'); // => 'jsonl'
 */
export function exportFormatFor(path: string): ExportFormat {
  const ext = extname(path).toLowerCase();
  if (ext === '.json') throw error(`${path}: export writes JSON Lines (one object a line); name the file .jsonl or .ndjson`);
  if (ext === '.gz' || ext === '.gzip' || ext === '.zst') throw error(`${path}: export does not compress; name the file .csv, .jsonl or .parquet`);
  return EXTENSIONS[ext] ?? 'csv';
}

/** The manifest path of an export file: `F.manifest.json` beside it. */
export function manifestPathFor(path: string): string {
  return `${path}.manifest.json`;
}

/**
 * Checks that an export can go to `path`: its folder exists, and the file and its manifest are absent,
 * or regular files that `force` allows replacing (see {@link checkDestination}: a link, a pipe, a device
 * or a folder is never replaced).
 * @param path the destination
 * @param force allow replacing existing files
 * @returns the two destinations (rows, manifest), with the modes their replacements keep
 * @throws FloorgapError naming the folder or the file in the way, and the fix
 * @example
 * await checkOutput('out/rows.csv', false);
 */
export async function checkOutput(path: string, force: boolean): Promise<{ data: Destination; manifest: Destination }> {
  const folderHint = `--out needs a file name, e.g. ${path.replace(/\/+$/, '')}/rows.csv`;
  const data = await checkDestination(path, { overwrite: force, folderHint });
  const manifest = await checkDestination(manifestPathFor(path), { overwrite: force });
  return { data, manifest };
}

/**
 * The SHA-256 of a file's bytes, read as a stream (constant memory).
 * @param path the file
 * @returns the hex digest
 * @example
 * await sha256File('preds.csv'); // => 'e3b0c442…'
 */
export function sha256File(path: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    const stream = createReadStream(path);
    stream.on('data', (chunk) => hash.update(chunk));
    stream.on('error', reject);
    stream.on('end', () => resolve(hash.digest('hex')));
  });
}

/** What the manifest records of a file the export read. */
export interface FileFingerprint {
  readonly path: string;
  readonly bytes: number;
  readonly modified: string;
  readonly sha256: string;
}

/**
 * Path, size, modification time (ISO 8601) and SHA-256 of a file.
 * @param path the file
 * @example
 * await fingerprint('preds.csv'); // => { path: 'preds.csv', bytes: 1234, modified: '2025-…Z', sha256: '…' }
 */
export async function fingerprint(path: string): Promise<FileFingerprint> {
  const s = await fs.stat(path);
  return { path, bytes: s.size, modified: s.mtime.toISOString(), sha256: await sha256File(path) };
}

/** The COPY options of each format. */
function copyOptions(format: ExportFormat): string {
  if (format === 'csv') return 'FORMAT csv, HEADER true';
  if (format === 'jsonl') return 'FORMAT json';
  return 'FORMAT parquet';
}

/**
 * Points in the writing sequence where a caller can run code, e.g. to observe the temporary files or
 * to make a step fail in a test. A hook that throws aborts the export like any other failure.
 */
export interface ExportHooks {
  /** after DuckDB has written the rows to the temporary data file, before the manifest is written */
  readonly afterData?: (tempData: string) => void | Promise<void>;
  /** after the manifest's temporary file is written, before anything is renamed */
  readonly beforeRename?: (tempData: string, tempManifest: string) => void | Promise<void>;
}

/** What {@link writeExport} needs. */
export interface ExportWrite {
  /** destination of the rows */
  readonly path: string;
  readonly format: ExportFormat;
  /** the SELECT whose rows are written */
  readonly sql: string;
  /** replace an existing file and manifest */
  readonly force: boolean;
  /** builds the manifest once the rows are written (e.g. from row counts) */
  readonly manifest: () => Promise<unknown> | unknown;
  readonly hooks?: ExportHooks;
  /** the temporary file the engine writes the rows to (from tempPathFor(path)); chosen here when absent */
  readonly tempData?: string;
}

/**
 * Streams the rows of `sql` into `path` and writes `path.manifest.json` beside it, atomically: both go
 * to temporary files in the destination's folder and are renamed at the end (data first, then the
 * manifest). On any failure the temporaries are removed and existing files are untouched.
 * @param duck the open database holding the views the query reads
 * @param w destination, format, query, overwrite permission, manifest builder and hooks
 * @returns the paths written
 * @throws FloorgapError when the folder is missing, a file is in the way without `force`, or a write fails
 * @example
 * await writeExport(duck, { path: 'rows.csv', format: 'csv', sql, force: false, manifest: () => ({ schema: 'floorgap.export/1' }) });
 */
export async function writeExport(duck: Duck, w: ExportWrite): Promise<{ data: string; manifest: string }> {
  await checkOutput(w.path, w.force);
  const manifestPath = manifestPathFor(w.path);
  const tmpData = w.tempData ?? tempPathFor(w.path);
  const tmpManifest = tempPathFor(manifestPath);
  const cleanup = async () => {
    await fs.rm(tmpData, { force: true });
    await fs.rm(tmpManifest, { force: true });
  };
  try {
    try {
      await duck.run(`COPY (${w.sql}) TO ${literal(tmpData)} (${copyOptions(w.format)})`);
    } catch (e) {
      throw writeError(w.path, e, 'the rows');
    }
    await w.hooks?.afterData?.(tmpData);
    const manifest = await w.manifest();
    await fs.writeFile(tmpManifest, JSON.stringify(manifest, null, 2) + '\n', { flag: 'wx' });
    await w.hooks?.beforeRename?.(tmpData, tmpManifest);
    // a file may have appeared while the rows were written: both are checked before either is renamed
    const dest = await checkOutput(w.path, w.force);
    await moveInto(tmpData, dest.data);
    await moveInto(tmpManifest, dest.manifest);
  } catch (e) {
    await cleanup();
    if (e instanceof Error && e.name !== 'FloorgapError' && typeof (e as NodeJS.ErrnoException).code === 'string') throw writeError(w.path, e);
    throw e;
  }
  return { data: w.path, manifest: manifestPath };
}
