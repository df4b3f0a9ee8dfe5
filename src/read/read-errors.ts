/**
 * Read failures in user terms: DuckDB's multi-line reader errors become one line naming the file, the
 * line and what was expected; where DuckDB cannot say which line (a JSON Lines parser that reads past a
 * broken line, a gzip stream that ends early), the file is read again here to find it.
 */
import { createReadStream } from 'node:fs';
import { createInterface } from 'node:readline';
import { createGunzip } from 'node:zlib';
import type { Readable } from 'node:stream';
import { error, FloorgapError } from '../core/errors.js';
import type { TableInput } from './table.js';

/**
 * The one-line reason inside a DuckDB read error, in our words where we know the case.
 * @example
 * readReason('Invalid Input Error: CSV Error on Line: 11\n…Expected Number of Columns: 7 Found: 8…');
 * // => 'line 11: expected 7 fields as in the header, found 8'
 */
export function readReason(raw: string): string {
  const lines = raw.split('\n').map((l) => l.trim());
  const first = lines.find((l) => l.length > 0) ?? raw;
  const csvLine = /CSV Error on Line: (\d+)/.exec(raw);
  if (csvLine) {
    const at = `line ${csvLine[1]}`;
    const fields = /Expected Number of Columns: (\d+) Found: (\d+)/i.exec(raw);
    if (fields) return `${at}: expected ${fields[1]} fields as in the header, found ${fields[2]}`;
    if (/Invalid unicode|not utf-8 encoded/i.test(raw)) return `${at}: bytes that are not valid UTF-8; save the file as UTF-8`;
    if (/unterminated quote/i.test(raw)) return `${at}: a quoted field is never closed`;
    if (/maximum line size/i.test(raw)) return `${at}: the line is longer than the reader allows (a missing closing quote?)`;
    const detail = lines.slice(1).find((l) => l.length > 0 && !/^Original Line:/i.test(l) && !/^Possible Solution/i.test(l));
    return detail ? `${at}: ${detail.replace(/\.$/, '')}` : at;
  }
  if (/No magic bytes found at end of file|Parquet file .*too small|Footer length/i.test(raw)) {
    return 'not a valid Parquet file: its footer is missing or damaged (was it cut short while copying?)';
  }
  if (/Error when sniffing file|not possible to automatically detect the CSV/i.test(raw)) {
    return 'cannot work out the layout of the table (delimiter, quotes, columns); expected a header line and rows of the same number of fields';
  }
  if (/gzip|decompress|inflate|zlib/i.test(raw)) return 'the compressed data is damaged or cut short';
  if (/state machine reached an invalid state/i.test(raw)) {
    return 'a row the CSV reader cannot parse; expected RFC 4180 CSV (quotes doubled inside quoted fields, one kind of line end)';
  }
  return first.replace(/^(IO|Invalid Input|Conversion|Parser|Binder|Invalid) Error: /, '').trim();
}

/**
 * Turns a DuckDB read failure into one user-facing line naming the file.
 * @example
 * readError('preds.csv', new Error('Invalid Input Error: CSV Error on Line: 22\nInvalid unicode …'));
 * // => FloorgapError('preds.csv: line 22: bytes that are not valid UTF-8; save the file as UTF-8')
 */
export function readError(path: string, e: unknown): FloorgapError {
  if (e instanceof FloorgapError) return e;
  const raw = e instanceof Error ? e.message : String(e);
  const reason = readReason(raw);
  return new ReadFailure(/^line \d+|^not a valid|^cannot work out|^the compressed/.test(reason) ? `${path}: ${reason}` : `${path}: cannot read the table (${reason})`, e);
}

/** A read that the engine could not finish (as opposed to a check of ours that found bad values). */
class ReadFailure extends FloorgapError {
  constructor(message: string, cause: unknown) {
    super(message, 2, cause);
  }
}

/**
 * Runs a read of `inputs`; when the engine fails on them, throws the most precise error
 * {@link locateReadError} finds, else the engine's error in our words.
 * @param where the inputs' names for the message
 */
export async function withReadErrors<T>(inputs: readonly TableInput[], where: string, read: () => Promise<T>): Promise<T> {
  try {
    return await read();
  } catch (e) {
    if (e instanceof FloorgapError && !(e instanceof ReadFailure)) throw e;
    throw (await locateReadError(inputs, e)) ?? readError(where, e);
  }
}

/**
 * The lines of an input as bytes, one Latin-1 character a byte (a line break is the byte 0x0a in
 * UTF-8 too), so that bytes that are not UTF-8 can still be found.
 */
function lines(input: TableInput): { stream: Readable; rl: ReturnType<typeof createInterface> } {
  const file = createReadStream(input.path);
  const stream: Readable = input.gzip ? file.pipe(createGunzip()) : file;
  if (input.gzip) file.on('error', (e) => stream.destroy(e));
  stream.setEncoding('latin1');
  return { stream, rl: createInterface({ input: stream, crlfDelay: Infinity }) };
}

const UTF8 = new TextDecoder('utf-8', { fatal: true });
/** Half of a surrogate pair without its other half. */
const LONE_SURROGATE = /[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;

/** True when a parsed JSON value holds a string or key with half a surrogate pair (from a `\u` escape). */
function hasLoneSurrogate(value: unknown): boolean {
  if (typeof value === 'string') return LONE_SURROGATE.test(value);
  if (Array.isArray(value)) return value.some(hasLoneSurrogate);
  if (value !== null && typeof value === 'object') return Object.entries(value).some(([k, v]) => LONE_SURROGATE.test(k) || hasLoneSurrogate(v));
  return false;
}

/** What a JSON value is, for a message: `a JSON number (5)`. */
function jsonKind(value: unknown): string {
  if (value === null) return 'a JSON null';
  const text = JSON.stringify(value);
  const shown = text.length > 20 ? `${text.slice(0, 20)}…` : text;
  return `a JSON ${typeof value} (${shown})`;
}

/**
 * The first line of a JSON Lines file that is not one JSON object (a line that does not parse, holds
 * bytes that are not UTF-8 or half a surrogate pair, or holds an array or a bare value), or null when
 * every line is one.
 */
export async function badJsonLine(input: TableInput): Promise<string | null> {
  const { stream, rl } = lines(input);
  let n = 0;
  try {
    for await (const bytes of rl) {
      n++;
      let line: string;
      try {
        line = UTF8.decode(Buffer.from(bytes, 'latin1'));
      } catch {
        return `line ${n}: bytes that are not valid UTF-8; save the file as UTF-8`;
      }
      const text = n === 1 ? line.replace(/^\ufeff/, '') : line;
      if (text.trim() === '') continue;
      // an array document (`[{…}, {…}]`, on one line or pretty-printed): JSON, but not JSON Lines
      if (text.trimStart().startsWith('[')) return `line ${n}: a JSON array; expected JSON Lines, one object per line`;
      let value: unknown;
      try {
        value = JSON.parse(text);
      } catch (e) {
        const why = e instanceof Error ? e.message.replace(/ in JSON at position \d+.*$/, '').replace(/^Unexpected/, 'unexpected') : 'unreadable';
        return `line ${n}: not valid JSON (${why}); every line must hold one JSON object`;
      }
      if (value === null || typeof value !== 'object') return `line ${n}: ${jsonKind(value)}; expected JSON Lines, one object per line`;
      if (hasLoneSurrogate(value)) return `line ${n}: a \\u escape of half a surrogate pair; expected whole characters (both halves of a pair)`;
    }
    return null;
  } catch {
    return null; // a damaged gzip stream: the gzip check says so
  } finally {
    rl.close();
    stream.destroy();
  }
}

/** The bytes of an input, decompressed when it is gzip. */
function bytesOf(input: TableInput): Readable {
  const file = createReadStream(input.path);
  if (!input.gzip) return file;
  const stream = file.pipe(createGunzip());
  file.on('error', (e) => stream.destroy(e));
  return stream;
}

const LINE_END = { lf: 'LF (\\n)', crlf: 'CRLF (\\r\\n)' } as const;

/**
 * The first line of a CSV or TSV input whose line end differs from the first line's (LF and CRLF
 * mixed), or that holds a carriage return alone outside quotes; null when the line ends are of one
 * kind. Line numbers count physical lines, as the engine's do.
 */
async function lineEndProblem(input: TableInput): Promise<string | null> {
  const stream = bytesOf(input);
  let line = 1;
  let quoted = false;
  let cr = false;
  let first: { kind: keyof typeof LINE_END; line: number } | null = null;
  try {
    for await (const chunk of stream as AsyncIterable<Buffer>) {
      for (let i = 0; i < chunk.length; i++) {
        const b = chunk[i];
        if (cr && b !== 0x0a) return `line ${line}: a carriage return (\\r) inside a row, not in quotes; expected line ends of one kind, \\n or \\r\\n`;
        if (b === 0x22) quoted = !quoted;
        else if (b === 0x0d && !quoted) {
          cr = true;
          continue;
        } else if (b === 0x0a) {
          if (!quoted) {
            const kind = cr ? 'crlf' : 'lf';
            if (!first) first = { kind, line };
            else if (kind !== first.kind) {
              return `line ${line}: ends with ${LINE_END[kind]} where line ${first.line} ends with ${LINE_END[first.kind]}; expected one kind of line end throughout the file`;
            }
          }
          line++;
        }
        cr = false;
      }
    }
    return null;
  } catch {
    return null; // a damaged gzip stream: the gzip check says so
  } finally {
    stream.destroy();
  }
}

/** Whether a gzip input decompresses to its end; the reason when it does not. */
async function gzipProblem(input: TableInput): Promise<string | null> {
  return new Promise((resolve) => {
    const file = createReadStream(input.path);
    const gunzip = createGunzip();
    const done = (why: string | null) => {
      file.destroy();
      gunzip.destroy();
      resolve(why);
    };
    file.on('error', (e) => done(`cannot read (${(e as NodeJS.ErrnoException).code ?? e.message})`));
    gunzip.on('error', (e) =>
      done((e as NodeJS.ErrnoException).code === 'Z_BUF_ERROR' ? 'the gzip data ends early; was the file copied completely?' : 'the gzip data is damaged; expected a complete gzip file'),
    );
    gunzip.on('end', () => done(null));
    gunzip.resume();
    file.pipe(gunzip);
  });
}

/**
 * After a read failure, finds the input and line at fault where DuckDB's message cannot: a gzip stream
 * that does not decompress to its end, the first JSON Lines line that is not one JSON object, and,
 * when the CSV reader or its sniffer stopped without a line (`cause`), the first line whose line end
 * differs or that holds a carriage return alone.
 * Reads the inputs again, so it runs only once a read has failed.
 * @param cause the engine's error, when known
 * @returns the precise error, or null when nothing more precise was found
 */
export async function locateReadError(inputs: readonly TableInput[], cause?: unknown): Promise<FloorgapError | null> {
  for (const input of inputs) {
    if (input.gzip) {
      const why = await gzipProblem(input);
      if (why) return error(`${input.path}: ${why}`);
    }
  }
  for (const input of inputs) {
    if (input.format !== 'jsonl') continue;
    const why = await badJsonLine(input);
    if (why) return error(`${input.path}: ${why}`);
  }
  // a ReadFailure carries the engine's own error as its cause
  const engine = cause instanceof ReadFailure ? cause.cause : cause;
  const raw = engine instanceof Error ? engine.message : String(engine ?? '');
  // the CSV reader names no line when it stops on mixed line ends, and its sniffer fails on them
  if (/state machine reached an invalid state|Error when sniffing file|not possible to automatically detect the CSV/i.test(raw)) {
    for (const input of inputs) {
      if (input.format !== 'csv' && input.format !== 'tsv') continue;
      const why = await lineEndProblem(input);
      if (why) return error(`${input.path}: ${why}`);
    }
  }
  return null;
}
