/**
 * The demo files as CSV lines: the prediction table (`solder-joints.csv`) and the inspector floors
 * (`inspector-floors.csv`). Fields are quoted by the report's one CSV rule ({@link quoteField}); no value
 * the scenario draws needs quoting, so every line is its values joined by commas.
 */
import { quoteField } from '../render/csv.js';
import { DEMO_COLUMNS, demoColumns, demoFloorTable, type DemoRow } from './scenario.js';

/**
 * One demo row as a CSV line (no line terminator); sharpness and score with 3 decimals, a missing
 * inspector label as an empty field, the `run` field after `split` when the row has one.
 */
export function demoRowToCsvLine(row: DemoRow): string {
  return [
    quoteField(row.id),
    quoteField(row.split),
    ...(row.run === undefined ? [] : [quoteField(row.run)]),
    quoteField(row.station),
    quoteField(row.lighting),
    quoteField(row.package),
    quoteField(row.finish),
    quoteField(row.shift),
    row.sharpness.toFixed(3),
    quoteField(row.label),
    quoteField(row.pred),
    row.score.toFixed(3),
    quoteField(row.insp_a ?? ''),
    quoteField(row.insp_b ?? ''),
    quoteField(row.insp_c ?? ''),
  ].join(',');
}

/**
 * CSV lines (no line terminators) for `rows`, starting with the header unless `header` is false. The
 * header has the `run` column when the first row has a run; every row must then have one (and none
 * must have one otherwise), else a RangeError.
 * @example [...demoRowsToCsvLines(generateDemoRows({ rows: 2, seed: 7 }))].join('\n')
 */
export function* demoRowsToCsvLines(rows: Iterable<DemoRow>, { header = true } = {}): Generator<string> {
  let withRun: boolean | null = null;
  for (const row of rows) {
    const hasRun = row.run !== undefined;
    if (withRun === null) {
      withRun = hasRun;
      if (header) yield demoColumns(withRun ? 2 : 1).map(quoteField).join(',');
    } else if (hasRun !== withRun) {
      throw new RangeError(`row ${row.id}: ${withRun ? 'no run' : 'a run'}, unlike the first row`);
    }
    yield demoRowToCsvLine(row);
  }
  if (withRun === null && header) yield DEMO_COLUMNS.map(quoteField).join(',');
}

/** `inspector-floors.csv` lines (no line terminators), header first. */
export function* demoFloorCsvLines(): Generator<string> {
  yield 'package,floor,n';
  for (const f of demoFloorTable()) yield [quoteField(f.package), String(f.floor), String(f.n)].join(',');
}
