/**
 * Benchmark: floorgap's whole `report` against the reference engine's floor — DuckDB alone running
 * the equivalent bare GROUP BY over the same file — in the same run. Not part of `npm test`.
 *
 *   npm run bench                 # 1M rows (default)
 *   npm run bench -- 5000000      # other sizes
 *
 * Generates the demo table into a temporary folder (never into the repo), runs each measurement
 * 3 times and reports medians and ratios; writes bench/results/latest.json.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, tmpdir, totalmem } from 'node:os';
import { join } from 'node:path';
import { writeDemo } from '../src/demo/write-demo.js';
import { openDuck } from '../src/engine/duck.js';

const rows = Number(process.argv[2] ?? 1_000_000);
const repeats = 3;
const hasTime = existsSync('/usr/bin/time');
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function time(fn: () => Promise<void> | void): Promise<number> {
  const t0 = performance.now();
  await fn();
  return performance.now() - t0;
}

const dir = mkdtempSync(join(tmpdir(), 'floorgap-bench-'));
try {
  console.error(`generating ${rows.toLocaleString()} demo rows in ${dir} …`);
  const { table, floors } = await writeDemo(dir, { rows, seed: 1 });

  const reportMs: number[] = [];
  let peakRssKb = 0;
  for (let i = 0; i < repeats; i++) {
    reportMs.push(
      await time(() => {
        const args = [process.execPath, 'dist/cli.js', 'report', table, '--floor-table', floors, '--format', 'json'];
        // GNU time reports peak RSS; without it only the time is measured
        const r = hasTime
          ? spawnSync('/usr/bin/time', ['-f', '%M', ...args], { encoding: 'utf8', maxBuffer: 1 << 28 })
          : spawnSync(args[0], args.slice(1), { encoding: 'utf8', maxBuffer: 1 << 28 });
        if (r.status !== 0) throw new Error(`report failed: ${r.stderr}`);
        const kb = Number(r.stderr.trim().split('\n').pop());
        if (Number.isFinite(kb)) peakRssKb = Math.max(peakRssKb, kb);
      }),
    );
  }

  const groupByMs: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const duck = await openDuck({ threads: 2, memoryLimit: '2GB' });
    groupByMs.push(
      await time(async () => {
        await duck.all(
          `SELECT split, station, lighting, package, finish, shift, count(*) AS n, sum(CASE WHEN label = pred THEN 0 ELSE 1 END) AS e FROM read_csv('${table}', header = true, all_varchar = true) GROUP BY ALL`,
        );
      }),
    );
    duck.close();
  }

  const result = {
    rows,
    machine: { cores: cpus().length, memoryGiB: Math.round(totalmem() / 2 ** 30) },
    report_ms: median(reportMs),
    duckdb_group_by_ms: median(groupByMs),
    ratio: median(reportMs) / median(groupByMs),
    report_peak_rss_mb: peakRssKb ? Math.round(peakRssKb / 1024) : null,
  };
  mkdirSync('bench/results', { recursive: true });
  writeFileSync('bench/results/latest.json', JSON.stringify(result, null, 2) + '\n');
  console.log(`| measurement | median (ms) |\n|---|---|`);
  console.log(`| floorgap report --format json (whole process) | ${result.report_ms.toFixed(0)} |`);
  console.log(`| DuckDB bare GROUP BY, same file | ${result.duckdb_group_by_ms.toFixed(0)} |`);
  console.log(`| ratio | ${result.ratio.toFixed(2)} |`);
  console.log(`| report peak RSS (MB) | ${result.report_peak_rss_mb ?? 'n/a'} |`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
