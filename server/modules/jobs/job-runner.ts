// A tiny in-process background job runner: one job at a time, in order, each reporting done/total.
// Jobs live in memory (a restart forgets finished ones; pending work is recomputed on the next change).
import { randomUUID } from 'node:crypto';
import type { JobView } from '#shared/schemas/assessment.ts';
import type { AppContext } from '../../context.ts';

export interface JobProgress {
  setTotal(total: number): void;
  advance(n: number): void;
  /** True once the app is closing: long work should stop at the next batch. */
  readonly aborted: boolean;
}

export type JobWork = (progress: JobProgress) => Promise<void>;

interface JobRecord extends JobView {
  coalesceKey: string | null;
  work: JobWork;
}

const KEEP_FINISHED = 200;

export class JobRunner {
  private jobs = new Map<string, JobRecord>();
  private queue: JobRecord[] = [];
  private current: Promise<void> | null = null;
  private stopped = false;

  /**
   * Queues work. With a coalesceKey, a job of that key still waiting in the queue is returned instead of a new
   * one: it has not started, so it will see the newest data anyway.
   */
  enqueue(kind: string, reason: string, work: JobWork, opts: { coalesceKey?: string } = {}): JobView {
    const key = opts.coalesceKey ?? null;
    if (key) {
      const waiting = this.queue.find((j) => j.coalesceKey === key);
      if (waiting) return this.view(waiting);
    }
    const job: JobRecord = {
      id: randomUUID(),
      kind,
      reason,
      state: 'queued',
      done: 0,
      total: 0,
      error: null,
      createdAt: new Date().toISOString(),
      finishedAt: null,
      coalesceKey: key,
      work,
    };
    this.jobs.set(job.id, job);
    this.queue.push(job);
    this.prune();
    this.pump();
    return this.view(job);
  }

  get(id: string): JobView | null {
    const job = this.jobs.get(id);
    return job ? this.view(job) : null;
  }

  list(): JobView[] {
    return [...this.jobs.values()].map((j) => this.view(j)).reverse();
  }

  /** Resolves once nothing is queued or running. */
  async idle(): Promise<void> {
    while (this.current) await this.current;
  }

  /** Stops taking work; the running job sees `aborted` and ends at its next batch. */
  async stop(): Promise<void> {
    this.stopped = true;
    for (const j of this.queue) {
      j.state = 'failed';
      j.error = 'The server stopped before this job ran';
    }
    this.queue = [];
    await this.idle();
  }

  private view(j: JobRecord): JobView {
    const { coalesceKey: _k, work: _w, ...view } = j;
    return { ...view };
  }

  private prune() {
    if (this.jobs.size <= KEEP_FINISHED) return;
    for (const [id, j] of this.jobs) {
      if (this.jobs.size <= KEEP_FINISHED) break;
      if (j.state === 'done' || j.state === 'failed') this.jobs.delete(id);
    }
  }

  private pump() {
    if (this.current || this.stopped) return;
    const job = this.queue.shift();
    if (!job) return;
    const runner = this;
    const progress: JobProgress = {
      setTotal: (n) => void (job.total = n),
      advance: (n) => void (job.done = Math.min(job.total, job.done + n)),
      get aborted() {
        return runner.stopped;
      },
    };
    job.state = 'running';
    this.current = (async () => {
      try {
        await job.work(progress);
        job.state = this.stopped && job.done < job.total ? 'failed' : 'done';
        if (job.state === 'failed') job.error = 'The server stopped before this job finished';
      } catch (err) {
        job.state = 'failed';
        job.error = err instanceof Error ? err.message : String(err);
        console.error(`job ${job.kind} failed`, err);
      } finally {
        job.finishedAt = new Date().toISOString();
        this.current = null;
        this.pump();
      }
    })();
  }
}

const runners = new WeakMap<AppContext, JobRunner>();

/** The job runner of one running app (created on first use; stopped when the app closes). */
export function jobRunnerFor(ctx: AppContext): JobRunner {
  let runner = runners.get(ctx);
  if (!runner) {
    const created = new JobRunner();
    runners.set(ctx, created);
    ctx.onClose(() => created.stop());
    runner = created;
  }
  return runner;
}
