// When assessments are recomputed: a span write recomputes that span at once; a line's load, a zone, a profile or
// the scoring settings changing rescore the affected spans as a background job with progress.
import type { EntityManager } from '@mikro-orm/core';
import type { RequestHandler } from 'express';
import type { JobView } from '#shared/schemas/assessment.ts';
import type { AppContext } from '../../context.ts';
import type { JobProgress } from '../jobs/job-runner.ts';
import { jobRunnerFor } from '../jobs/job-runner.ts';
import { assessSpans, assessSpansBulk, countSpans } from './assessment.service.ts';
import { ensureAssessmentDefaults } from './profiles.service.ts';

const ready = new WeakMap<AppContext, Promise<void>>();

/** Seeds the default profiles and settings into empty tables, once per app; everything here waits for it. */
export function assessmentReady(ctx: AppContext): Promise<void> {
  let p = ready.get(ctx);
  if (!p) {
    p = ensureAssessmentDefaults(ctx.orm.em.fork()).catch((err) => {
      console.error('could not seed the default assessment profiles', err);
      throw err;
    });
    ready.set(ctx, p);
    ctx.onClose(() => p!.catch(() => undefined));
  }
  return p;
}

/** Express middleware: requests of the assessment routes wait until the defaults exist. */
export function waitForAssessmentDefaults(ctx: AppContext): RequestHandler {
  return async (_req, _res, next) => {
    await assessmentReady(ctx);
    next();
  };
}

/**
 * Rescores every span (or one line's spans) as a durable job; a queued job of the same scope is reused. The job is
 * in the database before this answers, so a crash or a shutdown before it ends runs it again on the next start.
 */
export function startRescore(ctx: AppContext, reason: string, scope: { lineId?: string } = {}): Promise<JobView> {
  const key = scope.lineId ? `rescore:line:${scope.lineId}` : 'rescore:all';
  return jobRunnerFor(ctx).enqueue({ kind: scope.lineId ? 'rescore-line' : 'rescore-all', reason, payload: scope, coalesceKey: key });
}

/** The work of the rescore jobs: every span, or one line's (kinds rescore-all and rescore-line). */
export function registerRescoreWork(ctx: AppContext) {
  const queue = jobRunnerFor(ctx);
  const work = async (job: { payload: { lineId?: string } | null }, progress: JobProgress) => {
    const scope = job.payload ?? {};
    await assessmentReady(ctx);
    const em = ctx.orm.em.fork();
    progress.setTotal(await countSpans(em, scope));
    await assessSpansBulk(em, undefined, {
      lineId: scope.lineId,
      clearBetweenBatches: true,
      onBatch: (n) => progress.advance(n),
      shouldStop: () => progress.aborted,
    });
  };
  queue.register('rescore-all', work);
  queue.register('rescore-line', work);
}

/** Recomputes some spans now, in the caller's unit of work (used after a span write). */
export async function rescoreSpansNow(ctx: AppContext, em: EntityManager, spanIds: readonly string[]) {
  await assessmentReady(ctx);
  await assessSpans(em, spanIds);
}
