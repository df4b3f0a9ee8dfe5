/**
 * src/ exports only what another file of src/, test/ or bench/ imports (scripts/unused-exports.ts
 * lists the rest). A value nobody imports is either dead code or a helper of its own file; a type may
 * stay exported when it names a parameter or result of an exported function.
 */
import { describe, expect, it } from 'vitest';
import { unusedExports } from '../../scripts/unused-exports.js';

describe('exports of src/', () => {
  const unused = unusedExports();

  it('no export is dead code (used nowhere, not even in its own file)', () => {
    expect(unused.filter((u) => !u.local).map((u) => `${u.file}: ${u.name}`)).toEqual([]);
  });

  it('no value is exported that only its own file uses', () => {
    expect(unused.filter((u) => u.kind === 'value').map((u) => `${u.file}: ${u.name}`)).toEqual([]);
  });

  it('the script sees imports of every kind: named, dynamic, types, re-exports', () => {
    const all = unusedExports().map((u) => `${u.file}: ${u.name}`);
    // imported by name (src/cli/index.ts), dynamically (src/cli/commands/explore.ts), as a type
    // (src/cli/commands/check.ts), and through src/stats/index.ts's `export *`
    for (const used of ['src/cli/commands/report.ts: runReport', 'src/cli/commands/explore-terminal.tsx: runExplorer', 'src/cli/commands/check.ts: CheckArgs', 'src/stats/wilson-interval.ts: wilsonInterval']) {
      expect(all).not.toContain(used);
    }
    // a type that only its own file uses is found (it names the options of an exported function)
    expect(all).toContain('src/terminal/wrap.ts: WrapOptions');
  });
});
