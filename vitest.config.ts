import { defineConfig } from 'vitest/config';

/** Photo and document storage: upload, EXIF, derivatives, download rules, deletion, orphan sweep, upload retries. */
export const S3_API_TESTS = ['tests/server/photos.test.ts', 'tests/server/idempotency.test.ts', 'tests/server/line-permissions.test.ts'];

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
        // The API tests that touch stored files, again with the files in a bucket of a local S3 fake (s3rver, started
        // by each test app) instead of the uploads folder.
        test: {
          name: 'node-s3',
          include: S3_API_TESTS,
          environment: 'node',
          // The SDK's notice that releases after January 2027 need Node 22 says nothing about the pinned version.
          env: { ROOSTLINE_TEST_STORAGE: 's3', AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true' },
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
