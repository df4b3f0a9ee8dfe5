/** What the explorer's screens ask of its data (app/explorer-data.ts implements it; a fake does in tests). */
import type { DiscoveredSlice, Discovery } from '../discover/types.js';
import type { ErrorExample } from '../rows/examples.js';
import type { Report, SliceReport } from '../triage/types.js';

/** What the explorer asks of its data; a fake implements it in component tests. */
export interface ExplorerData {
  /** the report the explorer opens with */
  readonly report: Report;
  /** columns the grouping picker offers */
  readonly columns: readonly string[];
  /** the report for another grouping ([] = the overview), from the cells */
  regroup(by: readonly string[]): Promise<Report>;
  /** the slice broken down by another column */
  drill(slice: SliceReport, column: string): Promise<readonly SliceReport[]>;
  /** the slice's most confident dev errors, or why there are none to show */
  examples(slice: SliceReport): Promise<ErrorExample[] | string>;
  /** writes the rows of the slices to `path`; returns a one-line message */
  exportSlices(slices: readonly SliceReport[], path: string, force: boolean): Promise<string>;
  /**
   * the discovered slices of the loaded cells (the default search options, the explorer's triage
   * options), searched in steps that leave the screen responsive; stops (rejects) once `signal` aborts
   */
  discover(onProgress: (done: number, total: number) => void, signal: AbortSignal): Promise<Discovery>;
  /** writes the rows of discovered slices to `path`, each with its part as focus and why it was found; a one-line message */
  exportFound(slices: readonly DiscoveredSlice[], path: string, force: boolean): Promise<string>;
}

/**
 * Exports through the export command's own code (injected, so the explorer stays free of the CLI).
 * Without `reasons` the slices are the report's, chosen by their keys; with them, each slice is written
 * as given (its key, focus and rank, of any columns) with its reason.
 */
export type Exporter = (slices: readonly SliceReport[], path: string, force: boolean, reasons?: readonly string[]) => Promise<string>;

