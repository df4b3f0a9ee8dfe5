import { existsSync } from 'node:fs';
import { render } from 'ink';
import type { Duck } from '../../sql/duck.js';
import { watchProgress, type ScanProgress } from '../../sql/progress.js';
import { App } from '../../tui/App.js';
import { explorerData, type Exporter } from '../../app/explorer-data.js';
import type { SliceReport } from '../../triage/types.js';
import { DEFAULTS } from '../../core/defaults.js';
import { FloorgapError, INTERNAL_EXIT } from '../../core/errors.js';
import { analysisReads, analyzeWith, openEngine } from '../../app/analysis.js';
import type { CliIO } from '../io.js';
import { useColor } from '../io.js';
import { analysisRequest } from '../options.js';
import { runExport, type ExportArgs } from './export.js';
import { claimSignals } from '../signals.js';
import { reportFailure } from '../failure.js';
import type { ExploreArgs } from './explore.js';

/** A slice key as `--slice` text: `col=value` pairs, commas, `=` and backslashes escaped. */
export function sliceKeyText(slice: SliceReport): string {
  const esc = (s: string) => s.replace(/[\\,=]/g, (c) => `\\${c}`);
  return Object.entries(slice.key)
    .map(([k, v]) => `${esc(k)}=${esc(v)}`)
    .join(',');
}

const ENTER = '\x1b[?1049h\x1b[?25l';
const LEAVE = '\x1b[?25h\x1b[?1049l';
/** ESC [ 3 J: erase the saved lines (the scrollback), part of the clear-terminal sequence ink writes */
const ERASE_SCROLLBACK = '\x1b[3J';

/**
 * The terminal stream as ink gets it: everything passes through except ESC [ 3 J, which ink writes (as
 * part of its clear-terminal sequence) when the window gets shorter than the last frame, and which
 * would wipe the user's scrollback even from the alternate screen. Every other property (size, TTY,
 * resize events) is the terminal's own.
 * @example
 * withoutScrollbackClear(process.stdout).write('\x1b[2J\x1b[3J\x1b[H'); // writes '\x1b[2J\x1b[H'
 */
export function withoutScrollbackClear(stdout: NodeJS.WriteStream): NodeJS.WriteStream {
  const strip = (chunk: unknown) => {
    if (typeof chunk === 'string') return chunk.replaceAll(ERASE_SCROLLBACK, '');
    if (chunk instanceof Uint8Array && Buffer.from(chunk).includes(ERASE_SCROLLBACK)) return Buffer.from(chunk).toString('utf8').replaceAll(ERASE_SCROLLBACK, '');
    return chunk;
  };
  const write = (chunk: unknown, ...rest: unknown[]): boolean => (stdout.write as (...a: unknown[]) => boolean).call(stdout, strip(chunk), ...rest);
  return new Proxy(stdout, {
    get(target, prop) {
      if (prop === 'write') return write;
      const value: unknown = Reflect.get(target, prop, target);
      return typeof value === 'function' ? (value as (...a: unknown[]) => unknown).bind(target) : value;
    },
  });
}

/**
 * The explorer's export: the rows of the slices chosen on screen, written as `floorgap export --slice
 * KEY …` would write them, with a manifest that records the explorer's command line as it was run and
 * names the chosen slices by their keys. Returns the line for the status bar; a FloorgapError is that
 * line too, anything else is thrown (an internal error ends the explorer).
 * @param argv the explorer's command line as given (after `floorgap`)
 */
export function explorerExporter(args: ExploreArgs, io: CliIO, argv: readonly string[]): Exporter {
  return async (slices, path, force, reasons) => {
    const out: string[] = [];
    const capture = { write: (chunk: string | Uint8Array, cb?: (e?: Error | null) => void) => (out.push(String(chunk)), cb?.(), true) } as unknown as NodeJS.WritableStream;
    const exportArgs: ExportArgs = {
      ...args,
      by: undefined,
      out: path,
      force,
      slice: slices.map(sliceKeyText),
      splits: DEFAULTS.exportSplits,
      'errors-only': false,
      raw: false,
      chosenIn: 'explorer',
      // discovered slices: written as they are, each with the reason it was found
      ...(reasons ? { chosen: slices.map((s, i) => ({ slice: s, chosen: 'named' as const, named: sliceKeyText(s), reason: reasons[i] ?? '' })) } : {}),
    };
    try {
      await runExport(exportArgs, { ...io, stdout: capture, stderr: capture }, argv);
    } catch (e) {
      if (e instanceof FloorgapError) return e.message;
      throw e;
    }
    return out.join('').trim().split('\n')[0] ?? `wrote ${path}`;
  };
}

/**
 * The full-screen keyboard explorer on a terminal (stdin and stdout are TTYs). Loaded only when it
 * runs, so other commands never pay for the UI libraries at start-up.
 */
export async function runExplorer(args: ExploreArgs, io: CliIO, argv: readonly string[], stdin: NodeJS.ReadStream): Promise<number> {
  const request = analysisRequest(args, io); // bad options fail before the screen changes

  let duck: Duck | null = null;
  let stopped = false;
  let latest: ScanProgress | null = null;
  const exporter = explorerExporter(args, io, argv);

  const stdout = io.stdout as NodeJS.WriteStream;
  let restored = false;
  const restore = () => {
    if (restored) return;
    restored = true;
    try {
      if (stdin.isTTY) stdin.setRawMode?.(false);
    } catch {
      /* the terminal may be gone (SIGHUP) */
    }
    stdout.write(LEAVE);
  };
  stdout.write(ENTER);

  return new Promise<number>((resolve) => {
    let finished = false;
    let signalled = false;
    /** ends the explorer: with an error, its line goes to stderr once the terminal is restored, and it sets the code */
    const finish = (code: number, error?: unknown) => {
      if (finished) return;
      finished = true;
      instance.unmount();
      restore();
      // closing DuckDB under a running query (the load, a regroup, the detail pane's) hangs the process
      // for good: stop the query now and never close it (the process ends, and with it the engine; its
      // spill folder is removed by the exit handler, src/cli/signals.ts)
      stopped = true;
      duck?.connection.interrupt();
      // a query that does not answer its interrupt must not keep a stopped explorer alive: past 1.5 s the
      // process exits anyway (the timer holds nothing open when the engine is idle)
      if (signalled) setTimeout(() => process.exit(code), 1500).unref();
      // released on the next turn: the signal that ended the explorer is still being delivered
      setImmediate(release);
      process.off('uncaughtException', onCrash);
      resolve(error === undefined ? code : reportFailure(error, io));
    };
    // Ctrl-C arrives as a key in raw mode; SIGINT from elsewhere, SIGTERM and SIGHUP come here
    const release = claimSignals((_signal, code) => {
      signalled = true;
      finish(code);
    });
    const onCrash = (e: unknown) => finish(INTERNAL_EXIT, e);
    process.on('uncaughtException', onCrash);

    const instance = render(
      <App
        title={args.files?.join(', ') ?? 'the prediction table'}
        color={useColor(io)}
        ascii={args.ascii}
        progress={() => (latest ? { percent: latest.percentage, rows: latest.rowsProcessed } : null)}
        load={async () => {
          duck = await openEngine(request.engine, { read: analysisReads(request), write: [] });
          if (stopped) throw new Error('stopped'); // quit while the engine was starting: no scan
          const stop = watchProgress(duck, (p) => (latest = p), 200);
          try {
            const analysis = await analyzeWith(duck, request);
            return explorerData(duck, analysis, exporter);
          } finally {
            stop();
          }
        }}
        onExit={finish}
        defaultExportPath={() => `floorgap-export-${new Date().toISOString().slice(0, 19).replace(/[:T]/g, '-')}.csv`}
        fileExists={(p) => existsSync(p)}
      />,
      { stdout: withoutScrollbackClear(stdout), stdin, stderr: io.stderr as NodeJS.WriteStream, exitOnCtrlC: false, patchConsole: false },
    );
    // an error thrown while drawing ends ink's render (ink shows its own error screen): end the explorer on it
    instance.waitUntilExit().catch((e: unknown) => finish(INTERNAL_EXIT, e));
  });
}
