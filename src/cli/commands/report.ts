import { render, type Format } from '../../render/index.js';
import { analyze } from '../../app/analysis.js';
import type { CliIO } from '../io.js';
import { useColor, writeOut } from '../io.js';
import { analysisHooks, analysisRequest, type AnalysisArgs } from '../options.js';

export interface ReportArgs extends AnalysisArgs {
  format: Format;
}

/** `floorgap report`: the ranked slice report on stdout. */
export async function runReport(args: ReportArgs, io: CliIO): Promise<number> {
  const { report } = await analyze(analysisRequest(args, io), analysisHooks(args, io));
  const width = Math.max(60, Math.min(100, io.stdout.columns ?? 100));
  await writeOut(io, render(report, args.format, { color: useColor(io), width }));
  return 0;
}
