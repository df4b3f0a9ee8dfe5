/**
 * On a one-core machine the engine's default is one thread (README, "Files are read through DuckDB":
 * default 2, or 1 on a one-core machine), for every command alike: `floorgap sql` once declared its own
 * `--threads` with a written-in 2. The machine is made one-core here by mocking node:os.
 */
import { describe, expect, it, vi } from 'vitest';
import { COMMAND_OPTIONS, type Command } from '../../src/cli/options.js';
import { DEFAULTS } from '../../src/core/defaults.js';
import { runMain } from '../helpers/run-main.js';

vi.mock('node:os', async (original) => {
  const os = await original<typeof import('node:os')>();
  const cpus = () => os.cpus().slice(0, 1);
  return { ...os, cpus, default: { ...os, cpus } };
});

describe('a one-core machine', () => {
  it('defaults to one engine thread', () => {
    expect(DEFAULTS.threads).toBe(1);
  });

  it.each((Object.keys(COMMAND_OPTIONS) as Command[]).filter((c) => COMMAND_OPTIONS[c].includes('threads')))('floorgap %s --help: --threads defaults to 1', async (command) => {
    const { stdout } = await runMain([command, '--help']);
    const line = stdout.split('\n').find((l) => l.includes('--threads'));
    expect(line).toMatch(/\[default: 1\]$/);
  });
});
