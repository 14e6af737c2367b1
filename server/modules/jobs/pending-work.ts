// Background work that survives a crash: queued work is first written to `pending_work`, and only removed once it
// has run to the end. A start-up reads what is left and queues it again (restarting it from the beginning).
import type { JobView } from '#shared/schemas/assessment.ts';
import type { AppContext } from '../../context.ts';
import { jobRunnerFor, type JobWork } from './job-runner.ts';
import { sql } from '../../sql/query.ts';

export interface PendingRow {
  key: string;
  kind: string;
  payload: unknown;
  reason: string;
  requestedAt: number;
}


export async function markPending(ctx: AppContext, key: string, kind: string, payload: unknown, reason: string, at = Date.now()): Promise<void> {
  await sql.run(
    ctx.orm.em.fork(),
    'insert into pending_work (key, kind, payload, reason, requested_at) values (?, ?, ?, ?, ?) ' +
      'on conflict (key) do update set payload = excluded.payload, reason = excluded.reason, requested_at = excluded.requested_at',
    [key, kind, JSON.stringify(payload ?? null), reason, at],
  );
}

/** Removes the row unless it was requested again after `startedAt` (then the newer request still needs a run). */
export async function clearPending(ctx: AppContext, key: string, startedAt: number): Promise<void> {
  await sql.run(ctx.orm.em.fork(), 'delete from pending_work where key = ? and requested_at <= ?', [key, startedAt]);
}

export async function listPending(ctx: AppContext): Promise<PendingRow[]> {
  const rows = await sql.all<{ key: string; kind: string; payload: string; reason: string; requested_at: number }>(
    ctx.orm.em.fork(),
    'select key, kind, payload, reason, requested_at from pending_work order by requested_at, key',
  );
  return rows.map((r) => ({ key: r.key, kind: r.kind, payload: JSON.parse(r.payload), reason: r.reason, requestedAt: Number(r.requested_at) }));
}

/**
 * Queues work on the app's job runner and records it first. The record goes once the work has finished; work that
 * failed or was stopped by a shutdown keeps it, so the next start runs it again. Work must be safe to repeat.
 */
export function enqueueDurable(ctx: AppContext, job: { key: string; kind: string; reason: string; payload?: unknown; coalesce?: boolean; work: JobWork }): JobView {
  const marked = markPending(ctx, job.key, job.kind, job.payload, job.reason).catch((err) => {
    console.error(`could not record pending ${job.kind}; it will not be resumed after a crash`, err);
  });
  return jobRunnerFor(ctx).enqueue(
    job.kind,
    job.reason,
    async (progress) => {
      await marked;
      const startedAt = Date.now();
      await job.work(progress);
      if (!progress.aborted) await clearPending(ctx, job.key, startedAt);
    },
    job.coalesce ? { coalesceKey: job.key } : {},
  );
}
