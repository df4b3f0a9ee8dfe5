import type { CliIO } from '../io.js';
import { runReport, type ReportArgs } from './report.js';

export interface ExploreArgs extends ReportArgs {
  ascii: boolean;
}

/**
 * `floorgap explore`: the full-screen keyboard explorer. Without a terminal on stdin and stdout (or
 * with an explicit --format other than text) it prints the report instead. The terminal UI (ink,
 * react) is imported only here, when it is about to run.
 */
export async function runExplore(args: ExploreArgs, io: CliIO, argv: readonly string[]): Promise<number> {
  const stdin = io.stdin;
  const interactive = Boolean(io.stdout.isTTY && stdin?.isTTY) && args.format === 'text';
  if (!interactive || !stdin) return runReport(args, io);
  const { runExplorer } = await import('./explore-terminal.js');
  return runExplorer(args, io, argv, stdin);
}
