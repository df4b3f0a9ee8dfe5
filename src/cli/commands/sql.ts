import { promises as fs } from 'node:fs';
import { cellQuery } from '../../cells/cell-query.js';
import type { DialectName } from '../../sql/dialect.js';
import { round3 } from '../../cells/profile.js';
import { ROWS_VIEW } from '../../read/source.js';
import { literal } from '../../sql/quote.js';
import { planWarehouse, warehouseQuery } from '../../cells/warehouse.js';
import { printableWhere } from '../../sql/where.js';
import { exportFormatFor } from '../../output/export-file.js';
import { checkDestination, moveInto, tempPathFor, writeError } from '../../output/write-atomic.js';
import { sanitize } from '../../terminal/sanitize.js';
import { VERSION } from '../../core/version.js';
import { error } from '../../core/errors.js';
import { withDuck } from '../../app/analysis.js';
import type { CliIO } from '../io.js';
import { writeOut } from '../io.js';
import { list, toLoadOptions, type AnalysisArgs } from '../options.js';
import { scanProgress } from '../progress.js';

export interface SqlArgs extends AnalysisArgs {
  table?: string;
  dialect: DialectName;
  'bin-edges'?: string | string[];
  classes?: string;
  grouping: 'auto' | 'cross' | 'sets';
  out?: string;
  force: boolean;
}

/**
 * Parses --bin-edges values: `col=e1,e2,…` (edges rounded to 3 significant digits, as local bins are,
 * sorted, duplicates dropped) or `col` alone (numeric, edges not known yet).
 * @example
 * parseBinEdges(['sharpness=0.7,0.583']); // => Map { 'sharpness' => [0.583, 0.7] }
 */
export function parseBinEdges(values: string | string[] | undefined): Map<string, number[]> {
  const out = new Map<string, number[]>();
  const items = (Array.isArray(values) ? values : values === undefined ? [] : [values]).flatMap((v) => String(v).split(';'));
  for (const item of items.map((s) => s.trim()).filter(Boolean)) {
    const at = item.indexOf('=');
    const col = (at < 0 ? item : item.slice(0, at)).trim();
    if (col === '') throw error(`--bin-edges "${item}": expected COLUMN=e1,e2,… (or a column alone)`);
    const edges = at < 0 ? [] : item.slice(at + 1).split(',').map((s) => s.trim()).filter(Boolean).map((s) => {
      const x = Number(s);
      if (!Number.isFinite(x)) throw error(`--bin-edges ${col}: "${s}" is not a number; expected COLUMN=e1,e2,…`);
      return round3(x);
    });
    if (at >= 0 && edges.length === 0) throw error(`--bin-edges ${col}=: expected at least one edge, e.g. ${col}=0.5`);
    out.set(col, [...new Set(edges)].sort((a, b) => a - b));
  }
  return out;
}

function copyFormat(path: string): string {
  const f = exportFormatFor(path);
  return f === 'csv' ? 'FORMAT csv, HEADER true' : f === 'jsonl' ? 'FORMAT json' : 'FORMAT parquet';
}

/**
 * Text for a `--` comment line: every character that could end the line or drive a terminal escaped.
 * @example
 * comment('x\nDROP TABLE t'); // => 'x\\nDROP TABLE t'
 */
function comment(text: string): string {
  return sanitize(text);
}

/**
 * `floorgap sql`: prints the GROUP BY that computes the cells in the user's own SQL engine (or, with
 * --out, runs it here over the files and writes the cells).
 */
export async function runSql(args: SqlArgs, io: CliIO): Promise<number> {
  const out = args.out === undefined ? null : String(args.out);
  const hasFiles = (args.files ?? []).length > 0 || [args.train, args['train-dev'], args.dev, args.test].some((f) => f !== undefined);
  if (out === null && !args.table) throw error('floorgap sql needs --table NAME (the warehouse table the query reads), or --out F to run it here over the files');
  if (out !== null && !hasFiles) throw error('--out runs the query here, over prediction tables; give the files (e.g. floorgap sql preds.csv --out cells.parquet)');
  const edges = parseBinEdges(args['bin-edges']);
  const classes = list(args.classes);
  const loadOptions = toLoadOptions(args);
  if (out !== null) {
    await checkDestination(out, { overwrite: args.force, folderHint: `--out needs a file name, e.g. ${out.replace(/\/+$/, '')}/cells.parquet` });
  }
  // the engine writes the cells to this temporary file beside --out, and nowhere else
  const tmp = out === null ? null : tempPathFor(out);
  const engine = { threads: args.threads, memoryLimit: args['memory-limit'] };
  const reads = [...loadOptions.source.files, ...Object.values(loadOptions.source.perSplit), loadOptions.floorTable, loadOptions.costTable ?? null].filter((f): f is string => typeof f === 'string');
  return withDuck(engine, { read: reads, write: tmp ? [tmp] : [] }, async (duck) => {
    const planned = await planWarehouse(duck, loadOptions, { dialect: args.dialect, table: args.table ?? ROWS_VIEW, edges, classes, grouping: args.grouping });
    if (planned.kind === 'needs') {
      const text = planned.queries.map((q) => `-- ${comment(q.what)}\n${q.sql};\n`).join('\n');
      await writeOut(io, text);
      io.stderr.write(`floorgap: run the ${planned.queries.length === 1 ? 'query' : 'queries'} above on the table, then run floorgap sql again with what ${planned.queries.length === 1 ? 'it gives' : 'they give'}\n`);
      return 0;
    }
    const { plan, grouping } = planned;
    if (out !== null) {
      for (const c of plan.columns) {
        if (c.name.startsWith('fg_')) throw error(`column "${c.name}" starts with fg_, which cells files keep for statistics; rename it or leave it out with --slice-cols`);
      }
      const query = cellQuery(plan, grouping, { table: ROWS_VIEW, textColumns: true, names: 'cells' });
      const bytes = planned.planned?.source.inputs.reduce((a, i) => a + i.bytes, 0) ?? 0;
      const stop = scanProgress(io, args.progress ?? 'auto')?.(duck, { where: planned.planned?.source.where ?? '', bytes }) ?? (() => undefined);
      let written = 0;
      try {
        // COPY answers with the number of rows it wrote: no second scan to count the cells
        const [result] = await duck.all(`COPY (${query}) TO ${literal(tmp!)} (${copyFormat(out)})`);
        written = Number(result?.Count ?? 0);
        await moveInto(tmp!, await checkDestination(out, { overwrite: args.force }));
      } catch (e) {
        await fs.rm(tmp!, { force: true });
        if (e instanceof Error && e.name === 'FloorgapError') throw e;
        throw writeError(out, e, 'the cells');
      } finally {
        stop();
      }
      await writeOut(io, `wrote ${written} cells to ${sanitize(out)}; next: floorgap report --cells ${sanitize(out)}\n`);
      return 0;
    }
    // a sample file's filter ran here in DuckDB's words; another engine gets the condition as written,
    // checked by its characters (printableWhere)
    const printedPlan = args.dialect === 'duckdb' || args.where === undefined ? plan : { ...plan, where: printableWhere(String(args.where)) };
    const query = warehouseQuery(printedPlan, grouping, args.dialect, String(args.table));
    const q = comment;
    const head = [
      `-- floorgap ${VERSION}: the cells of ${comment(String(args.table))} (${args.dialect} SQL)`,
      `-- slice columns: ${plan.columns.map((c) => (c.kind === 'binned' && c.edges?.length ? `${q(c.name)} (bins at ${c.edges.join(', ')})` : q(c.name))).join(', ')}`,
      `-- grouping: ${grouping.kind === 'cross' ? 'full cross' : `${grouping.sets.length} grouping sets`}; split column ${q(plan.splitColumn)}; ${plan.roles.error ? `error column ${q(plan.roles.error)}` : `label ${q(plan.roles.label ?? '')}, pred ${q(plan.roles.pred ?? '')}`}`,
      `-- floors: ${plan.floorEntries.length ? `${plan.floorEntries.length} floor-table entries (inlined), ` : ''}default ${plan.defaultFloor}`,
      `-- save the result as CSV, Parquet or JSON Lines, then: floorgap report --cells FILE`,
    ];
    // names and values are escaped for their place (comments: no line break; literals: the dialect's
    // escapes), so the text is one statement and holds no character a terminal would act on
    await writeOut(io, `${head.join('\n')}\n${query};\n`);
    return 0;
  });
}
