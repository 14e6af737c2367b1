// Durable background jobs behind one interface. Every job is a row of `jobs` (kind, arguments, state, done/total,
// error, result), so any process reads its progress and a restart finds what is still owed. Who runs a job:
// - SQLite: this module. A process claims the oldest queued job, or a running one whose lease ran out (its worker
//   died), with one conditional UPDATE … RETURNING, so two claimers never get the same job. The owner renews its
//   lease while it works; a restart, or another process, takes over a job whose lease has expired.
// - PostgreSQL: pg-boss (pg-boss-queue.ts) queues, claims (FOR UPDATE SKIP LOCKED) and retries after expiry; the
//   row here still carries the progress and the result.
// Work is looked up by kind, so a job outlives the process that queued it; work must be safe to run again.
import { randomUUID } from 'node:crypto';
import os from 'node:os';
import type { EntityManager } from '@mikro-orm/core';
import type { MikroORM } from '@mikro-orm/sqlite';
import type { JobView } from '#shared/schemas/assessment.ts';
import { sql } from '../../sql/query.ts';

export interface JobProgress {
  setTotal(total: number): void;
  advance(n: number): void;
  /** Sets done outright (work that resumes from a checkpoint). */
  setDone(done: number): void;
  /** True once the app is closing: long work should stop at the next batch (the job is queued again). */
  readonly aborted: boolean;
}

export interface JobContext<P = unknown> {
  id: string;
  payload: P;
  /** 1 on the first run; more when a restart or another process took the job over. */
  attempt: number;
  /** Progress the job had written before it was taken over (0 on a first run). */
  doneBefore: number;
}

/** The work of one kind; what it returns is kept as the job's result (JSON). */
export type JobHandler<P = any> = (job: JobContext<P>, progress: JobProgress) => Promise<unknown>;

export interface JobSpec {
  kind: string;
  reason: string;
  payload?: unknown;
  /** A queued job of this key is returned instead of a new one (it has not started, so it sees the newest data). */
  coalesceKey?: string;
  /** At most one job ever carries this key (across processes); a second enqueue returns the first. */
  onceKey?: string;
  /** A fixed id (tests; the pending work of older versions). */
  id?: string;
}

export interface JobQueue {
  register(kind: string, handler: JobHandler): void;
  enqueue(spec: JobSpec): Promise<JobView>;
  get(id: string): Promise<JobView | null>;
  /** The job's result (JSON) once done, else null. */
  result<T = unknown>(id: string): Promise<T | null>;
  list(limit?: number): Promise<JobView[]>;
  /** Resolves once this process has nothing queued that it could run and runs nothing. */
  idle(): Promise<void>;
  /** Stops taking work; the running job sees `aborted`, ends at its next batch and is queued again. */
  stop(): Promise<void>;
}

export interface QueueOptions {
  /** How long a claim holds without renewal (ms); the owner renews it every third of that. */
  leaseMs?: number;
  /** How often an idle process looks for queued jobs (ms); its own enqueues wake it at once. */
  pollMs?: number;
  /** Name of this worker in the `owner` column. */
  owner?: string;
  /** A job taken over this many times without finishing is failed. */
  maxAttempts?: number;
}

export const DEFAULT_LEASE_MS = 30_000;
export const DEFAULT_POLL_MS = 1_000;
const PROGRESS_WRITE_MS = 200;
const KEEP_FINISHED = 500;

export function queueOptionsFromEnv(env: NodeJS.ProcessEnv = process.env): Required<Omit<QueueOptions, 'owner'>> {
  const n = (v: string | undefined, d: number) => (v && Number.isFinite(Number(v)) && Number(v) > 0 ? Number(v) : d);
  return { leaseMs: n(env.JOB_LEASE_MS, DEFAULT_LEASE_MS), pollMs: n(env.JOB_POLL_MS, DEFAULT_POLL_MS), maxAttempts: n(env.JOB_MAX_ATTEMPTS, 5) };
}

interface JobRow {
  id: string;
  kind: string;
  reason: string;
  payload: string;
  state: JobView['state'];
  done: number;
  total: number;
  error: string | null;
  attempts: number;
  created_at: number | string;
  finished_at: number | string | null;
}

const VIEW_COLUMNS = 'id, kind, reason, payload, state, done, total, error, attempts, created_at, finished_at';

export function viewOf(r: JobRow): JobView {
  return {
    id: r.id,
    kind: r.kind,
    reason: r.reason,
    state: r.state,
    done: Number(r.done),
    total: Number(r.total),
    error: r.error ?? null,
    createdAt: new Date(Number(r.created_at)).toISOString(),
    finishedAt: r.finished_at === null || r.finished_at === undefined ? null : new Date(Number(r.finished_at)).toISOString(),
  };
}

/** The row side both queues share: inserting, reading, progress and the end of a run. */
export class JobRows {
  constructor(private readonly orm: MikroORM) {}

  em(): EntityManager {
    return this.orm.em.fork();
  }

  /** Inserts the job (or returns the queued one of its coalesce key / the one of its once key); `created` says which. */
  async insert(spec: JobSpec): Promise<{ view: JobView; created: boolean }> {
    const em = this.em();
    if (spec.coalesceKey) {
      const waiting = await sql.get<JobRow>(em, `select ${VIEW_COLUMNS} from jobs where coalesce_key = ? and state = 'queued' order by created_at limit 1`, [spec.coalesceKey]);
      if (waiting) return { view: viewOf(waiting), created: false };
    }
    const id = spec.id ?? randomUUID();
    const now = Date.now();
    const res = await sql.run(
      em,
      'insert into jobs (id, kind, reason, payload, state, done, total, coalesce_key, once_key, attempts, created_at) ' +
        "values (?, ?, ?, ?, 'queued', 0, 0, ?, ?, 0, ?) on conflict do nothing",
      [id, spec.kind, spec.reason, JSON.stringify(spec.payload ?? null), spec.coalesceKey ?? null, spec.onceKey ?? null, now],
    );
    if (res.affectedRows === 0) {
      const first = spec.onceKey
        ? await sql.get<JobRow>(em, `select ${VIEW_COLUMNS} from jobs where once_key = ?`, [spec.onceKey])
        : await sql.get<JobRow>(em, `select ${VIEW_COLUMNS} from jobs where id = ?`, [id]);
      if (first) return { view: viewOf(first), created: false };
    }
    await this.prune(em);
    return { view: (await this.get(id))!, created: true };
  }

  async get(id: string): Promise<JobView | null> {
    const row = await sql.get<JobRow>(this.em(), `select ${VIEW_COLUMNS} from jobs where id = ?`, [id]);
    return row ? viewOf(row) : null;
  }

  async row(id: string): Promise<JobRow | null> {
    return (await sql.get<JobRow>(this.em(), `select ${VIEW_COLUMNS} from jobs where id = ?`, [id])) ?? null;
  }

  async result<T>(id: string): Promise<T | null> {
    const row = await sql.get<{ result: string | null }>(this.em(), "select result from jobs where id = ? and state = 'done'", [id]);
    return row?.result ? (JSON.parse(row.result) as T) : null;
  }

  async list(limit = 50): Promise<JobView[]> {
    const rows = await sql.all<JobRow>(this.em(), `select ${VIEW_COLUMNS} from jobs order by created_at desc, id desc limit ?`, [limit]);
    return rows.map(viewOf);
  }

  /** Marks a run started by `owner` (pg-boss path: pg-boss has already claimed it). */
  async started(id: string, owner: string, leaseUntil: number | null): Promise<JobRow | null> {
    const rows = await sql.all<JobRow>(
      this.em(),
      `update jobs set state = 'running', owner = ?, lease_until = ?, attempts = attempts + 1, started_at = ? where id = ? and state in ('queued', 'running') returning ${VIEW_COLUMNS}`,
      [owner, leaseUntil, Date.now(), id],
    );
    return rows[0] ?? null;
  }

  async progress(id: string, owner: string, done: number, total: number): Promise<void> {
    await sql.run(this.em(), "update jobs set done = ?, total = ? where id = ? and owner = ? and state = 'running'", [done, total, id, owner]);
  }

  async renew(id: string, owner: string, leaseUntil: number): Promise<boolean> {
    const r = await sql.run(this.em(), "update jobs set lease_until = ? where id = ? and owner = ? and state = 'running'", [leaseUntil, id, owner]);
    return r.affectedRows > 0;
  }

  async finish(id: string, owner: string, outcome: { state: 'done' | 'failed' | 'queued'; done: number; total: number; error?: string | null; result?: unknown }): Promise<void> {
    const finished = outcome.state === 'queued' ? null : Date.now();
    // A finished job keeps the name of the worker that ran it; one queued again has no owner.
    await sql.run(
      this.em(),
      "update jobs set state = ?, done = ?, total = ?, error = ?, result = ?, finished_at = ?, owner = ?, lease_until = null where id = ? and owner = ? and state = 'running'",
      [outcome.state, outcome.done, outcome.total, outcome.error ?? null, outcome.result === undefined ? null : JSON.stringify(outcome.result), finished, outcome.state === 'queued' ? null : owner, id, owner],
    );
  }

  /** Running jobs whose lease has run out, each put back to queued by exactly one caller (pg-boss path). */
  async lapsed(now: number): Promise<string[]> {
    const rows = await sql.all<{ id: string }>(
      this.em(),
      "update jobs set state = 'queued', owner = null, lease_until = null where state = 'running' and lease_until < ? returning id",
      [now],
    );
    return rows.map((r) => r.id);
  }

  async fail(id: string, error: string): Promise<void> {
    await sql.run(this.em(), "update jobs set state = 'failed', error = ?, finished_at = ?, owner = null, lease_until = null where id = ? and state in ('queued', 'running')", [error, Date.now(), id]);
  }

  /** Keeps the newest finished jobs; their results (import reports) are the bulk of the table. */
  private async prune(em: EntityManager) {
    await sql.run(
      em,
      "delete from jobs where state in ('done', 'failed') and id not in (select id from jobs where state in ('done', 'failed') order by created_at desc limit ?)",
      [KEEP_FINISHED],
    );
  }
}

/** Runs one claimed job: progress written to its row (throttled), lease renewed, the end recorded. */
export async function runClaimed(
  rows: JobRows,
  row: JobRow,
  owner: string,
  handler: JobHandler | undefined,
  opts: { aborted: () => boolean; renew?: () => Promise<void>; leaseMs: number },
): Promise<'done' | 'failed' | 'queued'> {
  let done = Number(row.done);
  let total = Number(row.total);
  const doneBefore = done;
  let lastWrite = 0;
  let writing: Promise<void> = Promise.resolve();
  let trailing: NodeJS.Timeout | null = null;
  const write = (force = false) => {
    const now = Date.now();
    if (!force && now - lastWrite < PROGRESS_WRITE_MS) {
      // The latest figures still reach the row, at most one write per interval.
      trailing ??= setTimeout(() => {
        trailing = null;
        write(true);
      }, PROGRESS_WRITE_MS - (now - lastWrite));
      return;
    }
    if (trailing) clearTimeout(trailing);
    trailing = null;
    lastWrite = now;
    const [d, t] = [done, total];
    writing = writing.then(() => rows.progress(row.id, owner, d, t)).catch((err) => console.error(`job ${row.kind}: could not write progress`, err));
  };
  const progress: JobProgress = {
    setTotal: (n) => {
      total = n;
      done = Math.min(done, total);
      write(true);
    },
    advance: (n) => {
      done = Math.min(total, done + n);
      write();
    },
    setDone: (n) => {
      done = Math.min(total, Math.max(0, n));
      write();
    },
    get aborted() {
      return opts.aborted();
    },
  };
  const renewEvery = Math.max(50, Math.floor(opts.leaseMs / 3));
  const timer = setInterval(() => {
    void (opts.renew ? opts.renew() : rows.renew(row.id, owner, Date.now() + opts.leaseMs).then(() => undefined)).catch((err) => console.error(`job ${row.kind}: could not renew its lease`, err));
  }, renewEvery);
  timer.unref();
  try {
    if (!handler) throw new Error(`No work is known for jobs of kind ${row.kind}`);
    const result = await handler({ id: row.id, payload: JSON.parse(row.payload), attempt: Number(row.attempts), doneBefore }, progress);
    if (trailing) clearTimeout(trailing);
    await writing;
    if (opts.aborted()) {
      await rows.finish(row.id, owner, { state: 'queued', done, total });
      return 'queued';
    }
    await rows.finish(row.id, owner, { state: 'done', done: total > 0 ? total : done, total, result });
    return 'done';
  } catch (err) {
    if (trailing) clearTimeout(trailing);
    await writing;
    if (opts.aborted()) {
      // A stop mid-way (the database closing under the work, say): queued again for the next start.
      await rows.finish(row.id, owner, { state: 'queued', done, total }).catch(() => undefined);
      return 'queued';
    }
    const message = err instanceof Error ? err.message : String(err);
    // A refusal with a report (an import's bad rows) is an answer, not a fault.
    if (resultOfError(err) === undefined) console.error(`job ${row.kind} failed`, err);
    await rows.finish(row.id, owner, { state: 'failed', done, total, error: message, result: resultOfError(err) });
    return 'failed';
  } finally {
    clearInterval(timer);
    if (trailing) clearTimeout(trailing);
  }
}

/** An error may carry a result worth keeping (an import refused: its report). */
function resultOfError(err: unknown): unknown {
  return err && typeof err === 'object' && 'jobResult' in err ? (err as { jobResult: unknown }).jobResult : undefined;
}

export const workerName = () => `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;

/** The SQLite queue: the jobs table is the queue; claims are one conditional update. */
export class SqlJobQueue implements JobQueue {
  readonly rows: JobRows;
  private handlers = new Map<string, JobHandler>();
  private readonly leaseMs: number;
  private readonly pollMs: number;
  private readonly maxAttempts: number;
  readonly owner: string;
  private running: Promise<void> | null = null;
  private timer: NodeJS.Timeout | null = null;
  private stopped = false;
  private started = false;
  private wakeAgain = false;

  constructor(orm: MikroORM, opts: QueueOptions = {}) {
    const env = queueOptionsFromEnv();
    this.rows = new JobRows(orm);
    this.leaseMs = opts.leaseMs ?? env.leaseMs;
    this.pollMs = opts.pollMs ?? env.pollMs;
    this.maxAttempts = opts.maxAttempts ?? env.maxAttempts;
    this.owner = opts.owner ?? workerName();
  }

  register(kind: string, handler: JobHandler) {
    this.handlers.set(kind, handler);
  }

  /** Begins taking work (after every kind is registered). */
  start() {
    if (this.started) return;
    this.started = true;
    this.wake();
  }

  async enqueue(spec: JobSpec): Promise<JobView> {
    const { view } = await this.rows.insert(spec);
    this.wake();
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

  /**
   * Claims the oldest job this process can run: queued, or running under a lease that has run out. One UPDATE with
   * the state in its WHERE, so of two claimers of one row only one changes it (SQLite runs writes one at a time;
   * PostgreSQL re-checks the WHERE on the row it waited for).
   */
  async claim(): Promise<JobRow | null> {
    const kinds = [...this.handlers.keys()];
    if (!kinds.length) return null;
    const now = Date.now();
    const em = this.rows.em();
    const marks = kinds.map(() => '?').join(',');
    // Taken over too often: failed instead of run again.
    await sql.run(
      em,
      `update jobs set state = 'failed', error = ?, finished_at = ?, owner = null, lease_until = null where state = 'running' and lease_until < ? and attempts >= ? and kind in (${marks})`,
      [`Stopped ${this.maxAttempts} times before it finished`, now, now, this.maxAttempts, ...kinds],
    );
    const rows = await sql.all<JobRow>(
      em,
      `update jobs set state = 'running', owner = ?, lease_until = ?, attempts = attempts + 1, started_at = ? ` +
        `where id = (select id from jobs where (state = 'queued' or (state = 'running' and lease_until < ?)) and kind in (${marks}) order by created_at, id limit 1) ` +
        `and (state = 'queued' or (state = 'running' and lease_until < ?)) returning ${VIEW_COLUMNS}`,
      [this.owner, now + this.leaseMs, now, now, ...kinds, now],
    );
    return rows[0] ?? null;
  }

  private wake() {
    if (!this.started || this.stopped) return;
    if (this.running) {
      this.wakeAgain = true;
      return;
    }
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    this.running = this.loop().finally(() => {
      this.running = null;
      if (this.stopped) return;
      if (this.wakeAgain) {
        this.wakeAgain = false;
        this.wake();
        return;
      }
      this.timer = setTimeout(() => this.wake(), this.pollMs);
      this.timer.unref();
    });
  }

  private async loop() {
    while (!this.stopped) {
      this.wakeAgain = false;
      let row: JobRow | null;
      try {
        row = await this.claim();
      } catch (err) {
        if (!this.stopped) console.error('jobs: could not look for work', err);
        return;
      }
      if (!row) return;
      await runClaimed(this.rows, row, this.owner, this.handlers.get(row.kind), { aborted: () => this.stopped, leaseMs: this.leaseMs });
    }
  }

  async idle(): Promise<void> {
    for (;;) {
      while (this.running) await this.running;
      if (this.stopped) return;
      const kinds = [...this.handlers.keys()];
      if (!kinds.length) return;
      const row = await sql.get<{ n: number }>(
        this.rows.em(),
        `select count(*) as n from jobs where (state = 'queued' or (state = 'running' and owner = ?)) and kind in (${kinds.map(() => '?').join(',')})`,
        [this.owner, ...kinds],
      );
      if (Number(row?.n ?? 0) === 0 && !this.running) return;
      this.wake();
      await new Promise((r) => setTimeout(r, 10));
    }
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    while (this.running) await this.running;
  }
}
