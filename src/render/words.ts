/** Display names shared by the text and markdown renderers. */
import type { FloorSource, Report } from '../triage/types.js';

/** How each floor source reads in a sentence ("floor from …"). */
export const FLOOR_SOURCE_NAME: Readonly<Record<FloorSource, string>> = {
  default: 'the default floor',
  table: 'the floor table',
  mixed: 'the floor table and the default floor',
  annotators: 'annotators',
};

/** Full names of the false-discovery-rate procedures. */
export const FDR_METHOD_NAME: Readonly<Record<Report['fdr_method'], string>> = {
  bh: 'Benjamini-Hochberg',
  by: 'Benjamini-Yekutieli',
};
