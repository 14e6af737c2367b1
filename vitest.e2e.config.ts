import { defineConfig } from 'vitest/config';

// Browser journeys: a real server process on a temp SQLite file, driven by Debian's Chromium through playwright-core.
export default defineConfig({
  test: {
    include: ['tests/e2e/**/*.e2e.ts'],
    environment: 'node',
    globalSetup: ['tests/e2e/global-setup.ts'],
    pool: 'forks',
    fileParallelism: false,
    testTimeout: 90_000,
    hookTimeout: 120_000,
  },
});
