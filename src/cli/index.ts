import yargs, { type Argv } from 'yargs';
import { FloorgapError, INTERNAL_EXIT } from '../core/errors.js';
import { readConfig } from '../read/config.js';
import { checkBounds, type ShowOption } from './bounds.js';
import { VERSION } from '../core/version.js';
import { runCheck, type CheckArgs } from './commands/check.js';
import { runCompare, type CompareArgs } from './commands/compare.js';
import { runDemo, type DemoArgs } from './commands/demo.js';
import { runDiscover, type DiscoverArgs } from './commands/discover.js';
import { runExport, type ExportArgs } from './commands/export.js';
import { runExplore, type ExploreArgs } from './commands/explore.js';
import { runReport, type ReportArgs } from './commands/report.js';
import { runSql, type SqlArgs } from './commands/sql.js';
import { reportFailure } from './failure.js';
import type { CliIO } from './io.js';
import { commandOptions } from './options.js';

/** Exit codes: 0 fine, 1 a check found violations, 2 bad usage or input, 3 an unexpected internal error. */
const EXIT = { ok: 0, violations: 1, usage: 2, internal: INTERNAL_EXIT } as const;

function configPath(argv: readonly string[]): string | null {
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--config') return argv[i + 1] ?? null;
    if (a.startsWith('--config=')) return a.slice('--config='.length);
  }
  return null;
}

/**
 * Names an option in a message as the user wrote it: the command line's own text (`--bins 1e308`, not
 * the parsed 1e+308 or NaN), else the project file's entry.
 */
function showOption(config: Record<string, unknown>, argv: readonly string[]): ShowOption {
  return (name, value) => {
    for (let i = argv.length - 1; i >= 0; i--) {
      const a = argv[i];
      if (a === `--${name}` && i + 1 < argv.length) return `--${name} ${argv[i + 1]}`;
      if (a.startsWith(`--${name}=`)) return `--${name} ${a.slice(name.length + 3)}`;
    }
    if (name in config) return `the project file's "${name}": ${JSON.stringify(config[name])}`;
    return `--${name} ${String(value)}`;
  };
}

/**
 * The project file's values for the options this command defines: a check limit in floorgap.json is
 * no unknown option to `report`, and the demo takes none. (Reads yargs' list of defined options; if
 * that changes, every value is passed and strict mode judges them.)
 */
function projectDefaults<T>(y: Argv<T>, values: Record<string, unknown>): Argv<T> {
  const defined = (y as unknown as { getOptions?: () => { key?: Record<string, unknown> } }).getOptions?.().key;
  return y.config(defined ? Object.fromEntries(Object.entries(values).filter(([k]) => k in defined)) : values);
}

/**
 * yargs lays out the whole help text before it runs a command's handler, in case the handler asks for
 * it: about 45 ms of every start. floorgap's handlers never ask (`--help` lays it out itself), so the
 * step is skipped. It reaches into yargs' internals; if they change, nothing is skipped.
 */
function skipHelpLayout(parser: unknown): void {
  type Usage = { cacheHelpMessage?: () => void };
  const internals = (parser as { getInternalMethods?: () => { getUsageInstance?: () => Usage } }).getInternalMethods?.();
  const usage = internals?.getUsageInstance?.();
  if (usage && typeof usage.cacheHelpMessage === 'function') usage.cacheHelpMessage = () => undefined;
}

/**
 * Parses argv and runs one command. Returns the exit code; writes results to io.stdout and one-line
 * errors to io.stderr. A fresh yargs instance per call (no singleton), so tests can call it repeatedly.
 */
export async function main(argv: readonly string[], io: CliIO): Promise<number> {
  let code: number = EXIT.ok;
  try {
    const config = readConfig(configPath(argv), io.cwd);
    const parser = yargs([...argv])
      .scriptName('floorgap')
      .version(VERSION)
      .env(false)
      .strict()
      .wrap(Math.min(100, (io.stdout.columns as number | undefined) ?? 100))
      .exitProcess(false)
      .fail((msg, err) => {
        if (err) throw err;
        throw new FloorgapError(`${msg}; see floorgap --help`, EXIT.usage);
      })
      // every numeric option within its bounds before any command starts work, flags and project file alike
      .middleware((args) => checkBounds(args as Record<string, unknown>, showOption(config, argv)))
      .command(
        'report [files..]',
        'rank data slices by the error they could give back, against human-level floors',
        (y) => projectDefaults(commandOptions(y, 'report'), config),
        async (args) => {
          code = await runReport(args as unknown as ReportArgs, io);
        },
      )
      .command(
        'discover [files..]',
        'search slices of one to three column conditions for gaps a one-column slice hides (false-discovery controlled)',
        (y) => projectDefaults(commandOptions(y, 'discover'), config),
        async (args) => {
          code = await runDiscover(args as unknown as DiscoverArgs, io);
        },
      )
      .command(
        'compare [files..]',
        'compare two models slice by slice: the change of dev error, bias, variance and mismatch, paired by id where rows pair',
        (y) => projectDefaults(commandOptions(y, 'compare'), config),
        async (args) => {
          code = await runCompare(args as unknown as CompareArgs, io);
        },
      )
      .command(
        ['explore [files..]', '$0 [files..]'],
        'the interactive slice explorer (prints the report when not on a terminal)',
        (y) => projectDefaults(commandOptions(y, 'explore'), config),
        async (args) => {
          code = await runExplore(args as unknown as ExploreArgs, io, argv);
        },
      )
      .command(
        'check [files..]',
        'exit 1 when a slice breaks a limit or got worse than a baseline (for pipelines)',
        (y) => projectDefaults(commandOptions(y, 'check'), config),
        async (args) => {
          code = await runCheck(args as unknown as CheckArgs, io);
        },
      )
      .command(
        'export [files..]',
        'write the rows behind the chosen slices (flagged by default) to CSV, JSON Lines or Parquet',
        (y) => projectDefaults(commandOptions(y, 'export'), config),
        async (args) => {
          code = await runExport(args as unknown as ExportArgs, io, argv);
        },
      )
      .command(
        'sql [files..]',
        'print the GROUP BY that computes the cells in your own SQL engine (or run it here with --out)',
        (y) => projectDefaults(commandOptions(y, 'sql'), config),
        async (args) => {
          code = await runSql(args as unknown as SqlArgs, io);
        },
      )
      .command(
        'demo',
        'write the seeded solder-joint demo table and its inspector floor table',
        (y) => projectDefaults(commandOptions(y, 'demo'), config),
        async (args) => {
          code = await runDemo(args as unknown as DemoArgs, io);
        },
      )
      .example('floorgap report preds.csv --floor-table floors.csv', 'overview of every one-column slice')
      .example('floorgap report preds.parquet --by station,lighting --format json', 'one grouping, as JSON')
      .epilogue('Exit codes: 0 fine, 1 check violations, 2 bad usage, input or output, 3 internal error, 129/130/143 stopped by SIGHUP/SIGINT/SIGTERM.')
      .help();
    skipHelpLayout(parser);
    let helpText = '';
    await parser.parseAsync([...argv], {}, (err, _argv, output) => {
      if (!err && output) helpText = output;
    });
    if (helpText) io.stdout.write(helpText.endsWith('\n') ? helpText : helpText + '\n');
  } catch (e) {
    return reportFailure(e, io);
  }
  return code;
}
