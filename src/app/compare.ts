/**
 * `floorgap compare`: both prediction tables read on one locked engine with one plan (BEFORE's
 * candidate columns and bins serve AFTER too), each side's report, the paired cells where the rows
 * share ids, and the comparison. Never touches the process.
 */
import { keepSide, pairedCells } from '../cells/paired-cells.js';
import { scanPlanned } from '../cells/load.js';
import { planScan } from '../cells/plan-scan.js';
import { textSql } from '../cells/profile.js';
import { compareSides } from '../compare/changes.js';
import { rollupPaired, type PairedSlices } from '../compare/paired-rollup.js';
import type { CompareOptions, Comparison, SplitPairingInfo } from '../compare/types.js';
import { error } from '../core/errors.js';
import { SPLITS, type Split } from '../core/split.js';
import { openSource, ROWS_VIEW, type Source } from '../read/source.js';
import type { Duck } from '../sql/duck.js';
import { analysisReads, reportOf, withDuck, type AnalysisRequest } from './analysis.js';

/** What to compare: BEFORE as an analysis of rows, the AFTER files read with the same options. */
export interface CompareRequest {
  readonly before: AnalysisRequest & { readonly input: { readonly kind: 'rows' } };
  readonly afterFiles: readonly string[];
  readonly margin: number | null;
}

/** Most distinct labels compared between the sides (beyond it the label is no class column). */
const MAX_CLASS_CHECK = 1000;

const names = (cols: readonly string[]) => cols.slice(0, 3).map((c) => JSON.stringify(c)).join(', ') + (cols.length > 3 ? ', …' : '');

/** Fails unless AFTER has BEFORE's columns; a slice column AFTER lacks is named as such. */
function checkColumns(before: Source, after: Source, sliceColumns: readonly string[]): void {
  const missing = sliceColumns.filter((c) => !after.columns.includes(c));
  if (missing.length > 0) {
    throw error(`${after.where}: no column ${names(missing)}, which ${before.where} is sliced by; both sides need the same columns`);
  }
  const lacks = before.columns.filter((c) => !after.columns.includes(c));
  const extra = after.columns.filter((c) => !before.columns.includes(c));
  if (lacks.length === 0 && extra.length === 0) return;
  const parts = [...(lacks.length ? [`lacks ${names(lacks)}`] : []), ...(extra.length ? [`has ${names(extra)} that ${before.where} lacks`] : [])];
  throw error(`${after.where}: its columns differ from ${before.where}'s (${parts.join('; ')}); compare needs two tables with the same columns`);
}

/** The distinct labels of the current rows view, or null when there are too many to be classes. */
async function classesOf(duck: Duck, label: string | null): Promise<string[] | null> {
  if (!label) return null;
  const rows = await duck.all(`SELECT DISTINCT TRIM(${textSql(label)}) AS v FROM ${ROWS_VIEW} WHERE TRIM(${textSql(label)}) <> '' ORDER BY v LIMIT ${MAX_CLASS_CHECK + 1}`);
  return rows.length > MAX_CLASS_CHECK ? null : rows.map((r) => String(r.v));
}

function checkClasses(before: string[] | null, after: string[] | null, b: Source, a: Source, label: string): void {
  if (!before || !after) return;
  const lacks = before.filter((c) => !after.includes(c));
  const extra = after.filter((c) => !before.includes(c));
  if (lacks.length === 0 && extra.length === 0) return;
  const parts = [...(lacks.length ? [`lacks ${names(lacks)}`] : []), ...(extra.length ? [`has ${names(extra)} that ${b.where} lacks`] : [])];
  throw error(`${a.where}: the classes of column "${label}" differ from ${b.where}'s (${parts.join('; ')}); compare needs two models of the same classes`);
}

/**
 * Reads both sides, pairs their rows by id within each split where they share ids, and compares.
 * @example
 * await compareTables({ before: request, afterFiles: ['after.csv'], margin: null }, options); // => { schema: 'floorgap.compare/1', … }
 */
export async function compareTables(request: CompareRequest, options: CompareOptions): Promise<Comparison> {
  const load = request.before.input.load;
  const reads = [...analysisReads(request.before), ...request.afterFiles];
  return withDuck(request.before.engine, { read: reads, write: [] }, async (duck) => {
    const sourceB = await openSource(duck, load.source);
    const planned = await planScan(duck, load, sourceB);
    const loadedB = await scanPlanned(duck, planned);
    const before = reportOf(loadedB, request.before.triage, load.where).report;
    const { plan, roles } = planned;
    const classesB = await classesOf(duck, roles.label);
    if (roles.id) await keepSide(duck, plan, 'before', sourceB.where, before.run);

    const sourceA = await openSource(duck, { ...load.source, files: [...request.afterFiles] });
    if (sourceA.inputs.some((a) => sourceB.inputs.some((b) => a.path === b.path))) {
      throw error(`${sourceA.where}: the same file on both sides; compare needs the BEFORE model's table and the AFTER model's`);
    }
    checkColumns(sourceB, sourceA, plan.columns.map((c) => c.name));
    checkClasses(classesB, await classesOf(duck, roles.label), sourceB, sourceA, roles.label ?? '');
    const loadedA = await scanPlanned(duck, { ...planned, source: sourceA });
    const after = reportOf(loadedA, request.before.triage, load.where).report;
    if (roles.id) await keepSide(duck, plan, 'after', sourceA.where, after.run);

    const warnings = [...new Set([...before.warnings, ...after.warnings])];
    const rowsOf = (r: typeof before, s: Split) => r.overall.rows[s] ?? 0;
    const pairing = {} as Record<Split, SplitPairingInfo>;
    let paired: PairedSlices | null = null;
    if (roles.id) {
      const cells = await pairedCells(duck, plan, loadedB.grouping, loadedB.by);
      const groupings = before.by ? [[...before.by]] : loadedB.overviewColumns.map((c) => [c]);
      paired = rollupPaired(cells, groupings);
      for (const s of SPLITS) {
        const p = cells.pairing[s];
        if (p.before === 0 && p.after === 0) {
          pairing[s] = { method: rowsOf(before, s) > 0 || rowsOf(after, s) > 0 ? 'unpaired' : 'absent', pairs: 0, before_rows: rowsOf(before, s), after_rows: rowsOf(after, s) };
        } else if (p.pairs === 0) {
          pairing[s] = { method: 'unpaired', pairs: 0, before_rows: p.before, after_rows: p.after };
          warnings.push(`${s}: no row of ${sourceA.where} shares an id with ${sourceB.where}; the ${s} rows are compared unpaired`);
        } else {
          pairing[s] = { method: 'paired', pairs: p.pairs, before_rows: p.before, after_rows: p.after };
          if (p.pairs < p.before || p.pairs < p.after) {
            warnings.push(`${s}: ${p.before - p.pairs} rows of ${sourceB.where} and ${p.after - p.pairs} of ${sourceA.where} have no row with the same id on the other side; the paired change leaves them out`);
          }
        }
      }
    } else {
      for (const s of SPLITS) {
        const nb = rowsOf(before, s);
        const na = rowsOf(after, s);
        pairing[s] = { method: nb > 0 || na > 0 ? 'unpaired' : 'absent', pairs: 0, before_rows: nb, after_rows: na };
      }
      warnings.push('no id column: every split is compared unpaired (name the id column with --id to pair rows)');
    }
    return compareSides(before, after, paired, pairing, { ...options, margin: request.margin }, warnings);
  });
}
