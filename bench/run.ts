/**
 * Benchmark (`npm run bench`, not part of `npm test`): floorgap on 1M- and 10M-row prediction tables,
 * CSV and Parquet, side by side with the reference engine's floor — DuckDB alone running the bare
 * GROUP BY that computes the same cells over the same file — and with the I/O floor, a plain read of
 * the file. Every measurement runs `--reps` times (default 3), interleaved, and reports the median.
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
import { op, table as aqTable } from 'arquero';
import { median } from 'simple-statistics';
import { writeBenchTable } from './bench-table.js';
import { cellColumns, cellTable, SUM_COLUMNS, type CellTable, type SumColumn } from '../src/cells/cell-table.js';
import { openDuck, type Duck } from '../src/sql/duck.js';
import { loadCells, type Loaded } from '../src/cells/load.js';
import { type LoadOptions } from '../src/cells/plan.js';
import { cacheKey, readCache } from '../src/cells/cache.js';
import { rollupSlices } from '../src/slices/rollup.js';
import { literal } from '../src/sql/quote.js';
import { SPLITS, type Split } from '../src/core/split.js';
import { renderJson } from '../src/render/json.js';
import { buildReport, type ReportContext } from '../src/triage/report.js';
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

/** The whole `floorgap report --format json` process, with its peak RSS. */
function reportProcess(path: string, floors: string, extra: string[] = [], env: Record<string, string> = {}): { ms: number; rssMb: number | null; stdout: string } {
  const argv = [process.execPath, CLI, 'report', path, '--floor-table', floors, '--format', 'json', '--progress', 'never', ...extra];
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

/** A synthetic cell table of `n` cells over 7 columns, for the rollup micro-benchmark. */
function syntheticCells(n: number): { table: CellTable; cols: Record<string, unknown[] | Int32Array | Float64Array> } {
  const sizes = [6, 6, 48, 6, 5, 20, 5];
  const names = sizes.map((_, i) => `c${i}`);
  let seed = 12345;
  const rnd = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32);
  const cols: Record<string, Int32Array | Float64Array> = {};
  names.forEach((nm) => (cols[nm] = new Int32Array(n)));
  cols.split = new Int32Array(n);
  cols.rows = new Float64Array(n);
  cols.errors = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const key = sizes.map((s, c) => {
      const k = Math.floor(rnd() * s);
      (cols[names[c]] as Int32Array)[i] = k;
      return `v${k}`;
    });
    const split = SPLITS[Math.floor(rnd() * 4)] as Split;
    (cols.split as Int32Array)[i] = SPLITS.indexOf(split);
    const rows = 1 + Math.floor(rnd() * 40);
    (cols.rows as Float64Array)[i] = rows;
    (cols.errors as Float64Array)[i] = Math.floor(rows * rnd() * 0.2);
    void key;
  }
  const rows = cols.rows as Float64Array;
  const sums = Object.fromEntries(SUM_COLUMNS.map((s) => [s, s === 'errors' ? cols.errors : s === 'floorSum' ? rows.map((r) => r * 0.05) : s.startsWith('cost') ? new Float64Array(n) : rows])) as Record<SumColumn, Float64Array>;
  const table = cellTable({
    columns: names,
    dicts: sizes.map((s) => Array.from({ length: s }, (_, k) => `v${k}`)),
    codes: names.map((nm) => cols[nm] as Int32Array),
    split: cols.split as Int32Array,
    runs: [],
    run: new Int32Array(n).fill(-1),
    sums,
    floorEntry: new Int32Array(n).fill(-1),
    floorN: new Float64Array(n),
    audit: null,
  });
  return { table, cols };
}

function timeMs(fn: () => unknown): number {
  const t0 = now();
  fn();
  return now() - t0;
}

/** Rollup of encoded cells to a 2-column grouping: floorgap's typed-array loop against arquero's groupby/rollup. */
function rollupMicro(n: number): { cells: number; typedMs: number; arqueroMs: number } {
  const { table, cols } = syntheticCells(n);
  const typed: number[] = [];
  const aq: number[] = [];
  const dt = aqTable(cols as Record<string, ArrayLike<unknown>>);
  for (let r = 0; r < reps; r++) {
    typed.push(timeMs(() => rollupSlices(table, ['c2', 'c5'])));
    aq.push(
      timeMs(() =>
        dt
          .groupby('c2', 'c5', 'split')
          .rollup({ rows: op.sum('rows'), errors: op.sum('errors') })
          .numRows(),
      ),
    );
  }
  return { cells: n, typedMs: median(typed), arqueroMs: median(aq) };
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
        // interactive costs on this table's cells
        const regroup: number[] = [];
        const resort: number[] = [];
        const frames: number[] = [];
        const by = ['board', 'operator'];
        const big = buildReport(loaded!.table, ['board', 'operator', 'sharpness'], [], CONTEXT, DEFAULT_TRIAGE_OPTIONS);
        const report2000: Report = { ...big, slices: big.slices.slice(0, 2000) };
        let state: unknown;
        for (let r = 0; r < reps; r++) {
          regroup.push(timeMs(() => buildReport(loaded!.table, by, [], CONTEXT, DEFAULT_TRIAGE_OPTIONS)));
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
        let sameAsScan = false;
        try {
          const first = reportProcess(files[format], files.floors, [], { XDG_CACHE_HOME: cacheHome });
          for (let r = 0; r < reps; r++) {
            const p = reportProcess(files[format], files.floors, [], { XDG_CACHE_HOME: cacheHome });
            reopen.push(p.ms);
            sameAsScan = p.stdout === first.stdout;
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
          regroup_ms: median(regroup),
          regroup_slices: buildReport(loaded!.table, by, [], CONTEXT, DEFAULT_TRIAGE_OPTIONS).slices.length,
          resort_2000_ms: median(resort),
          frame_2000_ms: frames.length ? median(frames) : null,
          frame_2000_max_ms: frames.length ? Math.max(...frames) : null,
          reopen_ms: median(reopen),
          reopen_same_report: sameAsScan,
        });
      }
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const micro = [rollupMicro(200_000), rollupMicro(1_000_000)];
const result = {
  when: new Date().toISOString(),
  machine: { ...machine, loadAfter: Number(loadavg()[0].toFixed(2)) },
  reps,
  startup_ms: median(startup),
  startup_without_explorer_ms: median(startupWithoutExplorer),
  scans: results,
  interactive,
  rollup: micro,
  notes: frameNote ? [frameNote] : [],
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
out.push('| rows | cells | regroup to board × operator (cell table) | same from Cell objects | re-sort 2,000 slices | ink frame, 2,000 slices (median / max) | reopen (cached cells), whole process | reopen in-process (stamps, cache, report) |');
out.push('|---:|---:|---:|---:|---:|---:|---:|---:|');
for (const r of interactive) {
  out.push(
    `| ${Number(r.rows).toLocaleString('en')} | ${Number(r.cells).toLocaleString('en')} | ${f0(r.regroup_ms)} | ${f0(r.regroup_objects_ms)} | ${f2(r.resort_2000_ms)} | ${r.frame_2000_ms === null ? 'n/a' : `${f0(r.frame_2000_ms)} / ${f0(r.frame_2000_max_ms)}`} | ${f0(r.reopen_ms)} | ${f0(r.reopen_in_process_ms)} |`,
  );
}
out.push('', 'Where `scan → cells` goes (ms, one instrumented run):', '');
for (const r of results) {
  const b = r.scan_breakdown_ms as Record<string, number>;
  out.push(`- ${Number(r.rows).toLocaleString('en')} ${r.format}: ${Object.entries(b).map(([k, v]) => `${k} ${v}`).join(' · ')}`);
}
out.push('', `Process start-up (\`floorgap --version\`): ${f0(result.startup_ms)} ms; the same modules without the explorer's (ink, react): ${f0(result.startup_without_explorer_ms)} ms.`, '');
out.push('| synthetic cells | typed-array rollup (floorgap) | arquero groupby/rollup |', '|---:|---:|---:|');
for (const r of micro) out.push(`| ${r.cells.toLocaleString('en')} | ${f0(r.typedMs)} | ${f0(r.arqueroMs)} |`);
for (const n of result.notes) out.push('', `Note: ${n}`);
console.log(out.join('\n'));
