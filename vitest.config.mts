import { defineConfig } from 'vitest/config';

// One runner for every level: engine checks, API tests, browser tests.
// Browser tests need the exported web app (dist/) and Debian's chromium; scripts/test.sh prepares both.
export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts', 'server/**/*.test.ts', 'shared/**/*.test.ts', 'features/**/*.test.ts'],
    environment: 'node',
    testTimeout: 120_000,
    hookTimeout: 180_000,
    pool: 'forks',
    maxWorkers: 2,
  },
});
