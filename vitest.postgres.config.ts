import { defineConfig } from 'vitest/config';
import { postgresBinDir } from './tests/postgres/cluster.ts';

// The API tests that exercise SQL, run again on PostgreSQL: one throwaway cluster (initdb + pg_ctl in a temp
// folder, tests/postgres/global-setup.ts), a fresh database per test app. Without the PostgreSQL binaries the run
// is skipped with one line (CI installs Debian's postgresql-15, see .ci/run).
const bin = postgresBinDir();
if (!bin) console.log('PostgreSQL run skipped: no initdb/pg_ctl found (apt-get install -y postgresql-15, or set PG_BIN).');

// The whole API suite, plus the PostgreSQL-only tests. Left out: the one file that spies on the SQLite driver itself.
export const POSTGRES_API_TESTS = ['tests/postgres/**/*.pg.test.ts', 'tests/server/**/*.test.ts'];
export const POSTGRES_LEFT_OUT = ['tests/server/sql-binding.test.ts'];

export default defineConfig({
  test: {
    name: 'postgres',
    include: bin ? POSTGRES_API_TESTS : [],
    exclude: POSTGRES_LEFT_OUT,
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
