// Durable jobs on two server processes sharing one PostgreSQL database (pg-boss underneath): jobs queued through
// either are each run once; a job's progress reads the same through both; when the process running a job dies,
// the other takes it over once the lease has run out and finishes it.
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { newDataDir, signIn, startServer, type ChildServer } from '../server/child-server.ts';
import { chainCsv, postImportJob, readImportJob, spansOnLine, waitJob } from '../server/job-processes.ts';
import { freshPostgresDatabase } from './databases.ts';

let dbUrl: string;
let dataDir: string;
let a: ChildServer;
let b: ChildServer;
const ENV = { JOB_LEASE_MS: '3000', JOB_POLL_MS: '200' };

beforeAll(async () => {
  dbUrl = (await freshPostgresDatabase())!;
  dataDir = newDataDir();
  const env = { ...ENV, DATABASE_URL: dbUrl, UPLOADS_DIR: path.join(dataDir, 'uploads'), SEED_DEMO: 'true' };
  [a, b] = await Promise.all([startServer(dataDir, env), startServer(dataDir, env)]);
}, 240_000);

afterAll(async () => {
  for (const s of [a, b]) {
    if (s && s.proc.exitCode === null) {
      s.proc.kill('SIGKILL');
      await s.exited;
    }
  }
  fs.rmSync(dataDir, { recursive: true, force: true });
});

async function db<T>(text: string, params: unknown[] = []): Promise<T[]> {
  const client = new pg.Client({ connectionString: dbUrl });
  await client.connect();
  try {
    return (await client.query(text, params)).rows as T[];
  } finally {
    await client.end();
  }
}

describe('durable jobs on two processes (PostgreSQL)', () => {
  it('when jobs are queued through A and B at once, then each is run exactly once', async () => {
    const [ha, hb] = await Promise.all([signIn(a.baseUrl, 'surveyor'), signIn(b.baseUrl, 'surveyor')]);
    const ids = await Promise.all(Array.from({ length: 8 }, (_, i) => postImportJob(i % 2 ? b : a, i % 2 ? hb : ha, 'dry-run', chainCsv(`Claim feeder ${i}`, 40))));
    for (const id of ids) await waitJob(a, ha, id, (j) => j.job.state === 'done');
    const rows = await db<{ id: string; attempts: number; owner: string }>('select id, attempts, owner from jobs where id = any($1)', [ids]);
    expect(rows).toHaveLength(8);
    expect(rows.every((r) => r.attempts === 1)).toBe(true);
    const boss = await db<{ id: string; retry_count: number; state: string }>('select id, retry_count, state from pgboss.job where id = any($1::uuid[])', [ids]);
    expect(boss.map((r) => [r.state, r.retry_count])).toEqual(ids.map(() => ['completed', 0]));
  }, 240_000);

  it('when the process running a job dies, then the other process, which showed its progress, takes it over and finishes it', async () => {
    const [ha, hb] = await Promise.all([signIn(a.baseUrl, 'surveyor'), signIn(b.baseUrl, 'surveyor')]);
    // Enough rows that writing them spans many parts and progress writes, so the moment is caught on a quiet machine too.
    const ROWS = 8000;
    const lineName = 'Handover import feeder';
    const id = await postImportJob(a, ha, 'commit', chainCsv(lineName, ROWS, -30.6));
    // Read through B while A's job runs (either may have taken it): progress is in the database.
    const mid = await waitJob(b, hb, id, (j) => j.job.state === 'running' && j.job.done > ROWS && j.job.done < 2 * ROWS, 180_000, 20);
    expect(mid.job.total).toBe(2 * ROWS);
    const [{ owner }] = await db<{ owner: string }>('select owner from jobs where id = $1', [id]);
    const holder = owner.includes(`:${a.proc.pid}:`) ? a : b;
    const other = holder === a ? b : a;
    holder.proc.kill('SIGKILL');
    await holder.exited;
    const otherHeaders = other === a ? ha : hb;
    const end = await waitJob(other, otherHeaders, id, (j) => j.job.state === 'done');
    expect(end.job.done).toBe(end.job.total);
    expect(await spansOnLine(other, otherHeaders, lineName)).toBe(ROWS);
    const [row] = await db<{ attempts: number; owner: string }>('select attempts, owner from jobs where id = $1', [id]);
    expect(row.attempts).toBe(2);
    expect(row.owner).toContain(`:${other.proc.pid}:`);
    expect((await readImportJob(other, otherHeaders, id)).report?.summary.refuse).toBe(0);
  }, 400_000);
});
