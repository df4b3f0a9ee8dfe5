/**
 * Hand-made cells with annotator audit sums, for triage tests: fixture (hand-built). An audit is the
 * unweighted sums of the audited rows of a slice (every split together), so a slice's audit is put on
 * its first cell and the other cells carry zero sums of the same shape, as the cell scan would give.
 */
import type { AuditSums } from '../../src/core/cell.js';
import type { CellRecord as Cell } from './cell-records.js';
import { sliceCells, type SliceSpec } from './cells.js';

/** Zero audit sums: `annotators` annotators, `classes` listed classes (+ one "other" class). */
export function zeroAuditSums(annotators = 3, classes = 2): AuditSums {
  return {
    audited: 0,
    panelRows: 0,
    panelErrors: 0,
    agreeSum: 0,
    annRows: Array.from({ length: annotators }, () => 0),
    annErrors: Array.from({ length: annotators }, () => 0),
    classCounts: Array.from({ length: annotators }, () => Array.from({ length: classes + 1 }, () => 0)),
  };
}

/**
 * The audit of `rows` panel rows labelled by three annotators (classes ok, defect + other), every row's
 * true class ok: `errors` rows were labelled (defect, defect, ok), so their majority vote is wrong and
 * their pairwise agreement is 1/3; the other rows were labelled (ok, ok, ok), agreement 1.
 * @example
 * panelAudit(5, 2); // => { audited: 5, panelRows: 5, panelErrors: 2, agreeSum: 3 + 2/3, annErrors: [2, 2, 0], ... }
 */
export function panelAudit(rows: number, errors: number): AuditSums {
  if (!Number.isInteger(errors) || errors < 0 || errors > rows) throw new RangeError(`panelAudit: errors must be an integer in [0, ${rows}], got ${errors}`);
  return {
    audited: rows,
    panelRows: rows,
    panelErrors: errors,
    agreeSum: rows - errors + errors / 3,
    annRows: [rows, rows, rows],
    annErrors: [errors, errors, 0],
    classCounts: [
      [rows - errors, errors, 0],
      [rows - errors, errors, 0],
      [rows, 0, 0],
    ],
  };
}

/** The cells of one slice (see `sliceCells`), the first carrying `audit`, the others zero sums. */
export function auditedSlice(key: Readonly<Record<string, string | null>>, spec: SliceSpec, audit: AuditSums): Cell[] {
  const zero = zeroAuditSums(audit.annRows.length, audit.classCounts[0].length - 1);
  return sliceCells(key, spec).map((c, i) => ({ ...c, audit: i === 0 ? audit : zero }));
}
