/**
 * The demo sample (data-samples/, seed 24) analysed in-process, as `floorgap explore` loads it: the
 * overview's cells, context and triage options, on an engine that stays open on the rows (for the
 * explorer's breakdown, examples and export). Default options as the CLI gives them.
 */
import { analyzeWith, openEngine, type Analysis } from '../../src/app/analysis.js';
import { analysisRequest, type AnalysisArgs } from '../../src/cli/options.js';
import { DEFAULTS } from '../../src/core/defaults.js';
import type { Duck } from '../../src/sql/duck.js';
import { ROOT } from './run-cli.js';

export const SAMPLE = `${ROOT}/data-samples/solder-joints.csv`;
export const FLOORS = `${ROOT}/data-samples/inspector-floors.csv`;

/** The CLI's defaults for the sample with its floor table, one thread, no cache; `over` replaces some. */
export function sampleArgs(over: Partial<AnalysisArgs> = {}): AnalysisArgs {
  return {
    files: [SAMPLE],
    'floor-table': FLOORS,
    bins: DEFAULTS.bins,
    'max-cells': DEFAULTS.maxCells,
    'max-slices': DEFAULTS.maxSlices,
    confidence: 0.95,
    fdr: 0.05,
    'fdr-method': 'bh',
    'min-rows': 30,
    'floor-margin': 0.01,
    'min-headroom': 0.001,
    'curve-exponent': 0.5,
    'label-cost': 1,
    'floor-rule': 'panel',
    threads: 1,
    'memory-limit': '1GB',
    cache: false,
    ...over,
  } as AnalysisArgs;
}

/**
 * Opens an engine on the sample and analyses it; close the engine when done.
 * @example
 * const { duck, analysis } = await sampleAnalysis(); analysis.report.slices.length; // => the overview's slices
 */
export async function sampleAnalysis(over: Partial<AnalysisArgs> = {}): Promise<{ duck: Duck; analysis: Analysis }> {
  const duck = await openEngine({ threads: 1, memoryLimit: '1GB' }, { read: [SAMPLE, FLOORS], write: [] });
  const analysis = await analyzeWith(duck, analysisRequest(sampleArgs(over), { env: {}, cwd: ROOT }));
  return { duck, analysis };
}
