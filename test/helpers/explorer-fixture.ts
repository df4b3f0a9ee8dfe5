/**
 * A fake of the explorer's data side (`ExplorerData`) for component tests: fixture (hand-built). It
 * starts from the hand-built report in report-fixture.ts, answers `regroup` with a second hand-built
 * report (three `lighting` slices, named after the grouping asked for; `by: null` for the overview), `drill` with two hand-built slices, `examples` with hand-written rows,
 * and records every call, so a test can check what the explorer asked for.
 */
import type { ErrorExample } from '../../src/rows/examples.js';
import type { Discovery } from '../../src/discover/types.js';
import type { ExplorerData } from '../../src/tui/data.js';
import type { Report, SliceReport } from '../../src/triage/types.js';
import { reportFixture } from './report-fixture.js';

/** The columns the grouping picker offers: fixture (hand-built); `shift` is not in the fixture's grouping. */
export const FAKE_COLUMNS: readonly string[] = ['station', 'lighting', 'shift'];

/** The path the export prompt proposes in these tests: fixture (hand-built). */
export const FAKE_EXPORT_PATH = 'floorgap-export.csv';

/** The fixture's slice with the given rank (throws when there is none). */
export function sliceOfRank(report: Report, rank: number): SliceReport {
  const s = report.slices.find((x) => x.rank === rank);
  if (!s) throw new Error(`the fixture has no slice of rank ${rank}`);
  return s;
}

function rekey(s: SliceReport, key: Record<string, string>, rank: number): SliceReport {
  const label = Object.entries(key)
    .map(([k, v]) => `${k}=${v}`)
    .join(' · ');
  return { ...s, key, label, rank };
}

/**
 * The report the fake's `regroup` answers with: fixture (hand-built), grouping `lighting`, three slices
 * whose numbers are copied from fixture slices (dome ← S5's, ring ← S2's, diffuse ← S4's).
 */
export function regroupedFixture(): Report {
  const base = reportFixture();
  return {
    ...base,
    by: ['lighting'],
    slices: [
      rekey(sliceOfRank(base, 1), { lighting: 'dome' }, 1),
      rekey(sliceOfRank(base, 2), { lighting: 'ring' }, 2),
      rekey(sliceOfRank(base, 4), { lighting: 'diffuse' }, 3),
    ],
  };
}

/** The fake's breakdown of any slice by `shift`: fixture (hand-built), numbers copied from S1 and S3. */
export function drillFixture(column: string, values: readonly [string, string] = ['day', 'night']): SliceReport[] {
  const base = reportFixture();
  return [rekey(sliceOfRank(base, 5), { [column]: values[0] }, 1), rekey(sliceOfRank(base, 6), { [column]: values[1] }, 2)];
}

/** The fake's most confident dev errors: fixture (hand-built). */
export const EXAMPLES_FIXTURE: readonly ErrorExample[] = [
  { id: 'J0001805', label: 'good', pred: 'bridge', score: 0.975 },
  { id: 'J0002211', label: 'bridge', pred: 'good', score: 0.912 },
];

/** Every call the fake received, in order. */
export interface FakeCalls {
  readonly regroup: (readonly string[])[];
  readonly drill: { slice: string; column: string }[];
  readonly examples: string[];
  readonly exportSlices: { slices: string[]; path: string; force: boolean }[];
  /** one entry per search started */
  readonly discover: AbortSignal[];
  readonly exportFound: { slices: string[]; path: string; force: boolean }[];
}

/** Parts of the fake a test may replace. */
export interface FakeOptions {
  readonly report?: Report;
  readonly columns?: readonly string[];
  readonly regrouped?: Report;
  readonly drillValues?: readonly [string, string];
  /** the examples, or the message saying why there are none */
  readonly examples?: readonly ErrorExample[] | string;
  /** the one-line message exportSlices returns */
  readonly exportMessage?: string;
  /** the search; by default it never ends (the fake has no discovery of its own) */
  readonly discover?: ExplorerData['discover'];
}

/**
 * A recording fake of `ExplorerData`.
 * @example
 * const { data, calls } = fakeExplorerData();
 * await data.exportSlices([], 'x.csv', false); calls.exportSlices.length; // => 1
 */
export function fakeExplorerData(options: FakeOptions = {}): { data: ExplorerData; calls: FakeCalls } {
  const calls: FakeCalls = { regroup: [], drill: [], examples: [], exportSlices: [], discover: [], exportFound: [] };
  const data: ExplorerData = {
    report: options.report ?? reportFixture(),
    columns: options.columns ?? FAKE_COLUMNS,
    async regroup(by) {
      calls.regroup.push([...by]);
      // the same three slices whatever is asked; only the grouping's name follows the request
      return options.regrouped ?? { ...regroupedFixture(), by: by.length > 0 ? [...by] : null };
    },
    async drill(slice, column) {
      calls.drill.push({ slice: slice.label, column });
      return drillFixture(column, options.drillValues);
    },
    async examples(slice) {
      calls.examples.push(slice.label);
      const ex = options.examples ?? EXAMPLES_FIXTURE;
      return typeof ex === 'string' ? ex : [...ex];
    },
    async exportSlices(slices, path, force) {
      calls.exportSlices.push({ slices: slices.map((s) => s.label), path, force });
      return options.exportMessage ?? `wrote ${slices.length} slices to ${path}`;
    },
    discover(onProgress, signal) {
      calls.discover.push(signal);
      return options.discover ? options.discover(onProgress, signal) : new Promise<Discovery>(() => undefined);
    },
    async exportFound(slices, path, force) {
      calls.exportFound.push({ slices: slices.map((s) => s.label), path, force });
      return options.exportMessage ?? `wrote ${slices.length} found slices to ${path}`;
    },
  };
  return { data, calls };
}
