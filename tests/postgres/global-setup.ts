// One throwaway PostgreSQL cluster for the whole PostgreSQL run (vitest.postgres.config.ts); stopped and removed
// at the end. Test files read its address from ROOSTLINE_TEST_PG_URL (the forks inherit the environment).
import { postgresBinDir, startCluster, type Cluster } from './cluster.ts';

let cluster: Cluster | null = null;

export async function setup() {
  const bin = postgresBinDir();
  if (!bin) return;
  cluster = await startCluster(bin);
  process.env.ROOSTLINE_TEST_PG_URL = cluster.url;
}

export async function teardown() {
  cluster?.stop();
}
