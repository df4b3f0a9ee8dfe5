import { pairedCounts } from '../../rows/paired.js';
import { readBaseline } from '../../app/baseline.js';
import { checkDestination, writeAtomic } from '../../output/write-atomic.js';
import { renderCheckText } from '../../render/check-text.js';
import { renderJunit } from '../../render/junit.js';
import { renderJson } from '../../render/json.js';
import { mcnemarTest } from '../../stats/index.js';
import { checkLimits, checkResult, compareReports, comparePaired, LIMIT_NAMES, type Comparison, type Limits } from '../../triage/check.js';
import { error } from '../../core/errors.js';
import { analysisReads, analyzeWith, withDuck } from '../../app/analysis.js';
import type { CliIO } from '../io.js';
import { useColor, writeOut } from '../io.js';
import { analysisHooks, analysisRequest, toLoadOptions, type AnalysisArgs } from '../options.js';

export interface CheckArgs extends AnalysisArgs {
  'max-bias'?: number;
  'max-variance'?: number;
  'max-mismatch'?: number;
  'max-dev-error'?: number;
  strict: boolean;
  baseline?: string;
  format: 'text' | 'json';
  junit?: string;
}

function limitsOf(args: CheckArgs): Limits {
  const limits: Record<string, number> = {};
  for (const name of LIMIT_NAMES) {
    const v = args[name];
    if (v === undefined) continue;
    limits[name] = v;
  }
  return limits;
}

/**
 * `floorgap check`: exit 0 when every slice is within the limits and none regressed against the
 * baseline, 1 when not, 2 on bad usage or input.
 */
export async function runCheck(args: CheckArgs, io: CliIO): Promise<number> {
  const limits = limitsOf(args);
  if (Object.keys(limits).length === 0 && !args.baseline) {
    throw error('check needs at least one limit (--max-bias, --max-variance, --max-mismatch, --max-dev-error) or a --baseline');
  }
  // a JUnit report replaces its own regular file without --force, as test runners' reports do; never anything else
  if (args.junit) await checkDestination(args.junit, { overwrite: true, folderHint: `--junit needs a file name, e.g. ${args.junit.replace(/\/+$/, '')}/slices.xml` });
  // a saved report is read and checked before the scan; a prediction table is paired after it, so the
  // engine may read the baseline only then
  const saved = args.baseline ? await readBaseline(args.baseline) : null;
  const baselineTable = args.baseline && saved?.kind === 'table' ? [args.baseline] : [];
  const request = analysisRequest(args, io);
  const result = await withDuck(request.engine, { read: [...analysisReads(request), ...baselineTable], write: [] }, async (duck) => {
    const { report, loaded } = await analyzeWith(duck, request, analysisHooks(args, io));
    const warnings = [...report.warnings];
    let comparisons: Comparison[] = [];
    let baseline: { path: string; kind: 'report' | 'paired' } | null = null;
    if (args.baseline) {
      if (saved?.kind === 'report') {
        const before = saved.report;
        const same = JSON.stringify(before.by) === JSON.stringify(report.by);
        if (!same) {
          const show = (b: readonly string[] | null) => (b ? `--by ${b.join(',')}` : 'the overview (no --by)');
          throw error(`${args.baseline}: the baseline report is grouped by ${show(before.by)}, this check by ${show(report.by)}; use the same grouping`);
        }
        comparisons = compareReports(report, before, report.fdr, report.fdr_method, report.confidence);
        baseline = { path: args.baseline, kind: 'report' };
      } else {
        if (loaded.origin === 'cells') {
          throw error(`${args.baseline}: a baseline model's predictions are paired with the rows by id, and --cells gives no rows; compare with a saved JSON report instead`);
        }
        const groupings = report.by ? [[...report.by]] : loaded.overviewColumns.map((c) => [c]);
        const { sums, warnings: more } = await pairedCounts(duck, loaded, args.baseline, toLoadOptions(args).roles, groupings, loaded.plan.where, report.run);
        warnings.push(...more);
        const thinByKey = new Map([report.overall, ...report.slices].map((s) => [JSON.stringify(Object.entries(s.key).sort()), s]));
        const counts = sums
          .map((s) => {
            const slice = thinByKey.get(JSON.stringify(Object.entries(s.key).sort()));
            return slice ? { ...s, label: slice.label, thin: slice.focus === 'thin', rank: slice.rank } : null;
          })
          .filter((s): s is NonNullable<typeof s> => s !== null)
          .sort((a, b) => a.rank - b.rank);
        comparisons = comparePaired(counts, (b, c) => mcnemarTest(b, c), report.fdr, report.fdr_method);
        baseline = { path: args.baseline, kind: 'paired' };
      }
    }
    return checkResult({
      strict: args.strict,
      fdr: report.fdr,
      fdr_method: report.fdr_method,
      limits,
      checks: checkLimits(report, limits, args.strict),
      baseline,
      comparisons,
      warnings,
      sliceCount: report.slices.length,
    });
  });
  if (args.junit) await writeAtomic(args.junit, async (put) => put(renderJunit(result)), { overwrite: true });
  await writeOut(io, args.format === 'json' ? renderJson(result) : renderCheckText(result, useColor(io)));
  return result.passed ? 0 : 1;
}
