/**
 * Benchmark (`npm run bench`, not part of `npm test`): floorgap on 1M- and 10M-row prediction tables,
 * CSV and Parquet, side by side with the reference engine's floor — DuckDB alone running the bare
 * GROUP BY that computes the same cells over the same file — and with the I/O floor, a plain read of
 * the file. Every measurement runs `--reps` times (default 3), interleaved, and reports the median.
 * The cells → slices roll-up (arquero, src/slices/rollup.ts) is measured against the previous loop
 * over integer keys (bench/loop-rollup.ts) on the bench tables' cells and on synthetic cells, with the
 * regroup (roll-up + triage) beside its targets. `floorgap discover` at depth 2 and 3 runs from the
 * cached cells of each table, whole process, with its peak RSS beside the report's.
 *
 *   npm run bench                                  # 1M and 10M rows, CSV and Parquet
 *   npm run bench -- --rows 1000000 --reps 5       # other sizes and repetitions
 *
 * Tables are generated with the demo generator into a temporary folder (never into the repository)
 * and removed at the end. Results: bench/results/latest.json and a markdown table on stdout.
 */
import { spawnSync } from 'node:child_process';
import { createReadStream, existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir, totalmem } from 'node:os';
import { join } from 'node:path';
import { median } from 'simple-statistics';
import { writeBenchTable } from './bench-table.js';
import { loopRollupByRun, loopRollupSlices, sliceDifferences } from './loop-rollup.js';
import { SHAPE_LEGEND, SHAPE_NAMES, SYNTHETIC_COLUMNS, syntheticCells, type Shape } from './synthetic-cells.js';
import { cellColumns, runsOf, type CellTable } from '../src/cells/cell-table.js';
import { openDuck, type Duck } from '../src/sql/duck.js';
import { loadCells, type Loaded } from '../src/cells/load.js';
import { type LoadOptions } from '../src/cells/plan.js';
import { cacheKey, readCache } from '../src/cells/cache.js';
import { rollupByRun, rollupSlices, type SliceStats } from '../src/slices/rollup.js';
import { literal } from '../src/sql/quote.js';
import { SPLITS } from '../src/core/split.js';
import { renderJson } from '../src/render/json.js';
import { buildReport, chooseRun, type ReportContext } from '../src/triage/report.js';
import { DEFAULT_TRIAGE_OPTIONS, type Report } from '../src/triage/types.js';
import { sortSlices } from '../src/tui/model.js';

// ---- options ----
const args = process.argv.slice(2);
const opt = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] !== undefined ? args[i + 1] : fallback;
};
const sizes = opt('rows', '1000000,10000000').split(',').map(Number);
const reps = Math.max(3, Number(opt('reps', '3')));
const formats = opt('formats', 'csv,parquet').split(',') as ('csv' | 'parquet')[];
const hasTime = existsSync('/usr/bin/time');
const CLI = 'dist/cli.js';

const now = () => performance.now();
const log = (s: string) => process.stderr.write(s + '\n');

const CONTEXT: ReportContext = { inputs: [], roles: {}, where: null, version: 'bench', warnings: [] };

/** The 2-column grouping of the regroup (the bench table's board × operator: 960 slices). */
const BENCH_BY = ['board', 'operator'];
/** Targets of the regroup (roll-up + triage): on the 10M-row bench table, and at 200,000 synthetic cells of the audit shape. */
const REGROUP_TARGET_10M = 100;
const REGROUP_TARGET_AUDIT = 300;
/** Sizes of the synthetic cell tables. */
const SYNTHETIC_CELLS = [50_000, 200_000];

// ---- measurements ----

/** The I/O floor: a plain Node read of the whole file. */
async function plainRead(path: string): Promise<number> {
  const t0 = now();
  let bytes = 0;
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) bytes += (chunk as Buffer).length;
  if (bytes === 0) throw new Error('empty file');
  return now() - t0;
}

/** The bare GROUP BY that computes the same cells as floorgap: the slice columns (numeric one binned at floorgap's edges) × split. */
function bareSql(loaded: Loaded, path: string, format: 'csv' | 'parquet'): string {
  const from = format === 'csv' ? `read_csv(${literal(path)})` : `read_parquet(${literal(path)})`;
  const keys = loaded.columns.map((c, i) => {
    if (c.kind === 'binned' && c.edges?.length) {
      const whens = c.edges.map((e, b) => `WHEN ${c.name} < ${e} THEN ${b + 1}`).join(' ');
      return `CASE WHEN ${c.name} IS NULL THEN 0 ${whens} ELSE ${c.edges.length + 1} END AS k${i}`;
    }
    return `${c.name} AS k${i}`;
  });
  const names = loaded.columns.map((_, i) => `k${i}`);
  const index = new Map(loaded.columns.map((c, i) => [c.name, `k${i}`]));
  const groupBy =
    loaded.grouping.kind === 'cross'
      ? `split, ${names.join(', ')}`
      : `GROUPING SETS (${loaded.grouping.sets.map((s) => `(split, ${s.map((n) => index.get(n)).join(', ')})`).join(', ')})`;
  return `SELECT split, ${keys.join(', ')}, count(*) AS n, sum(CASE WHEN label = pred THEN 0 ELSE 1 END) AS e FROM ${from} GROUP BY ${groupBy}`;
}

/** DuckDB alone: the query runs and its result stays in DuckDB (no conversion to JS values is timed). */
async function bare(duck: Duck, sql: string): Promise<number> {
  const t0 = now();
  await duck.connection.run(sql);
  return now() - t0;
}

interface Phases {
  scan: number;
  slices: number;
  triage: number;
  render: number;
  total: number;
}

function loadOptionsFor(path: string, floors: string): LoadOptions {
  return { source: { files: [path], perSplit: {} }, roles: {}, where: null, by: null, sliceCols: null, bins: 5, maxCells: 200_000, floor: null, floorTable: floors };
}

/** floorgap in-process: scan to cells, cells to slices, triage, render. */
async function inProcess(path: string, floors: string): Promise<{ phases: Phases; loaded: Loaded; report: Report }> {
  const t0 = now();
  const duck = await openDuck({ threads: 2, memoryLimit: '2GB' });
  let loaded: Loaded;
  try {
    loaded = await loadCells(duck, loadOptionsFor(path, floors));
  } finally {
    duck.close();
  }
  const t1 = now();
  const report = buildReport(loaded.table, loaded.by, loaded.overviewColumns, CONTEXT, DEFAULT_TRIAGE_OPTIONS);
  const t2 = now();
  renderJson(report);
  const t3 = now();
  // cells → slices: the rollups buildReport makes, timed again on their own; triage is the rest
  const t4 = now();
  for (const c of loaded.overviewColumns) rollupSlices(loaded.table, [c]);
  rollupSlices(loaded.table, []);
  const slices = now() - t4;
  return { phases: { scan: t1 - t0, slices, triage: Math.max(0, t2 - t1 - slices), render: t3 - t2, total: t3 - t0 }, loaded, report };
}

/** Where the scan's time goes: each engine statement classified by what it does; the rest is JS. */
async function scanBreakdown(path: string, floors: string): Promise<Record<string, number>> {
  const t0 = now();
  const duck = await openDuck({ threads: 2, memoryLimit: '2GB' });
  const parts: Record<string, number> = { 'open engine': now() - t0 };
  const kind = (sql: string): string => {
    const s = sql.replace(/\s+/g, ' ');
    if (/^DESCRIBE|^CREATE OR REPLACE VIEW|header = false/.test(s)) return 'open inputs';
    if (/fg_sample AS SELECT|current_setting|^SET threads/.test(s)) return 'sample (first 100,000 rows)';
    if (/quantile_cont/.test(s)) return 'bin edges';
    if (/FILTER \(WHERE n = 1\)/.test(s)) return 'cross-size estimate';
    if (/^CREATE TEMP TABLE fg_cells_/.test(s)) return 'cell query';
    if (/fg_cells_|^DROP TABLE/.test(s)) return 'read cells';
    if (/read_csv\(.*floors/.test(s)) return 'floor table';
    return 'profile';
  };
  const wrap = <T,>(fn: (sql: string) => Promise<T>) => async (sql: string) => {
    const t = now();
    try {
      return await fn(sql);
    } finally {
      const k = kind(sql);
      parts[k] = (parts[k] ?? 0) + now() - t;
    }
  };
  // every statement goes through run (runAndReadAll calls it too)
  const conn = duck.connection as unknown as { run: (sql: string) => Promise<unknown> };
  conn.run = wrap(conn.run.bind(conn));
  const t1 = now();
  try {
    await loadCells(duck, loadOptionsFor(path, floors));
  } finally {
    duck.close();
  }
  const engine = Object.entries(parts).reduce((a, [k, v]) => (k === 'open engine' ? a : a + v), 0);
  parts['JS (plan, checks, typed arrays)'] = now() - t1 - engine;
  return Object.fromEntries(Object.entries(parts).map(([k, v]) => [k, Math.round(v)]));
}

/** The whole `floorgap report --format json` process (or another command's), with its peak RSS. */
function reportProcess(path: string, floors: string, extra: string[] = [], env: Record<string, string> = {}, command = 'report'): { ms: number; rssMb: number | null; stdout: string } {
  const argv = [process.execPath, CLI, command, path, '--floor-table', floors, '--format', 'json', '--progress', 'never', ...extra];
  const t0 = now();
  const r = hasTime
    ? spawnSync('/usr/bin/time', ['-f', '%M', ...argv], { encoding: 'utf8', maxBuffer: 1 << 28, env: { ...process.env, ...env } })
    : spawnSync(argv[0], argv.slice(1), { encoding: 'utf8', maxBuffer: 1 << 28, env: { ...process.env, ...env } });
  const ms = now() - t0;
  if (r.status !== 0) throw new Error(`report failed: ${r.stderr}`);
  const kb = hasTime ? Number(r.stderr.trim().split('\n').pop()) : NaN;
  return { ms, rssMb: Number.isFinite(kb) ? Math.round(kb / 1024) : null, stdout: r.stdout };
}

/** floorgap's cells equal the bare GROUP BY's: counts exactly, weighted sums to 1e-9 relative. */
function checkCells(loaded: Loaded, bareRows: readonly Record<string, unknown>[], floorOf: (pkg: string) => number): { cells: number; bare: number; equal: boolean; problems: string[] } {
  const t = cellColumns(loaded.table);
  const size = loaded.table.size;
  const names = loaded.columns.map((c) => c.name);
  const label = (c: number, v: unknown) => {
    const col = loaded.columns[c];
    if (col.kind === 'binned' && col.edges?.length) {
      const i = Number(v);
      const e = col.edges;
      return i === 0 ? '(missing)' : i === 1 ? `< ${e[0]}` : i === e.length + 1 ? `>= ${e[e.length - 1]}` : `[${e[i - 2]}, ${e[i - 1]})`;
    }
    return v === null ? null : String(v);
  };
  const bareMap = new Map<string, { n: number; e: number }>();
  for (const r of bareRows) {
    const key = JSON.stringify([String(r.split), ...names.map((_, c) => (r[`k${c}`] === null ? null : label(c, r[`k${c}`])))]);
    bareMap.set(key, { n: Number(r.n), e: Number(r.e) });
  }
  const problems: string[] = [];
  const pkg = names.indexOf('package');
  for (let i = 0; i < size; i++) {
    const key = JSON.stringify([SPLITS[t.split[i]], ...names.map((_, c) => (t.codes[c][i] < 0 ? null : t.dicts[c][t.codes[c][i]]))]);
    const b = bareMap.get(key);
    const rel = (x: number, y: number) => Math.abs(x - y) <= 1e-9 * Math.max(1, Math.abs(y));
    if (!b) problems.push(`no bare group for ${key}`);
    else {
      const { rows, errors, weight, floorSum } = t.sums;
      if (rows[i] !== b.n || errors[i] !== b.e) problems.push(`${key}: rows ${rows[i]}/${b.n}, errors ${errors[i]}/${b.e}`);
      if (!rel(weight[i], b.n)) problems.push(`${key}: weight ${weight[i]} vs ${b.n}`);
      if (pkg >= 0 && t.codes[pkg][i] >= 0 && !rel(floorSum[i], b.n * floorOf(t.dicts[pkg][t.codes[pkg][i]]))) problems.push(`${key}: floor sum ${floorSum[i]}`);
    }
    if (problems.length > 5) break;
  }
  return { cells: size, bare: bareRows.length, equal: problems.length === 0 && size === bareRows.length, problems };
}

function timeMs(fn: () => unknown): number {
  const t0 = now();
  fn();
  return now() - t0;
}

// ---- the arquero roll-up against the previous loop (bench/loop-rollup.ts) ----

/** A roll-up engine: the slices of one grouping (of one run), and the same slices per run. */
interface Engine {
  slices(cells: CellTable, by: readonly string[], run?: string | null): SliceStats[];
  byRun(cells: CellTable, by: readonly string[]): Map<string, SliceStats[]>;
}
const ARQUERO: Engine = { slices: rollupSlices, byRun: rollupByRun };
const LOOP: Engine = { slices: loopRollupSlices, byRun: loopRollupByRun };

/**
 * Every roll-up `buildReport` makes for `by` (null: the overview, one grouping per column of
 * `overview`): each grouping's slices and the overall slice, of the reported run; with several runs,
 * the same per run. Each result is named by its grouping (and run).
 */
function rollupsFor(engine: Engine, cells: CellTable, by: readonly string[] | null, overview: readonly string[], run: string | null, runs: number): { what: string; slices: SliceStats[] }[] {
  const groupings = by && by.length > 0 ? [by] : overview.map((c) => [c]);
  const out = [...groupings, []].map((g) => ({ what: `[${g.join(', ')}]`, slices: engine.slices(cells, g, run) }));
  // runs by name and slices by key: the order of a curve's map and lists is no part of its result
  if (runs > 1) for (const g of [[], ...groupings]) for (const [r, slices] of [...engine.byRun(cells, g)].sort((x, y) => (x[0] < y[0] ? -1 : 1))) {
      const id = (s: SliceStats) => JSON.stringify(Object.entries(s.key));
      out.push({ what: `[${g.join(', ')}] run ${r}`, slices: [...slices].sort((x, y) => (id(x) < id(y) ? -1 : id(x) > id(y) ? 1 : 0)) });
    }
  return out;
}

interface EngineRow {
  /** where the cells come from: a bench table ("10,000,000 rows, csv") or "synthetic" */
  source: string;
  shape: string;
  cells: number;
  by: string;
  slices: number;
  arquero_rollup_ms: number;
  loop_rollup_ms: number;
  arquero_over_loop: number;
  /** buildReport with the arquero roll-up: roll-up + triage */
  regroup_ms: number;
  /** regroup − arquero roll-up (medians): runsOf, chooseRun, priors, curves, triage */
  triage_ms: number;
  target_regroup_ms: number | null;
  target_met: boolean | null;
  same_sums: boolean;
  problems: string[];
}

/**
 * The arquero roll-up and the loop on the same cells, interleaved (who goes first alternates), and the
 * regroup (`buildReport`, roll-up + triage); medians of `reps` runs after one untimed warm-up run of
 * each. Checks that both engines give the same slices and sums (to 1e-9 relative).
 */
function compareEngines(source: string, shape: string, cells: CellTable, by: readonly string[] | null, overview: readonly string[], target: number | null): EngineRow {
  const runs = runsOf(cells).length;
  const run = chooseRun(cells, null);
  const report = () => buildReport(cells, by, by ? [] : overview, CONTEXT, DEFAULT_TRIAGE_OPTIONS);
  // the warm-up run, and the check
  const a = rollupsFor(ARQUERO, cells, by, overview, run, runs);
  const l = rollupsFor(LOOP, cells, by, overview, run, runs);
  const problems: string[] = [];
  if (a.map((x) => x.what).join('|') !== l.map((x) => x.what).join('|')) problems.push(`roll-ups differ: ${a.map((x) => x.what).join(' ')} against ${l.map((x) => x.what).join(' ')}`);
  else a.forEach((x, i) => problems.push(...sliceDifferences(x.slices, l[i].slices).map((p) => `${x.what}: ${p}`)));
  const slices = report().slices.length;
  const aq: number[] = [];
  const lp: number[] = [];
  const regroup: number[] = [];
  for (let r = 0; r < reps; r++) {
    const arq = () => aq.push(timeMs(() => rollupsFor(ARQUERO, cells, by, overview, run, runs)));
    const loop = () => lp.push(timeMs(() => rollupsFor(LOOP, cells, by, overview, run, runs)));
    if (r % 2 === 0) {
      arq();
      loop();
    } else {
      loop();
      arq();
    }
    regroup.push(timeMs(report));
  }
  const byName = by && by.length > 0 ? by.join(' × ') : `overview (${overview.length} columns)`;
  if (problems.length > 0) log(`  ${source}, ${shape}, ${byName}: the arquero roll-up and the loop DIFFER: ${problems.slice(0, 3).join('; ')}`);
  const row: EngineRow = {
    source,
    shape,
    cells: cells.size,
    by: byName,
    slices,
    arquero_rollup_ms: median(aq),
    loop_rollup_ms: median(lp),
    arquero_over_loop: median(aq) / median(lp),
    regroup_ms: median(regroup),
    triage_ms: Math.max(0, median(regroup) - median(aq)),
    target_regroup_ms: target,
    target_met: target === null ? null : median(regroup) <= target,
    same_sums: problems.length === 0,
    problems: problems.slice(0, 5),
  };
  log(`  ${source}, ${shape}, ${byName}: arquero ${row.arquero_rollup_ms.toFixed(0)} ms · loop ${row.loop_rollup_ms.toFixed(0)} ms · regroup ${row.regroup_ms.toFixed(0)} ms`);
  return row;
}

// ---- the run ----
const machine = {
  cores: cpus().length,
  cpu: cpus()[0]?.model ?? 'unknown',
  memoryGiB: Math.round(totalmem() / 2 ** 30),
  node: process.version,
  /** 1-minute load average when the run started (a shared machine runs other work too) */
  loadBefore: Number(loadavg()[0].toFixed(2)),
};
log(`machine: ${machine.cores} cores (${machine.cpu}), ${machine.memoryGiB} GiB; ${reps} repetitions each`);

// process start-up, and the part of it the explorer's modules (ink, react) take: the same imports
// without src/cli/commands/explore
const startup: number[] = [];
const startupWithoutExplorer: number[] = [];
const light = `await import('yargs'); for (const m of ['report', 'check', 'export', 'sql', 'demo']) await import('./dist/cli/commands/' + m + '.js');`;
for (let r = 0; r < reps; r++) {
  let t0 = now();
  spawnSync(process.execPath, [CLI, '--version']);
  startup.push(now() - t0);
  t0 = now();
  spawnSync(process.execPath, ['--input-type=module', '-e', light]);
  startupWithoutExplorer.push(now() - t0);
}

type Row = Record<string, unknown>;
const results: Row[] = [];
const interactive: Row[] = [];
const engines: EngineRow[] = [];
let frameNote: string | null = null;
/** The explorer's frame hook: applies a key and renders the table view at a size (bench/frame.tsx). */
type FrameFn = (report: Report, width: number, height: number, key?: string, from?: unknown) => { frame: string; state: unknown };
let renderFrame: FrameFn | null = null;
try {
  const mod = (await import('./frame.js')) as { renderFrameForBench?: FrameFn };
  renderFrame = mod.renderFrameForBench ?? null;
  if (!renderFrame) frameNote = 'bench/frame.tsx has no renderFrameForBench: no ink frame measured';
} catch (e) {
  frameNote = `bench/frame.tsx could not be loaded (${(e as Error).message.split('\n')[0]}): no ink frame measured`;
}

for (const rows of sizes) {
  const dir = mkdtempSync(join(tmpdir(), 'floorgap-bench-'));
  try {
    log(`generating ${rows.toLocaleString('en')} rows in ${dir} …`);
    const files = await writeBenchTable(dir, rows);
    const { statSync } = await import('node:fs');
    for (const format of formats) {
      const path = files[format];
      const bytes = statSync(path).size;
      log(`${rows.toLocaleString('en')} rows, ${format} (${Math.round(bytes / 2 ** 20)} MB)`);
      const io: number[] = [];
      const bareMs: number[] = [];
      const phases: Phases[] = [];
      const proc: number[] = [];
      let rss = 0;
      let loaded: Loaded | null = null;
      let report: Report | null = null;
      let bareRows: Record<string, unknown>[] = [];
      let sql = '';
      const duck = await openDuck({ threads: 2, memoryLimit: '2GB' });
      try {
        for (let r = 0; r < reps; r++) {
          // interleaved, so that a slow moment of a shared machine hits every measurement alike
          io.push(await plainRead(path));
          const inp = await inProcess(path, files.floors);
          phases.push(inp.phases);
          loaded ??= inp.loaded;
          report ??= inp.report;
          sql ||= bareSql(loaded, path, format);
          const b = await bare(duck, sql);
          bareMs.push(b);
          if (bareRows.length === 0) bareRows = await duck.all(sql);
          const p = reportProcess(path, files.floors, ['--no-cache']);
          proc.push(p.ms);
          rss = Math.max(rss, p.rssMb ?? 0);
          log(`  rep ${r + 1}: read ${io[r].toFixed(0)} ms · bare ${b.toFixed(0)} ms · in-process ${inp.phases.total.toFixed(0)} ms · process ${p.ms.toFixed(0)} ms`);
        }
      } finally {
        duck.close();
      }
      const breakdown = await scanBreakdown(path, files.floors);
      const floorOf = (pkg: string) => ({ '0201': 0.12, '0402': 0.04, '0603': 0.03, QFN: 0.03, BGA: 0.05, SOIC: 0.02 })[pkg] ?? 0;
      const check = checkCells(loaded!, bareRows, floorOf);
      const m = (f: (p: Phases) => number) => median(phases.map(f));
      const row: Row = {
        rows,
        format,
        mb: Math.round(bytes / 2 ** 20),
        cells: loaded!.table.size,
        grouping: loaded!.grouping.kind,
        io_ms: median(io),
        bare_group_by_ms: median(bareMs),
        scan_ms: m((p) => p.scan),
        slices_ms: m((p) => p.slices),
        triage_ms: m((p) => p.triage),
        render_ms: m((p) => p.render),
        in_process_ms: m((p) => p.total),
        process_ms: median(proc),
        process_ratio: median(proc) / median(bareMs),
        in_process_ratio: m((p) => p.total) / median(bareMs),
        peak_rss_mb: rss || null,
        cells_equal_bare_group_by: check.equal,
        cell_check_problems: check.problems,
        scan_breakdown_ms: breakdown,
        bare_sql: sql,
      };
      results.push(row);

      if (format === formats[0]) {
        // the arquero roll-up against the loop, and the regroup, on this table's cells
        const target = rows === 10_000_000 ? REGROUP_TARGET_10M : null;
        for (const by of [BENCH_BY, null]) engines.push(compareEngines(`${rows.toLocaleString('en')} rows, ${format}`, 'bench table', loaded!.table, by, loaded!.overviewColumns, target));
        // interactive costs on this table's cells
        const resort: number[] = [];
        const frames: number[] = [];
        const big = buildReport(loaded!.table, ['board', 'operator', 'sharpness'], [], CONTEXT, DEFAULT_TRIAGE_OPTIONS);
        const report2000: Report = { ...big, slices: big.slices.slice(0, 2000) };
        let state: unknown;
        for (let r = 0; r < reps; r++) {
          resort.push(timeMs(() => sortSlices(report2000.slices, r % 2 ? 'headroom' : 'dev', true)));
          if (renderFrame) {
            const keys = ['s', 'j', 'h', 'j', 's'];
            for (const key of keys) {
              const t0 = now();
              const out = renderFrame(report2000, 100, 40, key, state);
              frames.push(now() - t0);
              state = out.state;
            }
          }
        }
        // reopening the unchanged file: the cells come from the cache
        const cacheHome = mkdtempSync(join(tmpdir(), 'floorgap-bench-cache-'));
        const reopen: number[] = [];
        const reopenRss: number[] = [];
        const discoverMs: Record<number, number[]> = { 2: [], 3: [] };
        const discoverRss: Record<number, number[]> = { 2: [], 3: [] };
        let sameAsScan = false;
        try {
          const first = reportProcess(files[format], files.floors, [], { XDG_CACHE_HOME: cacheHome });
          for (let r = 0; r < reps; r++) {
            const p = reportProcess(files[format], files.floors, [], { XDG_CACHE_HOME: cacheHome });
            reopen.push(p.ms);
            if (p.rssMb !== null) reopenRss.push(p.rssMb);
            sameAsScan = p.stdout === first.stdout;
            // discover from the same cached cells, whole process, depth 2 and 3
            for (const depth of [2, 3]) {
              const q = reportProcess(files[format], files.floors, ['--depth', String(depth)], { XDG_CACHE_HOME: cacheHome }, 'discover');
              discoverMs[depth].push(q.ms);
              if (q.rssMb !== null) discoverRss[depth].push(q.rssMb);
            }
          }
        } finally {
          rmSync(cacheHome, { recursive: true, force: true });
        }
        // the same reopen in-process: cache key (file stamps), cached cells, report, JSON
        const reopenIn: number[] = [];
        const cacheHome2 = mkdtempSync(join(tmpdir(), 'floorgap-bench-cache-'));
        try {
          const opts = loadOptionsFor(files[format], files.floors);
          const cacheDirPath = join(cacheHome2, 'cells');
          const d2 = await openDuck({ threads: 2 });
          try {
            await loadCells(d2, opts, { cache: { dir: cacheDirPath, cwd: process.cwd(), version: 'bench' } });
          } finally {
            d2.close();
          }
          for (let r = 0; r < reps; r++) {
            const t0 = now();
            const key = (await cacheKey(opts, 'bench', process.cwd()))!;
            const hit = (await readCache(cacheDirPath, key))!;
            renderJson(buildReport(hit.table, hit.by, hit.overviewColumns, CONTEXT, DEFAULT_TRIAGE_OPTIONS));
            reopenIn.push(now() - t0);
          }
        } finally {
          rmSync(cacheHome2, { recursive: true, force: true });
        }
        interactive.push({
          reopen_in_process_ms: median(reopenIn),
          rows,
          format,
          cells: loaded!.table.size,
          resort_2000_ms: median(resort),
          frame_2000_ms: frames.length ? median(frames) : null,
          frame_2000_max_ms: frames.length ? Math.max(...frames) : null,
          reopen_ms: median(reopen),
          reopen_rss_mb: reopenRss.length ? Math.max(...reopenRss) : null,
          reopen_same_report: sameAsScan,
          discover_depth2_ms: median(discoverMs[2]),
          discover_depth3_ms: median(discoverMs[3]),
          discover_depth2_rss_mb: discoverRss[2].length ? Math.max(...discoverRss[2]) : null,
          discover_depth3_rss_mb: discoverRss[3].length ? Math.max(...discoverRss[3]) : null,
        });
      }
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

// synthetic cells: the arquero roll-up against the loop, and the regroup
for (const n of SYNTHETIC_CELLS) {
  for (const shape of ['cross', 'audit', 'sets'] as const) {
    log(`synthetic cells: ${n.toLocaleString('en')}, ${SHAPE_LEGEND[shape]}`);
    const cells = syntheticCells(n, shape);
    const target = shape === 'audit' && n === 200_000 ? REGROUP_TARGET_AUDIT : null;
    // grouping sets hold no 3-column set: such a `by` takes another scan, not a roll-up
    const bys = shape === 'sets' ? [BENCH_BY, null] : [BENCH_BY, [...BENCH_BY, 'station'], null];
    for (const by of bys) engines.push(compareEngines('synthetic', SHAPE_NAMES[shape], cells, by, SYNTHETIC_COLUMNS, target));
  }
}
const result = {
  when: new Date().toISOString(),
  machine: { ...machine, loadAfter: Number(loadavg()[0].toFixed(2)) },
  reps,
  startup_ms: median(startup),
  startup_without_explorer_ms: median(startupWithoutExplorer),
  scans: results,
  interactive,
  /** the arquero roll-up against the previous loop (bench/loop-rollup.ts), and the regroup, with its targets */
  rollup_engines: engines,
  notes: [...(frameNote ? [frameNote] : []), ...engines.filter((e) => !e.same_sums).map((e) => `the arquero roll-up and the loop DIFFER on ${e.source}, ${e.shape}, ${e.by}: ${e.problems[0]}`)],
};
mkdirSync('bench/results', { recursive: true });
writeFileSync('bench/results/latest.json', JSON.stringify(result, null, 2) + '\n');

// ---- the markdown table ----
const f0 = (x: unknown) => (typeof x === 'number' ? x.toFixed(0) : 'n/a');
const f2 = (x: unknown) => (typeof x === 'number' ? x.toFixed(2) : 'n/a');
const out: string[] = [];
out.push(`Machine: ${machine.cores} cores (${machine.cpu}), ${machine.memoryGiB} GiB memory, Node ${machine.node}; load average ${machine.loadBefore} at the start, ${result.machine.loadAfter} at the end; medians of ${reps} runs.`, '');
out.push('| rows | format | MB | cells | plain read | DuckDB bare GROUP BY | floorgap scan → cells | cells → slices | triage | render | in-process total | `report` process | process ÷ GROUP BY | in-process ÷ GROUP BY | peak RSS (MB) | cells = GROUP BY |');
out.push('|---:|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---|');
for (const r of results) {
  out.push(
    `| ${Number(r.rows).toLocaleString('en')} | ${r.format} | ${r.mb} | ${Number(r.cells).toLocaleString('en')} | ${f0(r.io_ms)} | ${f0(r.bare_group_by_ms)} | ${f0(r.scan_ms)} | ${f0(r.slices_ms)} | ${f0(r.triage_ms)} | ${f0(r.render_ms)} | ${f0(r.in_process_ms)} | ${f0(r.process_ms)} | ${f2(r.process_ratio)} | ${f2(r.in_process_ratio)} | ${r.peak_rss_mb ?? 'n/a'} | ${r.cells_equal_bare_group_by ? 'yes' : 'NO'} |`,
  );
}
out.push('', 'Times in ms.', '');
out.push('| rows | cells | re-sort 2,000 slices | ink frame, 2,000 slices (median / max) | reopen (cached cells), whole process | reopen in-process (stamps, cache, report) | discover depth 2 / 3 (cached cells, whole process; targets 2,000 / 6,000) | peak RSS MB: report reopen / discover 2 / 3 |');
out.push('|---:|---:|---:|---:|---:|---:|---:|---:|');
for (const r of interactive) {
  out.push(
    `| ${Number(r.rows).toLocaleString('en')} | ${Number(r.cells).toLocaleString('en')} | ${f2(r.resort_2000_ms)} | ${r.frame_2000_ms === null ? 'n/a' : `${f0(r.frame_2000_ms)} / ${f0(r.frame_2000_max_ms)}`} | ${f0(r.reopen_ms)} | ${f0(r.reopen_in_process_ms)} | ${f0(r.discover_depth2_ms)} / ${f0(r.discover_depth3_ms)} | ${r.reopen_rss_mb ?? 'n/a'} / ${r.discover_depth2_rss_mb ?? 'n/a'} / ${r.discover_depth3_rss_mb ?? 'n/a'} |`,
  );
}
out.push('', 'The arquero roll-up against the previous loop (bench/loop-rollup.ts), and the regroup (`buildReport`: roll-up + triage), ms:', '');
out.push('| cells from | shape | cells | by | slices | arquero roll-up | loop roll-up | arquero ÷ loop | regroup (arquero) | of which triage | target | same sums |');
out.push('|---|---|---:|---|---:|---:|---:|---:|---:|---:|---|---|');
for (const e of engines) {
  const target = e.target_regroup_ms === null ? '' : `≤ ${e.target_regroup_ms}: ${e.target_met ? 'met' : `missed by ${f0(e.regroup_ms - e.target_regroup_ms)}`}`;
  out.push(
    `| ${e.source} | ${e.shape} | ${e.cells.toLocaleString('en')} | ${e.by} | ${e.slices.toLocaleString('en')} | ${f0(e.arquero_rollup_ms)} | ${f0(e.loop_rollup_ms)} | ${f2(e.arquero_over_loop)} | ${f0(e.regroup_ms)} | ${f0(e.triage_ms)} | ${target} | ${e.same_sums ? 'yes' : 'NO'} |`,
  );
}
out.push('', `Synthetic cells (no files; 7 columns of 6, 6, 48, 6, 5, 20 and 5 values): ${(Object.keys(SHAPE_NAMES) as Shape[]).map((k) => `${SHAPE_NAMES[k]}: ${SHAPE_LEGEND[k]}`).join('; ')}. "Roll-up": every roll-up \`buildReport\` makes for that \`by\` (each grouping, the overall slice and, with runs, both per run); "of which triage": regroup − arquero roll-up.`);
out.push('', 'Where `scan → cells` goes (ms, one instrumented run):', '');
for (const r of results) {
  const b = r.scan_breakdown_ms as Record<string, number>;
  out.push(`- ${Number(r.rows).toLocaleString('en')} ${r.format}: ${Object.entries(b).map(([k, v]) => `${k} ${v}`).join(' · ')}`);
}
out.push('', `Process start-up (\`floorgap --version\`): ${f0(result.startup_ms)} ms; the same modules without the explorer's (ink, react): ${f0(result.startup_without_explorer_ms)} ms.`, '');
for (const n of result.notes) out.push('', `Note: ${n}`);
console.log(out.join('\n'));
