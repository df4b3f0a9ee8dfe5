import type { CheckResult, Comparison, LimitCheck } from '../triage/check.js';
import { paint } from '../terminal/ansi.js';
import { points, pointsInterval, pValue, signedPoints } from './format.js';
import { sanitize } from '../terminal/sanitize.js';

const LIMIT_WORD: Record<LimitCheck['limit'], string> = {
  'max-bias': 'avoidable bias',
  'max-variance': 'variance',
  'max-mismatch': 'mismatch',
  'max-dev-error': 'dev error',
};

function comparisonLine(c: Comparison): string {
  const pairs = c.worse !== undefined ? `, ${c.worse} worse / ${c.better} better pairs` : '';
  const interval = c.lo !== null ? ` ${pointsInterval(c.lo, c.hi, true)}` : '';
  return `${sanitize(c.slice)}: dev error ${points(c.before)} → ${points(c.after)} (${signedPoints(c.change)}${interval}${pairs}, q ${pValue(c.q)})`;
}

/**
 * A short human summary of `floorgap check`: the verdict, then each failed limit, each regression and
 * improvement against the baseline, and the thin slices that were not judged.
 * @example
 * renderCheckText(result, false).split('\n')[0]; // => 'floorgap check: FAIL · 2 limits broken, 1 regression · 27 slices'
 */
export function renderCheckText(result: CheckResult, color: boolean): string {
  const n = result.counts;
  const verdict = result.passed ? paint('PASS', ['bold', 'green'], color) : paint('FAIL', ['bold', 'red'], color);
  const parts = [`${n.violations} limit${n.violations === 1 ? '' : 's'} broken`];
  if (result.baseline) parts.push(`${n.regressions} regression${n.regressions === 1 ? '' : 's'}`, `${n.improvements} improvement${n.improvements === 1 ? '' : 's'}`);
  const lines = [`floorgap check: ${verdict} · ${parts.join(', ')} · ${n.slices} slices`];
  const limits = Object.entries(result.limits).map(([k, v]) => `${k} ${points(v as number)}`);
  if (limits.length) {
    lines.push(`limits: ${limits.join(', ')} (points; ${result.strict ? 'point values' : 'a slice fails when its whole interval is above the limit'})`);
  }
  for (const c of result.checks.filter((x) => x.status === 'fail')) {
    lines.push(
      `  ${paint('over', ['red'], color)}  ${sanitize(c.slice)}: ${LIMIT_WORD[c.limit]} ${points(c.value)} ${pointsInterval(c.lo, c.hi)} > ${points(c.threshold)}`,
    );
  }
  if (result.baseline) {
    const kind = result.baseline.kind === 'paired' ? "paired by id, McNemar's test" : 'saved report, two-proportion test';
    lines.push(`baseline: ${sanitize(result.baseline.path)} (${kind}; ${result.fdr_method === 'by' ? 'Benjamini-Yekutieli' : 'Benjamini-Hochberg'} q ≤ ${result.fdr})`);
    for (const c of result.comparisons.filter((x) => x.status === 'regressed')) lines.push(`  ${paint('worse', ['red'], color)} ${comparisonLine(c)}`);
    for (const c of result.comparisons.filter((x) => x.status === 'improved')) lines.push(`  ${paint('better', ['green'], color)} ${comparisonLine(c)}`);
    if (n.regressions === 0 && n.improvements === 0) lines.push('  no slice changed significantly');
  }
  const thin = [...new Set([...result.checks, ...result.comparisons].filter((x) => x.status === 'thin').map((x) => sanitize(x.slice)))];
  if (thin.length) lines.push(`not judged (thin): ${thin.join(', ')}`);
  for (const w of result.warnings) lines.push(`! ${sanitize(w)}`);
  return `${lines.join('\n')}\n`;
}
