// The assessment feature as app.ts mounts it: its routers, and the hooks that keep stored assessments current.
import { randomUUID } from 'node:crypto';
import express from 'express';
import type { EntityManager } from '@mikro-orm/core';
import type { Polygon } from 'geojson';
import { bbox as turfBbox } from '@turf/turf';
import type { AppContext } from '../../context.ts';
import { registerSpanListener, type SpanChange } from '../inventory/inventory.service.ts';
import { registerZoneListener, type ZoneChange } from '../zones/zone.service.ts';
import { calcRouter } from '../calc/calc.router.ts';
import { jobsRouter } from '../jobs/jobs.router.ts';
import { clearPending, listPending } from '../jobs/pending-work.ts';
import { jobRunnerFor } from '../jobs/job-runner.ts';
import { METHOD_VERSION } from '#shared/engineering/assessment.ts';
import { assessSpansBulk, countSpans } from './assessment.service.ts';
import { profilesRouter } from './profiles.router.ts';
import { scoringSettingsRouter } from './settings.router.ts';
import { spanAssessmentRouter } from './span-assessment.router.ts';
import { assessmentReady, registerRescoreWork, rescoreSpansNow, startRescore } from './rescore.ts';
import { sql } from '../../sql/query.ts';
import { usesPostgis } from '../../sql/postgis.ts';

export { assessmentForSpans, assessSpans, assessSpansBulk, defaultPairIds, registerAssessedListener } from './assessment.service.ts';
export { startRescore } from './rescore.ts';
export { perchableSpanIds, perchableSql, perchStandings, freshPerchStanding, refusalOf, gateWord, type PerchStanding, type PerchableQuery } from './perchable.ts';

/** Up to this many spans are recomputed within the request that changed them; more go to a background job. */
const INLINE_LIMIT = 50;

/**
 * Spans whose segment's bounding box overlaps the polygon's: the only ones a zone change can affect (a superset
 * on purpose: rescoring a span the zone misses costs little, missing one it touches would leave a stale gate).
 * With PostGIS the same box test runs on the spans' GiST index; otherwise on the structures' coordinates.
 */
export async function spansNear(em: EntityManager, polygons: Polygon[]): Promise<string[]> {
  const near = (await usesPostgis(em)) ? spansNearBy.postgis : spansNearBy.javascript;
  const ids = new Set<string>();
  for (const p of polygons) for (const id of await near(em, p)) ids.add(id);
  return [...ids];
}

/** Both paths of spansNear for one polygon (the test holds them equal on the same data). */
export const spansNearBy = {
  async postgis(em: EntityManager, p: Polygon): Promise<string[]> {
    const [x0, y0, x1, y1] = turfBbox(p);
    return (await sql.all<{ id: string }>(em, 'select id from spans where geom && ST_MakeEnvelope(?, ?, ?, ?, 4326)', [x0, y0, x1, y1])).map((r) => r.id);
  },
  async javascript(em: EntityManager, p: Polygon): Promise<string[]> {
    const [x0, y0, x1, y1] = turfBbox(p);
    const rows = await sql.all<{ id: string }>(
      em,
      'select s.id as id from spans s join structures a on a.id = s.from_structure_id join structures b on b.id = s.to_structure_id ' +
        // Both corners compared with the box (no scalar min/max, which only SQLite has).
        'where (a.lon <= ? or b.lon <= ?) and (a.lon >= ? or b.lon >= ?) and (a.lat <= ? or b.lat <= ?) and (a.lat >= ? or b.lat >= ?)',
      [x1, x1, x0, x0, y1, y1, y0, y0],
    );
    return rows.map((r) => r.id);
  },
};

/** Rescores a list of spans in the background (a line's load changed, a zone moved, an import landed), as a durable job. */
function startRescoreOf(ctx: AppContext, reason: string, spanIds: string[]) {
  return jobRunnerFor(ctx).enqueue({ kind: 'rescore-spans', reason, payload: { spanIds } });
}

function registerRescoreOfWork(ctx: AppContext) {
  jobRunnerFor(ctx).register('rescore-spans', async (job: { payload: { spanIds: string[] } }, progress) => {
    const { spanIds } = job.payload;
    await assessmentReady(ctx);
    const em = ctx.orm.em.fork();
    progress.setTotal(spanIds.length);
    await assessSpansBulk(em, spanIds, { onBatch: (n) => progress.advance(n), shouldStop: () => progress.aborted });
  });
}

/** The daily pass: survey ages and zone validity dates move with the calendar, so every span is rescored once a day. */
function registerDailyPass(ctx: AppContext) {
  jobRunnerFor(ctx).register('daily-pass', async (job: { payload: { day: string } }, progress) => {
    await assessmentReady(ctx);
    const em = ctx.orm.em.fork();
    progress.setTotal(await countSpans(em, {}));
    await assessSpansBulk(em, undefined, { clearBetweenBatches: true, onBatch: (n) => progress.advance(n), shouldStop: () => progress.aborted });
  });
}

/** Queues the daily pass of a UTC day; however many processes ask, the day has one job (its once key). */
export function startDailyPass(ctx: AppContext, day: string) {
  return jobRunnerFor(ctx).enqueue({ kind: 'daily-pass', reason: `daily refresh for ${day} (survey ages, zone validity)`, payload: { day }, onceKey: `daily-pass:${day}` });
}

/** Owed rescoring recorded by an older version (pending_work) becomes jobs at start-up. */
async function resumePendingRescores(ctx: AppContext) {
  for (const row of await listPending(ctx)) {
    const reason = `${row.reason} (again after a restart)`;
    if (row.kind === 'rescore-all') await startRescore(ctx, reason);
    else if (row.kind === 'rescore-line') await startRescore(ctx, reason, row.payload as { lineId?: string });
    else if (row.kind === 'rescore-spans') await startRescoreOf(ctx, reason, (row.payload as { spanIds: string[] }).spanIds);
    await clearPending(ctx, row.key);
  }
}

/** Spans with no stored assessment, or one from an older method version, are rescored once at start-up. */
async function rescoreStaleAtStart(ctx: AppContext) {
  await assessmentReady(ctx);
  const em = ctx.orm.em.fork();
  const [row] = await sql.all<{ n: number }>(
    em,
    'select (select count(*) from spans s where not exists (select 1 from assessments a where a.span_id = s.id)) + ' +
      '(select count(*) from assessments where method_version <> ?) as n',
    [METHOD_VERSION],
  );
  if (Number(row?.n ?? 0) > 0) await startRescore(ctx, 'spans without a current assessment at start-up');
}

export function assessmentRouters(ctx: AppContext) {
  registerRescoreWork(ctx);
  registerRescoreOfWork(ctx);
  registerDailyPass(ctx);
  void resumePendingRescores(ctx)
    .then(() => rescoreStaleAtStart(ctx))
    .catch((err) => console.error('start-up rescore check failed', err));
  // Listeners are process-wide lists; each app only handles changes made through its own database.
  const mine = (em: EntityManager) => em.getDriver() === ctx.orm.em.getDriver();

  const offSpan = registerSpanListener(async (em: EntityManager, change: SpanChange) => {
    if (!mine(em) || change.spanIds.length === 0) return;
    if (change.spanIds.length <= INLINE_LIMIT && change.action !== 'line-update' && change.action !== 'import') {
      await rescoreSpansNow(ctx, em, change.spanIds);
    } else {
      await startRescoreOf(ctx, `${change.action} of ${change.spanIds.length} span(s)`, change.spanIds);
    }
  });
  const offZone = registerZoneListener(async (em: EntityManager, change: ZoneChange) => {
    if (!mine(em)) return;
    const polygons = [change.before, change.after].filter((p): p is Polygon => !!p);
    const ids = await spansNear(em, polygons);
    if (ids.length) await startRescoreOf(ctx, `no-perch zone ${change.action}`, ids);
  });
  // Survey ages and zone validity dates move with the calendar, not with an edit: one pass per new UTC day, queued
  // by whichever process sees the day first (the others find the day's job and queue nothing).
  let day = new Date().toISOString().slice(0, 10);
  const daily = setInterval(() => {
    const today = new Date().toISOString().slice(0, 10);
    if (today === day) return;
    day = today;
    startDailyPass(ctx, today).catch((err) => console.error('could not queue the daily pass', err));
  }, 10 * 60_000);
  daily.unref();
  ctx.onClose(() => {
    clearInterval(daily);
    offSpan();
    offZone();
  });

  const router = express.Router();
  router.use('/api/calc', calcRouter());
  router.use('/api/jobs', jobsRouter(ctx));
  router.use('/api/profiles', profilesRouter(ctx));
  router.use('/api/settings/scoring', scoringSettingsRouter(ctx));
  router.use('/api/spans', spanAssessmentRouter(ctx));
  return router;
}

/** Rescores every span once (e.g. after the demo seed or on an admin's request). */
export function rescoreAll(ctx: AppContext, reason: string) {
  return startRescore(ctx, reason);
}
