// One throwaway PostgreSQL cluster for the whole PostgreSQL run (vitest.postgres.config.ts); stopped and removed
// at the end. Test files read its address from ROOSTLINE_TEST_PG_URL (the forks inherit the environment).
import pg from 'pg';
import { postgresBinDir, startCluster, type Cluster } from './cluster.ts';

let cluster: Cluster | null = null;

export async function setup() {
  const bin = postgresBinDir();
  if (!bin) return;
  cluster = await startCluster(bin);
  process.env.ROOSTLINE_TEST_PG_URL = cluster.url;
  // Without PostGIS the suite runs the JavaScript spatial path on PostgreSQL (the setting the README gives).
  const client = new pg.Client({ connectionString: cluster.url });
  await client.connect();
  try {
    const { rows } = await client.query("select 1 from pg_available_extensions where name = 'postgis'");
    if (!rows.length) {
      console.log('PostGIS not installed (apt-get install -y postgresql-15-postgis-3): the PostgreSQL run uses the JavaScript spatial path (POSTGIS=off) and skips the PostGIS comparisons.');
      process.env.POSTGIS = 'off';
    }
  } finally {
    await client.end();
  }
}

export async function teardown() {
  cluster?.stop();
}
