import { defineConfig } from 'vitest/config';
import { postgresBinDir } from './tests/postgres/cluster.ts';

// The API tests that exercise SQL, run again on PostgreSQL: one throwaway cluster (initdb + pg_ctl in a temp
// folder, tests/postgres/global-setup.ts), a fresh database per test app. Without the PostgreSQL binaries the run
// is skipped with one line (CI installs Debian's postgresql-15, see .ci/run).
const bin = postgresBinDir();
if (!bin) console.log('PostgreSQL run skipped: no initdb/pg_ctl found (apt-get install -y postgresql-15, or set PG_BIN).');

// Bounded on purpose: the files whose SQL differs most between the dialects (list filters and sorting, import,
// assessments and bulk rescoring, zones, sign-in and accounts, idempotency keys, the audit's JSON, tiles, mission records,
// durable jobs through pg-boss, photos).
export const POSTGRES_API_TESTS = [
  'tests/postgres/**/*.pg.test.ts',
  'tests/server/inventory-list.test.ts',
  'tests/server/inventory-lifecycle.test.ts',
  'tests/server/import-export.test.ts',
  'tests/server/assessment.test.ts',
  'tests/server/rescore-bulk.test.ts',
  'tests/server/zones.test.ts',
  'tests/server/auth.test.ts',
  'tests/server/accounts.test.ts',
  'tests/server/idempotency.test.ts',
  'tests/server/audit.test.ts',
  'tests/server/map.test.ts',
  'tests/server/missions-records.test.ts',
  'tests/server/jobs.test.ts',
  'tests/server/photos.test.ts',
  'tests/server/rate-limits.test.ts',
  'tests/server/import-stream.test.ts',
];

export default defineConfig({
  test: {
    name: 'postgres',
    include: bin ? POSTGRES_API_TESTS : [],
    passWithNoTests: !bin,
    environment: 'node',
    // The production-like pair: PostgreSQL and photos in an object store (a local S3 fake per test app).
    env: { ROOSTLINE_TEST_STORAGE: 's3', AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true' },
    globalSetup: bin ? ['tests/postgres/global-setup.ts'] : [],
    pool: 'forks',
    maxWorkers: 2,
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
