import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts', 'test/**/*.test.tsx'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    // cached cells go to a folder of this run, never to the user's cache
    env: { XDG_CACHE_HOME: mkdtempSync(join(tmpdir(), 'floorgap-test-cache-')) },
  },
});
