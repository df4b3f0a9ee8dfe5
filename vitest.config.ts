import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { defineConfig } from 'vitest/config';

// cached cells go to a folder of this run, never to the user's cache, and are removed at the end
const cacheHome = mkdtempSync(join(tmpdir(), 'floorgap-test-cache-'));
process.on('exit', () => rmSync(cacheHome, { recursive: true, force: true }));

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts', 'test/**/*.test.tsx'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    env: { XDG_CACHE_HOME: cacheHome },
  },
});
