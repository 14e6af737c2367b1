// The job queue of one running app: the jobs table on SQLite, pg-boss on PostgreSQL (job-queue.ts says how each
// claims, leases and resumes). Features register the work of their kinds while the app is built; the queue starts
// taking work right after, so a job left by a restart finds its work registered.
import type { AppContext } from '../../context.ts';
import type { MikroORM } from '@mikro-orm/sqlite';
import { SqlJobQueue, type JobQueue, type QueueOptions } from './job-queue.ts';
import { PgBossJobQueue } from './pg-boss-queue.ts';

export type { JobProgress, JobHandler, JobQueue, JobSpec, JobContext } from './job-queue.ts';

const queues = new WeakMap<AppContext, JobQueue>();

/** A queue on this database: pg-boss with a postgres:// address, else the jobs table. Call start() once kinds are registered. */
export function createJobQueue(orm: MikroORM, databaseUrl: string | null, opts: QueueOptions = {}): JobQueue & { start(): unknown } {
  return databaseUrl ? new PgBossJobQueue(orm, databaseUrl, opts) : new SqlJobQueue(orm, opts);
}

/** The job queue of one running app (created on first use; stopped when the app closes). */
export function jobRunnerFor(ctx: AppContext): JobQueue {
  let queue = queues.get(ctx);
  if (!queue) {
    const created = createJobQueue(ctx.orm, ctx.config.databaseUrl);
    queues.set(ctx, created);
    ctx.onClose(() => created.stop());
    // Every feature registers its kinds while the app is built (synchronously); then work is taken.
    const timer = setImmediate(() => void Promise.resolve(created.start()).catch(() => undefined));
    ctx.onClose(() => clearImmediate(timer));
    queue = created;
  }
  return queue;
}
