// Under the PostgreSQL run, global-setup.ts starts one throwaway cluster and names it in ROOSTLINE_TEST_PG_URL;
// every test app gets a fresh database of its own there, as each SQLite test app has its own in-memory file.
import pg from 'pg';

let counter = 0;

/** The cluster's maintenance address during the PostgreSQL run, else null (the SQLite run). */
export const testClusterUrl = () => process.env.ROOSTLINE_TEST_PG_URL || null;

/** Creates an empty database on the test cluster and answers its address; null outside the PostgreSQL run. */
export async function freshPostgresDatabase(): Promise<string | null> {
  const admin = testClusterUrl();
  if (!admin) return null;
  const name = `roostline_t${process.pid}_${++counter}_${Date.now().toString(36)}`;
  const client = new pg.Client({ connectionString: admin });
  await client.connect();
  try {
    await client.query(`create database "${name}"`);
  } finally {
    await client.end();
  }
  const url = new URL(admin);
  url.pathname = `/${name}`;
  return url.toString();
}
