import type { CheckResult } from '../triage/check.js';
import { points, signedPoints } from './format.js';

/** Characters XML 1.0 does not allow at all (C0 controls but tab, LF, CR; lone surrogates; U+FFFE/F). */
const XML_INVALID = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

/** Escapes text for an XML attribute or element, dropping characters XML cannot carry. */
export function xmlEscape(text: string): string {
  return text
    .replace(XML_INVALID, '\uFFFD')
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&apos;');
}

function testcase(classname: string, name: string, outcome: { failure?: string; skipped?: string }): string {
  const head = `    <testcase classname="${xmlEscape(classname)}" name="${xmlEscape(name)}" time="0"`;
  if (outcome.failure !== undefined) return `${head}>\n      <failure message="${xmlEscape(outcome.failure)}" type="floorgap.check"/>\n    </testcase>`;
  if (outcome.skipped !== undefined) return `${head}>\n      <skipped message="${xmlEscape(outcome.skipped)}"/>\n    </testcase>`;
  return `${head}/>`;
}

/**
 * The check result as JUnit XML (the common test-report format CI systems display): one test case per
 * slice and limit, and one per slice compared with the baseline; thin slices are skipped.
 * @example
 * renderJunit(result); // => '<?xml version="1.0" encoding="UTF-8"?>\n<testsuites …'
 */
export function renderJunit(result: CheckResult): string {
  const cases: string[] = [];
  let failures = 0;
  let skipped = 0;
  for (const c of result.checks) {
    const name = `${c.slice} · ${c.limit} ${points(c.threshold)}`;
    if (c.status === 'fail') {
      failures++;
      cases.push(testcase('floorgap.limits', name, { failure: `${c.limit}: ${points(c.value)} points [${points(c.lo)}, ${points(c.hi)}] is over ${points(c.threshold)}` }));
    } else if (c.status === 'thin' || c.status === 'n/a') {
      skipped++;
      cases.push(testcase('floorgap.limits', name, { skipped: c.status === 'thin' ? 'too few rows to judge' : 'not measured for this data' }));
    } else cases.push(testcase('floorgap.limits', name, {}));
  }
  for (const c of result.comparisons) {
    const name = `${c.slice} · dev error vs baseline`;
    if (c.status === 'regressed') {
      failures++;
      cases.push(testcase('floorgap.baseline', name, { failure: `dev error ${points(c.before)} → ${points(c.after)} (${signedPoints(c.change)} points, q ${c.q?.toPrecision(2)})` }));
    } else if (c.status === 'thin' || c.status === 'not-in-baseline') {
      skipped++;
      cases.push(testcase('floorgap.baseline', name, { skipped: c.status === 'thin' ? 'too few rows to judge' : 'slice not in the baseline' }));
    } else cases.push(testcase('floorgap.baseline', name, {}));
  }
  const suite = `  <testsuite name="floorgap check" tests="${cases.length}" failures="${failures}" errors="0" skipped="${skipped}">`;
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<testsuites name="floorgap" tests="${cases.length}" failures="${failures}" errors="0" skipped="${skipped}">`,
    suite,
    ...cases,
    '  </testsuite>',
    '</testsuites>',
    '',
  ].join('\n');
}
