import { EXPORT_COLUMNS, exportCountSql, exportSql, type ExportQuery } from '../../rows/export-sql.js';
import { openSource } from '../../read/source.js';
import { normalizeSplit, SPLITS, type Split } from '../../core/split.js';
import { exportFormatFor, checkOutput, fingerprint, manifestPathFor, writeExport, type ExportHooks } from '../../output/export-file.js';
import { tempPathFor } from '../../output/write-atomic.js';
import { sanitize } from '../../terminal/sanitize.js';
import { namedGrouping, parseSliceKey, selectSlices, type ChosenSlice, type NamedSlice, type Selection } from '../../triage/select-slices.js';
import { VERSION } from '../../core/version.js';
import { error } from '../../core/errors.js';
import { analysisReads, analyzeWith, withDuck } from '../../app/analysis.js';
import { checkDiscoveryCells, checkDiscoveryColumns, exportSlicesOf, readDiscovery, type SavedDiscovery } from '../../app/discovered.js';
import { discover } from '../../discover/search.js';
import { DISCOVER_DEFAULTS, type DiscoveredSlice, type DiscoverSettings } from '../../discover/types.js';
import type { ExportSlice } from '../../rows/export-sql.js';
import { searchProgress } from '../progress.js';
import type { CliIO } from '../io.js';
import { writeOut } from '../io.js';
import { analysisHooks, analysisRequest, toLoadOptions, type AnalysisArgs } from '../options.js';

/** The manifest's schema name; it changes when a field is removed or changes meaning. */
export const EXPORT_SCHEMA = 'floorgap.export/1';

export interface ExportArgs extends AnalysisArgs {
  out: string;
  top?: number;
  slice?: string | string[];
  /** --discovered: the slices `floorgap discover` finds with the same options */
  discovered?: boolean;
  /** --from F: the slices of a saved discovery */
  from?: string;
  depth?: number;
  'min-lift'?: number;
  all?: boolean;
  splits: string;
  'errors-only': boolean;
  'limit-per-slice'?: number;
  raw: boolean;
  force: boolean;
  /** set by the explorer, whose marked slices come as `slice` keys; never a flag */
  chosenIn?: 'explorer';
  /**
   * set by the explorer for slices it found itself (discovered slices, of any columns): written as
   * given, with their own focus, rank and reason, while `slice` holds their keys for the manifest; never a flag
   */
  chosen?: readonly ChosenSlice[];
}

/**
 * Parses `--splits`: canonical names or accepted spellings, comma-separated, returned in split order.
 * @param text e.g. `dev,train`
 * @returns the splits, each once
 * @throws FloorgapError for an unknown split or an empty list
 * @example
 * parseSplits('val,train'); // => ['train', 'dev']
 */
export function parseSplits(text: string): Split[] {
  const out: Split[] = [];
  for (const raw of String(text).split(',').map((s) => s.trim()).filter(Boolean)) {
    const s = normalizeSplit(raw);
    if (s === null) throw error(`--splits ${text}: "${raw}" is not a split; expected some of ${SPLITS.join(', ')}`);
    if (!out.includes(s)) out.push(s);
  }
  if (out.length === 0) throw error(`--splits "${text}": expected some of ${SPLITS.join(', ')}, comma-separated`);
  return SPLITS.filter((s) => out.includes(s));
}

function asList(v: string | string[] | undefined): string[] {
  if (v === undefined) return [];
  return (Array.isArray(v) ? v : [v]).map(String);
}

/** How discovered slices are chosen: searched now, or read from a saved discovery. */
type DiscoveredMode = { readonly kind: 'discovered' } | { readonly kind: 'from'; readonly path: string };

/** The search options, as typed on the command line (a project file sets none of them). */
const SEARCH_FLAG = /^--(depth|min-lift|minLift|all|no-all)(=|$)/;

/**
 * `--discovered` or `--from F`, checked against the flags that choose slices otherwise; null for neither.
 * @param argv the command line as given: search options typed with --from are refused (they would do nothing)
 */
function discoveredModeOf(args: ExportArgs, argv: readonly string[]): DiscoveredMode | null {
  const from = args.from === undefined ? undefined : String(args.from);
  if (args.discovered === true && from !== undefined) {
    throw error('--from and --discovered choose slices in two ways (a saved discovery, or a search now); give one of them');
  }
  const typed = argv.find((a) => SEARCH_FLAG.test(a))?.split('=')[0];
  if (from === undefined && args.discovered !== true) {
    if (typed !== undefined) throw error(`${typed} is an option of the search: give it with --discovered`);
    return null;
  }
  const flag = from === undefined ? '--discovered' : '--from';
  if (asList(args.slice).length > 0) throw error(`${flag} and --slice choose slices in two ways; give one of them`);
  if (args.by !== undefined) throw error(`${flag}: discovered slices are conditions on the slice columns (--slice-cols), not a --by grouping; leave out --by`);
  if (from === undefined) return { kind: 'discovered' };
  if (from.trim() === '') throw error('--from: expected a file saved with floorgap discover --format json, e.g. --from found.json');
  if (typed !== undefined) {
    throw error(`--from takes the slices of a saved search, so ${typed} does nothing; leave it out, or search again with --discovered`);
  }
  return { kind: 'from', path: from };
}

/**
 * The selection the flags ask for, and the grouping the analysis must use for it: `--by` as given, or
 * the named slices' columns as a list (a column name may hold a comma).
 */
function selectionOf(args: ExportArgs): { selection: Selection; byColumns: string[] | undefined; named: NamedSlice[] } {
  const named = asList(args.slice).map(parseSliceKey);
  const top = args.top ?? null;
  if (named.length > 0 && top !== null) throw error('--top and --slice choose slices in two ways; give one of them');
  if (named.length === 0) return { selection: top === null ? { kind: 'flagged' } : { kind: 'top', n: top }, byColumns: undefined, named };
  // slices chosen ahead (the explorer's discovered ones) need no grouping of their own
  if (args.chosen) return { selection: { kind: 'named', slices: named }, byColumns: undefined, named };
  const grouping = namedGrouping(named);
  if (args.by !== undefined) {
    const by = String(args.by).split(',').map((s) => s.trim()).filter(Boolean);
    const bad = named.find((s) => s.pairs.length !== by.length || !s.pairs.every(([c]) => by.includes(c)));
    if (bad) throw error(`--slice "${bad.text}" does not name the --by columns ${by.join(', ')}; a named slice needs no --by (its columns define the grouping)`);
    return { selection: { kind: 'named', slices: named }, byColumns: undefined, named };
  }
  return { selection: { kind: 'named', slices: named }, byColumns: grouping ?? undefined, named };
}

/** The options that shaped the report and so the selection, as given (defaults filled in). */
const SHAPING: readonly (keyof AnalysisArgs)[] = [
  'union', 'where', 'label', 'pred', 'error', 'split', 'id', 'score', 'weight', 'run-column', 'run', 'by', 'slice-cols', 'bins', 'bin-method', 'max-cells',
  'floor', 'floor-table', 'annotators', 'floor-rule', 'cost-table', 'confidence', 'fdr', 'fdr-method', 'min-rows', 'floor-margin',
  'min-headroom', 'curve-exponent', 'label-cost',
];

/**
 * `floorgap export`: the rows behind the chosen slices of the report, with `fg_` columns, to a file
 * written by DuckDB, and a manifest beside it.
 * @param args parsed flags
 * @param io stdout/stderr
 * @param argv the command line as given, after `floorgap` (recorded in the manifest)
 * @param hooks optional steps inside the writer (tests use them to inject failures)
 */
export async function runExport(args: ExportArgs, io: CliIO, argv: readonly string[], hooks?: ExportHooks): Promise<number> {
  if (args.cells !== undefined) {
    throw error('export writes the rows behind slices, and --cells holds no rows; give the prediction tables the cells came from');
  }
  const out = String(args.out);
  if (out.trim() === '') throw error('--out: expected a file name, e.g. --out rows.csv');
  const format = exportFormatFor(out);
  const splits = parseSplits(args.splits);
  const limit = args['limit-per-slice'] ?? null;
  const mode = discoveredModeOf(args, argv);
  const { selection, byColumns, named } = mode ? { selection: { kind: 'flagged' } as Selection, byColumns: undefined, named: [] } : selectionOf(args);
  // a saved discovery is read and checked before any work
  const saved: SavedDiscovery | null = mode?.kind === 'from' ? await readDiscovery(mode.path) : null;
  const fromFile = mode?.kind === 'from' ? await fingerprint(mode.path) : null;
  const analysisArgs: AnalysisArgs = byColumns ? { ...args, byColumns } : args;
  const request = analysisRequest(analysisArgs, io);
  const loadOptions = toLoadOptions(analysisArgs);
  await checkOutput(out, args.force);
  // the engine writes the rows to this temporary file beside the destination, and nowhere else
  const tempData = tempPathFor(out);

  return withDuck(request.engine, { read: analysisReads(request), write: [tempData] }, async (duck) => {
    const source = await openSource(duck, loadOptions.source);
    if (source.columns.includes('fg_rows') && source.columns.includes('fg_errors')) {
      throw error(`${source.where}: holds ready-made cells (fg_rows, fg_errors, …); export writes rows, so give the prediction table itself`);
    }
    for (const c of source.columns) {
      if ((EXPORT_COLUMNS as readonly string[]).includes(c) || c.startsWith('__fg_')) {
        throw error(`${source.where}: column "${c}" clashes with a column export adds (${EXPORT_COLUMNS.join(', ')}); rename it`);
      }
    }
    for (const s of named) {
      for (const [c] of s.pairs) {
        if (!source.columns.includes(c) && c !== 'label' && c !== 'pred') {
          throw error(`--slice "${s.text}": no column "${c}"; the columns are ${source.columns.map((x) => JSON.stringify(x)).join(', ')}`);
        }
      }
    }
    if (mode?.kind === 'from') checkDiscoveryColumns(mode.path, saved!, source.columns);
    const analysis = await analyzeWith(duck, request, analysisHooks(analysisArgs, io));
    const { report, loaded } = analysis;
    // discovered slices: a search on the same cells, as floorgap discover runs it, or a saved one
    let found: { slices: readonly DiscoveredSlice[]; settings: DiscoverSettings } | null = null;
    if (mode?.kind === 'discovered') {
      const search = { depth: args.depth ?? DISCOVER_DEFAULTS.depth, minLift: args['min-lift'] ?? DISCOVER_DEFAULTS.minLift, top: args.top ?? DISCOVER_DEFAULTS.top, all: args.all === true };
      const discovery = discover(loaded.table, loaded.overviewColumns, analysis.context, analysis.options, search, searchProgress(io, args.progress ?? 'auto'));
      found = { slices: discovery.slices, settings: discovery.settings };
    } else if (mode?.kind === 'from') {
      const binned = loaded.columns.filter((c) => c.kind === 'binned').map((c) => c.name);
      checkDiscoveryCells(mode.path, saved!, loaded.table, report.run, binned);
      found = { slices: args.top === undefined ? saved!.slices : saved!.slices.slice(0, args.top), settings: saved!.settings };
    }
    const resolve = (c: string) => (source.columns.includes(c) ? c : c === 'label' ? loaded.roles.label ?? c : c === 'pred' ? loaded.roles.pred ?? c : c);
    const resolved: Selection =
      selection.kind === 'named'
        ? { kind: 'named', slices: selection.slices.map((s) => ({ text: s.text, pairs: s.pairs.map(([c, v]) => [resolve(c), v] as const) })) }
        : selection;
    const chosen = found ? [] : args.chosen ?? selectSlices(report, resolved);
    const exported: ExportSlice[] = found
      ? exportSlicesOf(found.slices)
      : chosen.map((c) => ({ key: c.slice.key, label: c.slice.label, focus: c.slice.focus, rank: c.slice.rank, reason: c.reason }));
    const query: ExportQuery = {
      columns: loaded.source.columns,
      plan: { roles: loaded.roles, splitColumn: loaded.roles.split ?? loaded.source.splitColumn!, where: loaded.plan.where, annotators: loaded.annotators },
      sliceColumns: loaded.columns,
      slices: exported,
      splits,
      errorsOnly: args['errors-only'],
      limitPerSlice: limit,
      neutralize: !args.raw,
      run: report.run !== null && loaded.roles.run ? { column: loaded.roles.run, value: report.run } : null,
    };
    let total = 0;
    const manifest = async () => {
      const counts = await duck.all(exportCountSql(query));
      total = counts.reduce((sum, r) => sum + Number(r.rows), 0);
      const perSplit = (pick: (r: Record<string, unknown>) => number) =>
        Object.fromEntries(splits.map((s) => [s, pick(counts.find((r) => r.split === s) ?? {})]));
      const inputs = [];
      for (const i of loaded.source.inputs) inputs.push({ ...(await fingerprint(i.path)), ...(i.split ? { split: i.split } : {}) });
      const tables: Record<string, unknown> = {};
      if (loadOptions.floorTable) tables.floor_table = await fingerprint(loadOptions.floorTable);
      if (loadOptions.costTable) tables.cost_table = await fingerprint(loadOptions.costTable);
      return {
        schema: EXPORT_SCHEMA,
        file: out,
        format,
        created: new Date().toISOString(),
        version: VERSION,
        argv: ['floorgap', ...argv],
        selection: {
          mode: mode?.kind ?? selection.kind,
          top: selection.kind === 'top' ? selection.n : null,
          named: named.map((s) => s.text),
          chosen_in: args.chosenIn ?? 'command line',
          by: report.by,
          splits,
          errors_only: args['errors-only'],
          limit_per_slice: limit,
          raw: args.raw,
          run: report.run,
          search: found?.settings ?? null,
          from: fromFile,
        },
        options: Object.fromEntries(SHAPING.filter((k) => analysisArgs[k] !== undefined).map((k) => [k, analysisArgs[k]])),
        slices: found
          ? found.slices.map((s, i) => manifestDiscovered(s, exported[i], mode!.kind, perSplit((r) => Number(r[`s${i}`] ?? 0))))
          : chosen.map((c, i) => manifestSlice(c, (r) => Number(r[`s${i}`] ?? 0), perSplit, selection)),
        rows: { total, ...perSplit((r) => Number(r.rows ?? 0)) },
        columns: [...loaded.source.columns, ...EXPORT_COLUMNS],
        inputs,
        ...tables,
      };
    };
    const written = await writeExport(duck, { path: out, format, sql: exportSql(query), force: args.force, manifest, hooks, tempData });
    if (exported.length === 0) {
      if (mode) {
        const why = mode.kind === 'from' ? `${mode.path} lists no slices` : 'the search found no slices';
        io.stderr.write(`floorgap: ${sanitize(why)}, so no rows were written\n`);
      } else {
        const why = selection.kind === 'flagged' ? 'no slice is flagged' : 'the report has no slices';
        io.stderr.write(`floorgap: ${why}, so no rows were written; choose slices with --top N or --slice KEY\n`);
      }
    }
    await writeOut(
      io,
      `wrote ${total} rows of ${exported.length} slice${exported.length === 1 ? '' : 's'} to ${sanitize(written.data)} (manifest ${sanitize(manifestPathFor(out))})\n`,
    );
    return 0;
  });
}

function manifestSlice(
  c: ChosenSlice,
  count: (r: Record<string, unknown>) => number,
  perSplit: (pick: (r: Record<string, unknown>) => number) => Record<string, number>,
  selection: Selection,
) {
  const rows = perSplit(count);
  return {
    rank: c.slice.rank,
    label: c.slice.label,
    key: c.slice.key,
    focus: c.slice.focus,
    flagged: c.slice.flagged,
    chosen: c.chosen === 'top' && selection.kind === 'top' ? `top ${selection.n}` : c.chosen,
    named: c.named,
    reason: c.reason,
    rows: { total: Object.values(rows).reduce((a, b) => a + b, 0), ...rows },
  };
}

/** A discovered slice in the manifest: what every chosen slice records, and the search's numbers. */
function manifestDiscovered(s: DiscoveredSlice, e: ExportSlice, chosen: DiscoveredMode['kind'], rows: Record<string, number>) {
  return {
    rank: s.rank,
    label: s.label,
    key: s.conditions,
    focus: e.focus,
    flagged: s.flagged,
    chosen,
    named: null,
    reason: e.reason,
    part: s.part,
    lift: s.lift,
    q: s.q,
    part_headroom: s.part_headroom,
    explained_by: s.explained_by,
    rows: { total: Object.values(rows).reduce((a, b) => a + b, 0), ...rows },
  };
}
