/** Display names shared by the text and markdown renderers. */
import type { FloorSource, Report } from '../triage/types.js';

/** Where a floor came from, in words. */
export const FLOOR_SOURCE_NAME: Readonly<Record<FloorSource, string>> = {
  default: 'default floor',
  table: 'floor table',
  mixed: 'floor table and default floor',
  annotators: 'annotator columns',
};

/** Full names of the false-discovery-rate procedures. */
export const FDR_METHOD_NAME: Readonly<Record<Report['fdr_method'], string>> = {
  bh: 'Benjamini-Hochberg',
  by: 'Benjamini-Yekutieli',
};
