// The PostgreSQL queue: pg-boss 10 holds the queue (its own schema `pgboss`), hands each job to one worker
// (FOR UPDATE SKIP LOCKED) and retries a failed one on the next free worker. The job's row in `jobs` (same id)
// carries what the API shows and the worker's lease, which the worker renews while it works. pg-boss 10 has no
// heartbeat (its expiry is fixed when a job is fetched, and a handler running past it is failed), so its expiry is
// only a long backstop; every process watches the leases instead, and a job whose worker stopped renewing is
// failed back to pg-boss, which hands it to the next worker.
import PgBoss from 'pg-boss';
import type { MikroORM } from '@mikro-orm/sqlite';
import type { JobView } from '#shared/schemas/assessment.ts';
import { JobRows, queueOptionsFromEnv, runClaimed, workerName, type JobHandler, type JobQueue, type JobSpec, type QueueOptions } from './job-queue.ts';

/** The one pg-boss queue every kind goes through; the kind is on the job's row. */
export const BOSS_QUEUE = 'roostline-jobs';
const BOSS_SCHEMA = 'pgboss';
/** pg-boss's own expiry of a running job: a backstop far above any run (the leases take over dead workers). */
const BACKSTOP_EXPIRY_S = 6 * 3600;

export class PgBossJobQueue implements JobQueue {
  readonly rows: JobRows;
  private handlers = new Map<string, JobHandler>();
  private readonly leaseMs: number;
  private readonly maxAttempts: number;
  private readonly pollMs: number;
  readonly owner: string;
  private boss: PgBoss;
  private ready: Promise<void> | null = null;
  private working: Promise<void> | null = null;
  private workerId: string | null = null;
  private watch: NodeJS.Timeout | null = null;
  private stopped = false;
  private active = 0;

  constructor(orm: MikroORM, connectionString: string, opts: QueueOptions = {}) {
    const env = queueOptionsFromEnv();
    this.rows = new JobRows(orm);
    this.leaseMs = opts.leaseMs ?? env.leaseMs;
    this.pollMs = opts.pollMs ?? env.pollMs;
    this.maxAttempts = opts.maxAttempts ?? env.maxAttempts;
    this.owner = opts.owner ?? workerName();
    this.boss = new PgBoss({
      connectionString,
      schema: BOSS_SCHEMA,
      max: 3,
      application_name: 'roostline-jobs',
      schedule: false,
      expireInSeconds: BACKSTOP_EXPIRY_S,
      retryLimit: this.maxAttempts,
      retryDelay: 0,
      // Finished jobs live in `jobs`; pg-boss keeps its own copy a day.
      deleteAfterDays: 1,
    });
    this.boss.on('error', (err) => {
      if (!this.stopped) console.error('jobs (pg-boss):', err);
    });
  }

  register(kind: string, handler: JobHandler) {
    this.handlers.set(kind, handler);
  }

  /** Installs or upgrades pg-boss's schema (under its own lock) and its queue; no worker yet. */
  private boot(): Promise<void> {
    this.ready ??= (async () => {
      await this.boss.start();
      if (!(await this.boss.getQueue(BOSS_QUEUE))) {
        await this.boss.createQueue(BOSS_QUEUE, { name: BOSS_QUEUE, expireInSeconds: BACKSTOP_EXPIRY_S, retryLimit: this.maxAttempts, retryDelay: 0 }).catch(async (err) => {
          // Another process created it at the same moment.
          if (!(await this.boss.getQueue(BOSS_QUEUE))) throw err;
        });
      }
    })();
    return this.ready;
  }

  /** Starts this process's worker and its watch over the other workers' leases. */
  start(): Promise<void> {
    this.working ??= (async () => {
      await this.boot();
      if (this.stopped) return;
      this.workerId = await this.boss.work<{ jobId: string }>(BOSS_QUEUE, { batchSize: 1, pollingIntervalSeconds: Math.max(0.5, this.pollMs / 1000) }, async ([job]) => {
        await this.run(job.id);
      });
      this.watch = setInterval(() => void this.takeOverLapsed().catch((err) => !this.stopped && console.error('jobs: lease check failed', err)), Math.max(100, Math.floor(this.leaseMs / 2)));
      this.watch.unref();
    })();
    this.working.catch((err) => console.error('jobs: pg-boss did not start', err));
    return this.working;
  }

  /**
   * Jobs whose worker stopped renewing its lease (the process died): the row goes back to queued (one process wins
   * that update) and that process fails the pg-boss job, which pg-boss then retries on the next free worker.
   */
  private async takeOverLapsed() {
    if (this.stopped) return;
    const lapsed = await this.rows.lapsed(Date.now());
    for (const id of lapsed) await this.boss.fail(BOSS_QUEUE, id, { message: 'its worker stopped renewing the lease' });
  }

  private async run(id: string) {
    if (this.stopped) throw new Error('The server is stopping; the job waits for the next worker');
    const row = await this.rows.started(id, this.owner, Date.now() + this.leaseMs);
    if (!row) return; // finished or failed already (a late retry of a job another worker completed)
    this.active += 1;
    try {
      const outcome = await runClaimed(this.rows, row, this.owner, this.handlers.get(row.kind), {
        aborted: () => this.stopped,
        leaseMs: this.leaseMs,
      });
      // Queued again by a stop: failing it hands it back to pg-boss, which retries it on the next worker.
      if (outcome === 'queued') throw new Error('Stopped before it finished; it runs again on the next worker');
    } finally {
      this.active -= 1;
    }
  }

  async enqueue(spec: JobSpec): Promise<JobView> {
    const { view, created } = await this.rows.insert(spec);
    if (created) {
      await this.boot();
      try {
        await this.boss.send(BOSS_QUEUE, { jobId: view.id }, { id: view.id });
      } catch (err) {
        await this.rows.fail(view.id, 'The job could not be queued');
        throw err;
      }
      if (this.workerId) this.boss.notifyWorker(this.workerId);
    }
    return view;
  }

  get(id: string) {
    return this.rows.get(id);
  }
  result<T>(id: string) {
    return this.rows.result<T>(id);
  }
  list(limit?: number) {
    return this.rows.list(limit);
  }

  async idle(): Promise<void> {
    await this.boot();
    for (;;) {
      const queued = await this.boss.getQueueSize(BOSS_QUEUE);
      if (queued === 0 && this.active === 0) {
        // Between pg-boss handing a job over and the row saying so.
        const row = await this.rows.em().getConnection().execute<{ n: number }[]>("select count(*) as n from jobs where state in ('queued', 'running')");
        if (Number(row[0]?.n ?? 0) === 0) return;
      }
      if (this.stopped) return;
      await new Promise((r) => setTimeout(r, 25));
    }
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.watch) clearInterval(this.watch);
    if (!this.ready) return;
    await this.working?.catch(() => undefined);
    await this.ready.catch(() => undefined);
    await this.boss.stop({ graceful: true, wait: true, timeout: 30_000 });
  }
}
