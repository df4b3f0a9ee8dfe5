import type { McNemarResult } from '../stats/index.js';
import { benjaminiHochberg, benjaminiYekutieli, newcombeInterval, twoProportionTest } from '../stats/index.js';
import type { Report, SliceReport } from './types.js';

/** The limits `check` enforces, as fractions; absent limits are not checked. */
export interface Limits {
  readonly 'max-bias'?: number;
  readonly 'max-variance'?: number;
  readonly 'max-mismatch'?: number;
  readonly 'max-dev-error'?: number;
}
export type LimitName = keyof Limits;
export const LIMIT_NAMES: readonly LimitName[] = ['max-bias', 'max-variance', 'max-mismatch', 'max-dev-error'];

/** One slice against one limit. */
export interface LimitCheck {
  readonly slice: string;
  readonly key: Readonly<Record<string, string>>;
  readonly limit: LimitName;
  readonly threshold: number;
  readonly value: number | null;
  readonly lo: number | null;
  readonly hi: number | null;
  /** fail: over the limit (its interval's lower end, or with --strict its value); thin: not judged */
  readonly status: 'pass' | 'fail' | 'thin' | 'n/a';
}

/** One slice's dev error against the baseline. */
export interface Comparison {
  readonly slice: string;
  readonly key: Readonly<Record<string, string>>;
  readonly before: number | null;
  readonly after: number | null;
  /** after − before */
  readonly change: number | null;
  readonly lo: number | null;
  readonly hi: number | null;
  readonly p: number | null;
  readonly q: number | null;
  /** paired comparisons: pairs right before and wrong now (b) and wrong before and right now (c) */
  readonly worse?: number;
  readonly better?: number;
  readonly method: 'two-proportion' | 'mcnemar-exact' | 'mcnemar-chi-square';
  readonly status: 'regressed' | 'improved' | 'unchanged' | 'thin' | 'not-in-baseline';
}

/** The result of `floorgap check`: the JSON contract `floorgap.check/1`. */
export interface CheckResult {
  readonly schema: 'floorgap.check/1';
  readonly passed: boolean;
  readonly strict: boolean;
  readonly fdr: number;
  readonly fdr_method: 'bh' | 'by';
  readonly limits: Limits;
  readonly checks: readonly LimitCheck[];
  readonly baseline: { readonly path: string; readonly kind: 'report' | 'paired' } | null;
  readonly comparisons: readonly Comparison[];
  readonly warnings: readonly string[];
  readonly counts: { readonly slices: number; readonly violations: number; readonly regressions: number; readonly improvements: number; readonly thin: number };
}

function measure(s: SliceReport, limit: LimitName): { value: number; lo: number | null; hi: number | null } | null {
  switch (limit) {
    case 'max-bias':
      return s.gaps.avoidable_bias;
    case 'max-variance':
      return s.gaps.variance;
    case 'max-mismatch':
      return s.gaps.mismatch;
    case 'max-dev-error':
      return s.error.dev;
  }
}

/**
 * Checks every slice (and the overall one) against the limits. By default a slice violates a limit
 * only when the lower end of its interval is above it (the excess is significant); with `strict`, when
 * its point value is. Thin slices are listed but never fail.
 * @example
 * checkLimits(report, { 'max-bias': 0.05 }, false)[0]; // => { slice: 'package=QFN', limit: 'max-bias', status: 'fail', ... }
 */
export function checkLimits(report: Report, limits: Limits, strict: boolean): LimitCheck[] {
  const out: LimitCheck[] = [];
  for (const s of [report.overall, ...report.slices]) {
    for (const limit of LIMIT_NAMES) {
      const threshold = limits[limit];
      if (threshold === undefined) continue;
      const m = measure(s, limit);
      let status: LimitCheck['status'];
      if (s.focus === 'thin') status = 'thin';
      else if (!m) status = 'n/a';
      else {
        const judged = strict ? m.value : m.lo ?? m.value;
        status = judged > threshold ? 'fail' : 'pass';
      }
      out.push({ slice: s.label, key: s.key, limit, threshold, value: m?.value ?? null, lo: m?.lo ?? null, hi: m?.hi ?? null, status });
    }
  }
  return out;
}

function keyId(key: Readonly<Record<string, string>>): string {
  return JSON.stringify(Object.entries(key).sort());
}

function decide(change: number, q: number | null, lo: number | null, hi: number | null, fdr: number): Comparison['status'] {
  if (q === null || q > fdr) return 'unchanged';
  if (change > 0 && lo !== null && lo > 0) return 'regressed';
  if (change < 0 && hi !== null && hi < 0) return 'improved';
  return 'unchanged';
}

/**
 * Unpaired regression test against a report saved earlier: per slice (matched by key), the rise in dev
 * error with Newcombe's interval and the pooled two-proportion test, q-values by Benjamini–Hochberg
 * (or Yekutieli) across the slices compared. Regressed: the rise has q ≤ fdr and its interval excludes 0.
 * @param confidence the level of the intervals (the check's --confidence)
 */
export function compareReports(current: Report, baseline: Report, fdr: number, method: 'bh' | 'by', confidence: number): Comparison[] {
  const before = new Map([baseline.overall, ...baseline.slices].map((s) => [keyId(s.key), s]));
  const rows = [current.overall, ...current.slices].map((s) => {
    const b = before.get(keyId(s.key));
    const now = s.error.dev;
    const was = b?.error.dev ?? null;
    if (!b || !now || !was) {
      return { s, now, was, ci: null, p: null, status: b ? ('unchanged' as const) : ('not-in-baseline' as const) };
    }
    const ci = newcombeInterval(now.value * now.n, now.n, was.value * was.n, was.n, confidence);
    const p = twoProportionTest(now.value * now.n, now.n, was.value * was.n, was.n);
    return { s, now, was, ci, p, status: s.focus === 'thin' || b.focus === 'thin' ? ('thin' as const) : null };
  });
  const family = rows.map((r) => (r.status === null && r.p !== null ? r.p : null));
  const q = (method === 'by' ? benjaminiYekutieli : benjaminiHochberg)(family);
  return rows.map((r, i): Comparison => {
    const change = r.now && r.was ? r.now.value - r.was.value : null;
    const status = r.status ?? decide(change!, q[i], r.ci?.lo ?? null, r.ci?.hi ?? null, fdr);
    return {
      slice: r.s.label,
      key: r.s.key,
      before: r.was?.value ?? null,
      after: r.now?.value ?? null,
      change,
      lo: r.ci?.lo ?? null,
      hi: r.ci?.hi ?? null,
      p: r.p,
      q: q[i],
      method: 'two-proportion',
      status,
    };
  });
}

/** Discordant pairs of one slice from a paired comparison on shared ids. */
export interface PairedCounts {
  readonly key: Readonly<Record<string, string>>;
  readonly label: string;
  /** paired dev rows */
  readonly pairs: number;
  /** errors before and now among the pairs */
  readonly errorsBefore: number;
  readonly errorsNow: number;
  /** right before, wrong now */
  readonly worse: number;
  /** wrong before, right now */
  readonly better: number;
  readonly thin: boolean;
}

/**
 * Paired regression test against the baseline model's predictions on the same dev rows: McNemar's test
 * per slice on the discordant pairs, then Benjamini–Hochberg (or Yekutieli) across the slices.
 */
export function comparePaired(
  slices: readonly PairedCounts[],
  test: (b: number, c: number) => McNemarResult,
  fdr: number,
  method: 'bh' | 'by',
): Comparison[] {
  const results = slices.map((s) => (s.thin || s.pairs === 0 ? null : test(s.worse, s.better)));
  const q = (method === 'by' ? benjaminiYekutieli : benjaminiHochberg)(results.map((r) => (r ? r.p : null)));
  return slices.map((s, i): Comparison => {
    const r = results[i];
    const before = s.pairs > 0 ? s.errorsBefore / s.pairs : null;
    const after = s.pairs > 0 ? s.errorsNow / s.pairs : null;
    const change = before !== null && after !== null ? after - before : null;
    let status: Comparison['status'] = 'unchanged';
    if (s.thin || s.pairs === 0) status = 'thin';
    else if (q[i] !== null && q[i]! <= fdr && s.worse !== s.better) status = s.worse > s.better ? 'regressed' : 'improved';
    return {
      slice: s.label,
      key: s.key,
      before,
      after,
      change,
      lo: null,
      hi: null,
      p: r ? r.p : null,
      q: q[i],
      worse: s.worse,
      better: s.better,
      method: r?.method === 'exact' ? 'mcnemar-exact' : 'mcnemar-chi-square',
      status,
    };
  });
}

/** Assembles the result; it passes when no limit fails and no slice regressed. */
export function checkResult(
  parts: Omit<CheckResult, 'schema' | 'passed' | 'counts'> & { readonly sliceCount: number },
): CheckResult {
  const violations = parts.checks.filter((c) => c.status === 'fail').length;
  const regressions = parts.comparisons.filter((c) => c.status === 'regressed').length;
  const improvements = parts.comparisons.filter((c) => c.status === 'improved').length;
  const thin = new Set([...parts.checks.filter((c) => c.status === 'thin').map((c) => c.slice), ...parts.comparisons.filter((c) => c.status === 'thin').map((c) => c.slice)]).size;
  const { sliceCount, ...rest } = parts;
  return {
    schema: 'floorgap.check/1',
    passed: violations === 0 && regressions === 0,
    ...rest,
    counts: { slices: sliceCount, violations, regressions, improvements, thin },
  };
}
