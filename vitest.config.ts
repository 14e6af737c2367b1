import { defineConfig } from 'vitest/config';

// Unit and API tests. Browser journeys live in vitest.e2e.config.ts (run by `npm test` too, see tests/e2e).
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'node',
          include: ['tests/server/**/*.test.ts', 'tests/shared/**/*.test.ts'],
          environment: 'node',
          pool: 'forks',
          testTimeout: 20_000,
          hookTimeout: 30_000,
        },
      },
      {
        test: {
          name: 'client',
          include: ['tests/client/**/*.test.{ts,tsx}'],
          environment: 'jsdom',
        },
      },
    ],
  },
});
