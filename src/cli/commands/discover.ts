import { loadPrepared } from '../../app/analysis.js';
import { discover } from '../../discover/search.js';
import { DISCOVER_DEFAULTS } from '../../discover/types.js';
import type { Format } from '../../render/index.js';
import { renderDiscovery } from '../../render/discover.js';
import type { CliIO } from '../io.js';
import { useColor, writeOut } from '../io.js';
import { analysisHooks, analysisRequest, type AnalysisArgs } from '../options.js';
import { searchProgress } from '../progress.js';

export interface DiscoverArgs extends AnalysisArgs {
  depth: number;
  'min-lift': number;
  top?: number;
  all: boolean;
  format: Format;
}

/** `floorgap discover`: the slices of 1 to --depth conditions whose gaps survive false-discovery control, on stdout. */
export async function runDiscover(args: DiscoverArgs, io: CliIO): Promise<number> {
  const { loaded, context, options } = await loadPrepared(analysisRequest(args, io), analysisHooks(args, io));
  const discovery = discover(
    loaded.table,
    loaded.overviewColumns,
    context,
    options,
    { depth: args.depth, minLift: args['min-lift'], top: args.top ?? DISCOVER_DEFAULTS.top, all: args.all },
    searchProgress(io, args.progress ?? 'auto'),
  );
  const width = Math.max(60, Math.min(100, io.stdout.columns ?? 100));
  await writeOut(io, renderDiscovery(discovery, args.format, { color: useColor(io), width }));
  return 0;
}
