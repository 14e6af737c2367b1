// Durable jobs on the database: the jobs table on SQLite, pg-boss on PostgreSQL (this file runs in both suites).
// Several queues on one database stand for several processes: each has its own worker name and lease.
import { afterEach, describe, expect, it } from 'vitest';
import type { MikroORM } from '@mikro-orm/sqlite';
import PgBoss from 'pg-boss';
import { initORM } from '../../server/db.ts';
import { databaseTarget, testConfig } from '../../server/env.ts';
import { createJobQueue, type JobHandler, type JobQueue } from '../../server/modules/jobs/job-runner.ts';
import { JobRows, SqlJobQueue } from '../../server/modules/jobs/job-queue.ts';
import { BOSS_QUEUE } from '../../server/modules/jobs/pg-boss-queue.ts';
import { freshPostgresDatabase } from '../postgres/databases.ts';
import { sql } from '../../server/sql/query.ts';

const tick = (ms = 5) => new Promise((r) => setTimeout(r, ms));
type Queue = JobQueue & { start(): unknown };

const open: { orm: MikroORM; queues: Queue[] }[] = [];

async function database() {
  const pg = await freshPostgresDatabase();
  const orm = await initORM(databaseTarget(testConfig(pg ? { databaseUrl: pg } : {})));
  const db = { orm, url: pg, queues: [] as Queue[] };
  open.push(db);
  /** A queue on this database, as another process would have it. */
  const queue = (handlers: Record<string, JobHandler>, opts: { leaseMs?: number; pollMs?: number; owner?: string } = {}) => {
    const q = createJobQueue(orm, pg, { leaseMs: 2_000, pollMs: 100, ...opts });
    for (const [kind, h] of Object.entries(handlers)) q.register(kind, h);
    db.queues.push(q);
    return q;
  };
  return { ...db, queue };
}

afterEach(async () => {
  for (const db of open.splice(0)) {
    for (const q of db.queues) await q.stop();
    await db.orm.close();
  }
});

async function until<T>(what: () => Promise<T>, ok: (v: T) => boolean, timeoutMs = 20_000): Promise<T> {
  const start = Date.now();
  for (;;) {
    const v = await what();
    if (ok(v)) return v;
    if (Date.now() - start > timeoutMs) throw new Error(`still not there after ${timeoutMs} ms: ${JSON.stringify(v)}`);
    await tick(20);
  }
}

const quietly = async <T>(fn: () => Promise<T>) => {
  const log = console.error;
  console.error = () => {};
  try {
    return await fn();
  } finally {
    console.error = log;
  }
};

describe('durable jobs', () => {
  it('when jobs are queued, then one process runs them one at a time in order, and another process reads their progress', async () => {
    const db = await database();
    const order: string[] = [];
    let release!: () => void;
    const gate = new Promise<void>((r) => (release = r));
    const q = db.queue({
      test: async (job, p) => {
        const name = (job.payload as { name: string }).name;
        order.push(`${name} start`);
        p.setTotal(4);
        p.advance(1);
        if (name === 'a') await gate;
        for (let i = 0; i < 3; i++) {
          await tick();
          p.advance(1);
        }
        order.push(`${name} end`);
        return { name };
      },
    });
    const reader = db.queue({}); // another process that runs nothing of this kind
    q.start();
    const a = await q.enqueue({ kind: 'test', reason: 'a', payload: { name: 'a' } });
    const b = await q.enqueue({ kind: 'test', reason: 'b', payload: { name: 'b' } });
    // Mid-way, read through the other queue: the progress is in the database.
    const mid = await until(() => reader.get(a.id), (v) => v?.state === 'running' && v.done === 1);
    expect(mid).toMatchObject({ state: 'running', done: 1, total: 4 });
    expect((await reader.get(b.id))!.state).toBe('queued');
    release();
    await until(() => reader.get(b.id), (v) => v?.state === 'done');
    expect(order).toEqual(['a start', 'a end', 'b start', 'b end']);
    expect(await reader.get(a.id)).toMatchObject({ state: 'done', done: 4, total: 4, error: null });
    expect(await reader.result(b.id)).toEqual({ name: 'b' });
    expect((await reader.list()).map((j) => j.id)).toEqual([b.id, a.id]);
  });

  it('when a job of the same scope is still queued, then a new request reuses it; a once key gives one job ever', async () => {
    const db = await database();
    const q = db.queue({ r: async () => undefined });
    const first = await q.enqueue({ kind: 'r', reason: 'first', coalesceKey: 'all' });
    const second = await q.enqueue({ kind: 'r', reason: 'second', coalesceKey: 'all' });
    expect(second.id).toBe(first.id);
    const d1 = await q.enqueue({ kind: 'r', reason: 'day', onceKey: 'daily:2026-12-03' });
    const d2 = await db.queue({}).enqueue({ kind: 'r', reason: 'day again', onceKey: 'daily:2026-12-03' });
    expect(d2.id).toBe(d1.id);
    q.start();
    await until(() => q.get(d1.id), (v) => v?.state === 'done');
    const third = await q.enqueue({ kind: 'r', reason: 'third', coalesceKey: 'all' });
    expect(third.id).not.toBe(first.id); // the first has run: new data needs a new run
  });

  it('when a job throws, then it is failed with the message and the next job still runs', async () => {
    const db = await database();
    const q = db.queue({
      bad: async () => {
        throw new Error('disk full');
      },
      good: async (_j, p) => {
        p.setTotal(1);
        p.advance(1);
      },
    });
    q.start();
    const bad = await q.enqueue({ kind: 'bad', reason: 'bad' });
    const good = await q.enqueue({ kind: 'good', reason: 'good' });
    await quietly(() => until(() => q.get(good.id), (v) => v?.state === 'done'));
    expect(await q.get(bad.id)).toMatchObject({ state: 'failed', error: 'disk full' });
  });

  it('when many processes claim at once, then every job runs exactly once', async () => {
    const db = await database();
    const runs: { id: string; by: number }[] = [];
    const queues = Array.from({ length: 4 }, (_, i) =>
      db.queue({
        once: async (job, p) => {
          runs.push({ id: job.id, by: i });
          p.setTotal(1);
          await tick(2);
          p.advance(1);
        },
      }),
    );
    const ids: string[] = [];
    for (let i = 0; i < 24; i++) ids.push((await queues[i % 4].enqueue({ kind: 'once', reason: `job ${i}` })).id);
    for (const q of queues) q.start();
    for (const id of ids) await until(() => queues[0].get(id), (v) => v?.state === 'done');
    expect(runs.map((r) => r.id).sort()).toEqual([...ids].sort());
    expect(new Set(runs.map((r) => r.id)).size).toBe(ids.length);
  });

  it('when ten claimers race for one queued job on the jobs table, then exactly one gets it', async () => {
    const db = await database();
    if (db.url) return; // PostgreSQL claims through pg-boss (the test above and the two-process test)
    const claimers = Array.from({ length: 10 }, (_, i) => db.queue({ one: async () => undefined }, { owner: `claimer-${i}` }) as SqlJobQueue);
    const job = await claimers[0].enqueue({ kind: 'one', reason: 'race' });
    const got = (await Promise.all(claimers.map((c) => c.claim()))).filter((r) => r !== null);
    expect(got.map((r) => r!.id)).toEqual([job.id]);
    const [row] = await sql.all<{ owner: string; attempts: number }>(db.orm.em.fork(), 'select owner, attempts from jobs where id = ?', [job.id]);
    expect(Number(row.attempts)).toBe(1);
    expect(row.owner).toMatch(/^claimer-/);
  });

  it('when the server stops mid-way, then the job is queued again and the next start finishes it from its checkpoint', async () => {
    const db = await database();
    // Long enough (at least 2 s) that progress, written at most every 200 ms, shows well before the end.
    const STEPS = 1000;
    const seen: { attempt: number; doneBefore: number }[] = [];
    const work: JobHandler = async (job, p) => {
      seen.push({ attempt: job.attempt, doneBefore: job.doneBefore });
      p.setTotal(STEPS);
      p.setDone(job.doneBefore);
      for (let i = job.doneBefore; i < STEPS; i++) {
        if (p.aborted) return;
        await tick(2);
        p.advance(1);
      }
    };
    const first = db.queue({ long: work });
    first.start();
    const job = await first.enqueue({ kind: 'long', reason: 'long' });
    await until(() => first.get(job.id), (v) => (v?.done ?? 0) >= 10);
    await first.stop();
    const between = (await db.queue({}).get(job.id))!;
    expect(between.state).toBe('queued');
    expect(between.done).toBeGreaterThanOrEqual(10);
    expect(between.done).toBeLessThan(STEPS);
    const restarted = db.queue({ long: work });
    restarted.start();
    const end = await until(() => restarted.get(job.id), (v) => v?.state === 'done');
    expect(end).toMatchObject({ done: STEPS, total: STEPS });
    expect(seen).toHaveLength(2);
    expect(seen[1].attempt).toBe(2);
    expect(seen[1].doneBefore).toBeGreaterThanOrEqual(between.done - 1);
  });

  it('when the worker holding a job dies, then another process takes it over once the lease has run out', async () => {
    const db = await database();
    const ran: number[] = [];
    const work: JobHandler = async (job, p) => {
      ran.push(job.attempt);
      p.setTotal(1);
      p.advance(1);
    };
    const leaseMs = 1_000;
    let jobId: string;
    if (!db.url) {
      // A worker that claimed the job and then died: claimed, never renewed, never finished.
      const dead = db.queue({ job: work }, { leaseMs }) as SqlJobQueue;
      jobId = (await dead.enqueue({ kind: 'job', reason: 'orphaned' })).id;
      expect((await dead.claim())!.id).toBe(jobId);
    } else {
      jobId = (await db.queue({}, { leaseMs }).enqueue({ kind: 'job', reason: 'orphaned' })).id;
      // A worker takes the job from pg-boss, marks it running under its lease, and dies without finishing it.
      const dead = new PgBoss({ connectionString: db.url, schema: 'pgboss', supervise: false, schedule: false, max: 1 });
      await dead.start();
      const [taken] = await dead.fetch(BOSS_QUEUE);
      expect(taken.id).toBe(jobId);
      expect(await new JobRows(db.orm).started(jobId, 'dead-worker', Date.now() + leaseMs)).not.toBeNull();
      await dead.stop({ graceful: false, wait: true });
    }
    const started = Date.now();
    const survivor = db.queue({ job: work }, { leaseMs });
    survivor.start();
    const end = await until(() => survivor.get(jobId), (v) => v?.state === 'done');
    expect(end!.done).toBe(1);
    expect(ran).toEqual([2]);
    expect(Date.now() - started).toBeGreaterThanOrEqual(leaseMs / 2);
  });

  it('when a job runs longer than its lease, then its owner keeps renewing it and nobody else runs it', async () => {
    const db = await database();
    let runs = 0;
    const slow: JobHandler = async (_job, p) => {
      runs++;
      p.setTotal(1);
      await tick(2_500);
      p.advance(1);
    };
    const a = db.queue({ slow }, { leaseMs: 600 });
    const b = db.queue({ slow }, { leaseMs: 600 });
    const job = await a.enqueue({ kind: 'slow', reason: 'slow' });
    a.start();
    await until(() => a.get(job.id), (v) => v?.state === 'running');
    b.start();
    await until(() => b.get(job.id), (v) => v?.state === 'done');
    expect(runs).toBe(1);
  });
});
