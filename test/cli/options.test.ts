/**
 * The option table (src/cli/options.ts): every option declared once, its default taken from
 * src/core/defaults.ts and inside its bounds (src/cli/bounds.ts), every bound and every project-file
 * option belonging to a declared option, and each command's help showing the table's defaults.
 */
import { describe, expect, it } from 'vitest';
import { boundedNumber, memoryLimit, NUMBER_BOUNDS } from '../../src/cli/bounds.js';
import { COMMAND_OPTIONS, declarationFor, OPTIONS, type Command, type Declaration, type OptionName } from '../../src/cli/options.js';
import { DEFAULTS } from '../../src/core/defaults.js';
import { EXPLICIT_CONFIG_OPTIONS, PROJECT_OPTIONS } from '../../src/read/config.js';
import { DEFAULT_TRIAGE_OPTIONS } from '../../src/triage/types.js';
import { DEMO_DEFAULTS } from '../../src/demo/scenario.js';
import { runMain } from '../helpers/run-main.js';

const NAMES = Object.keys(OPTIONS) as OptionName[];
const COMMANDS = Object.keys(COMMAND_OPTIONS) as Command[];
const numeric = NAMES.filter((n) => declarationFor(n, 'report').type === 'number');

describe('defaults and bounds', () => {
  it('every numeric default lies within its bound', () => {
    for (const name of numeric) {
      const value = declarationFor(name, 'report').default as number | undefined;
      if (value === undefined) continue;
      expect(boundedNumber(NUMBER_BOUNDS[name], value, `--${name} ${value}`), name).toBe(value);
    }
    // the memory limit's bound is 64 MB to this machine's memory
    expect(memoryLimit(DEFAULTS.memoryLimit, '--memory-limit')).toBe('2GB');
    // checkBounds asks for --bins ≤ --max-slices
    expect(DEFAULTS.bins).toBeLessThanOrEqual(DEFAULTS.maxSlices);
  });

  it('every numeric option has a bound, and every bound belongs to a numeric option', () => {
    expect([...numeric].sort()).toEqual(Object.keys(NUMBER_BOUNDS).sort());
  });

  it('the layers below use the same defaults as the flags', () => {
    expect(DEFAULT_TRIAGE_OPTIONS).toEqual({
      confidence: OPTIONS.confidence.default,
      fdr: OPTIONS.fdr.default,
      fdrMethod: OPTIONS['fdr-method'].default,
      minRows: OPTIONS['min-rows'].default,
      floorMargin: OPTIONS['floor-margin'].default,
      minHeadroom: OPTIONS['min-headroom'].default,
      curveExponent: OPTIONS['curve-exponent'].default,
      labelCost: OPTIONS['label-cost'].default,
      floorRule: OPTIONS['floor-rule'].default,
      run: null,
    });
    expect(DEMO_DEFAULTS).toEqual({ rows: OPTIONS.rows.default, seed: OPTIONS.seed.default, runs: OPTIONS.runs.default, models: OPTIONS.models.default });
  });
});

describe('commands and their options', () => {
  it('a command names each option once, and every declared option is taken by some command', () => {
    for (const c of COMMANDS) expect(new Set(COMMAND_OPTIONS[c]).size, c).toBe(COMMAND_OPTIONS[c].length);
    expect(new Set(COMMANDS.flatMap((c) => COMMAND_OPTIONS[c]))).toEqual(new Set(NAMES));
  });

  it('every option a project file may set is an option of report or check', () => {
    const analysing = new Set([...COMMAND_OPTIONS.report, ...COMMAND_OPTIONS.check]);
    for (const name of [...PROJECT_OPTIONS, ...EXPLICIT_CONFIG_OPTIONS]) expect(analysing.has(name as OptionName), name).toBe(true);
  });

  it("a command's own wording never changes an option's type or default", () => {
    for (const name of NAMES) {
      for (const c of COMMANDS) {
        const d = declarationFor(name, c);
        const own = OPTIONS[name] as Declaration;
        expect([d.type, d.default], `${c} --${name}`).toEqual([own.type, own.default]);
      }
    }
    // sql speaks of a sample file and a query
    expect(declarationFor('threads', 'sql').describe).toBe('DuckDB worker threads (sample file, --out)');
    expect(declarationFor('threads', 'report').describe).toBe('DuckDB worker threads');
    expect(declarationFor('out', 'demo')).toEqual({ type: 'string', demandOption: true, describe: 'folder to write the demo files into' });
  });

  it.each(COMMANDS)('floorgap %s --help lists its options with the defaults of the table', async (command) => {
    const { code, stdout } = await runMain([command, '--help']);
    expect(code).toBe(0);
    // one entry per option: from its "--name" to the next option's
    const entries = new Map<string, string>();
    const parts = stdout.split(/\n(?=\s+(?:-\w, )?--[\w-]+)/);
    for (const p of parts) {
      const m = /^\s+(?:-\w, )?--([\w-]+)/.exec(p);
      if (m) entries.set(m[1], p);
    }
    for (const name of COMMAND_OPTIONS[command]) {
      if (name === 'files') continue;
      const entry = entries.get(name);
      expect(entry, `${command} --${name}`).toBeDefined();
      const value = (OPTIONS[name] as { default?: unknown }).default;
      if (value !== undefined) expect(entry, `${command} --${name}`).toContain(`[default: ${JSON.stringify(value)}]`);
    }
    expect([...entries.keys()].filter((k) => k !== 'version' && k !== 'help').sort()).toEqual(COMMAND_OPTIONS[command].filter((n) => n !== 'files').sort());
  });
});
