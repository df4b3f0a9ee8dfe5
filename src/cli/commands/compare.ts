import { compareTables } from '../../app/compare.js';
import { error } from '../../core/errors.js';
import { renderComparison, type CompareFormat } from '../../render/compare.js';
import type { CliIO } from '../io.js';
import { useColor, writeOut } from '../io.js';
import { analysisRequest, type AnalysisArgs } from '../options.js';

export interface CompareArgs extends AnalysisArgs {
  margin?: number;
  format: CompareFormat;
}

/** `floorgap compare BEFORE AFTER`: per slice, both sides and the change of each measure, on stdout. */
export async function runCompare(args: CompareArgs, io: CliIO): Promise<number> {
  const files = (args.files ?? []).map(String);
  if (files.length !== 2) {
    throw error(`compare takes two prediction tables, BEFORE and AFTER (e.g. floorgap compare preds-old.csv preds-new.csv); got ${files.length}`);
  }
  const [beforeFile, afterFile] = files;
  const request = analysisRequest({ ...args, files: [beforeFile], cache: false }, io);
  if (request.input.kind !== 'rows') throw new Error('compare: a request of rows expected');
  const input = request.input;
  const comparison = await compareTables(
    { before: { ...request, input }, afterFiles: [afterFile], margin: args.margin ?? null },
    { confidence: args.confidence, fdr: args.fdr, fdrMethod: args['fdr-method'], margin: args.margin ?? null },
  );
  const width = Math.max(60, Math.min(100, io.stdout.columns ?? 100));
  await writeOut(io, renderComparison(comparison, args.format, { color: useColor(io), width }));
  return 0;
}
