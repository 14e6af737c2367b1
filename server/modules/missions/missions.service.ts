// Mission records: save a plan (the server plans it again; a client's result is never trusted), list, read,
// replan (same mission, version + 1, audited), authorise (a second person with the safety role, every perch line
// permitted on the departure date), and staleness: whether the plan still holds against the spans and zones now.
import { generateIdFromEntropySize } from 'lucia';
import { LockMode, OptimisticLockError, type EntityManager } from '@mikro-orm/core';
import { isPostgres } from '../../sql/dialect.ts';
import type { PlanRequest } from '#shared/schemas/missions.ts';
import { AppError } from '../../http/errors.ts';
import { sql } from '../../sql/query.ts';
import { audit } from '../audit/audit.service.ts';
import { AuditEntry } from '../audit/audit.entity.ts';
import { User } from '../auth/user.entity.ts';
import { Span } from '../inventory/span.entity.ts';
import { Structure } from '../inventory/structure.entity.ts';
import { gateWord } from '../assessment/perchable.ts';
import { readStoredResult } from '../assessment/result-codec.ts';
import { linesLackingPermission } from '../line-permissions/line-permissions.service.ts';
import { Mission, MissionPerch, type MissionStaleReason } from './mission.entity.ts';
import { activeZonesOn, planContext, planMission, zonesOnLeg } from './plan.service.ts';

/** A perch point further than this from where it was planned (a structure moved) makes the plan stale, m. */
const MOVED_M = 1;

type Plan = Record<string, unknown> & {
  feasible: boolean;
  legs?: { from: { lat: number; lon: number }; to: { lat: number; lon: number } }[];
  perches?: { spanId: string; lineId: string; lat: number; lon: number; lineName?: string; fromStructureLabel?: string; toStructureLabel?: string }[];
};

function requestOf(input: PlanRequest): PlanRequest {
  return {
    droneProfileId: input.droneProfileId,
    harvesterProfileId: input.harvesterProfileId,
    base: { lat: input.base.lat, lon: input.base.lon },
    target: { lat: input.target.lat, lon: input.target.lon },
    departAt: input.departAt,
    wind: input.wind ? { speedMps: input.wind.speedMps, fromDeg: input.wind.fromDeg } : null,
    returnToBase: input.returnToBase ?? false,
    objective: input.objective ?? 'time',
    ...(input.perchPoints?.length ? { perchPoints: input.perchPoints.map((pp) => ({ spanId: pp.spanId, alongM: pp.alongM })) } : {}),
  };
}

async function namesOf(em: EntityManager, ids: (string | null)[]) {
  const want = [...new Set(ids.filter((x): x is string => !!x))];
  const users = want.length ? await em.find(User, { id: { $in: want } }) : [];
  return new Map(users.map((u) => [u.id, u.name]));
}

export function missionView(m: Mission, names: Map<string, string>) {
  const input = m.input as PlanRequest;
  return {
    id: m.id,
    name: m.name,
    status: m.status,
    stale: m.stale,
    staleReasons: m.staleReasons,
    staleSince: m.staleSince?.toISOString() ?? null,
    feasible: m.feasible,
    plan: m.plan,
    input,
    droneProfileId: m.droneProfileId,
    harvesterProfileId: m.harvesterProfileId,
    base: input.base,
    target: input.target,
    departAt: m.departAt,
    departDate: m.departDate,
    wind: input.wind ?? null,
    returnToBase: input.returnToBase ?? false,
    objective: input.objective ?? 'time',
    plannerId: m.plannerId,
    plannerName: names.get(m.plannerId) ?? null,
    authorisedAt: m.authorisedAt?.toISOString() ?? null,
    authorisedById: m.authorisedById,
    authorisedByName: m.authorisedById ? (names.get(m.authorisedById) ?? null) : null,
    version: m.version,
    createdAt: m.createdAt.toISOString(),
    updatedAt: m.updatedAt.toISOString(),
  };
}
export type MissionView = ReturnType<typeof missionView>;

export async function viewOf(em: EntityManager, m: Mission) {
  return missionView(m, await namesOf(em, [m.plannerId, m.authorisedById]));
}

/** What the audit keeps of a mission: the inputs and the plan's headline figures (the plan itself is on the record). */
function snapshot(m: Mission) {
  const p = m.plan as Plan;
  return {
    name: m.name,
    status: m.status,
    input: m.input,
    feasible: m.feasible,
    totalDistanceM: p.totalDistanceM ?? null,
    totalDurationS: p.totalDurationS ?? null,
    perchSpanIds: (p.perches ?? []).map((x) => x.spanId),
    stale: m.stale,
    staleReasons: m.staleReasons,
    version: m.version,
  };
}

async function planned(em: EntityManager, input: PlanRequest) {
  const ctx = await planContext(em, input);
  const outcome = await planMission(em, input, ctx);
  if (!outcome.result.feasible) {
    const r = outcome.result as { message?: string; reason?: string };
    throw AppError.conflict(`There is no route to save: ${r.message ?? r.reason ?? 'no route'}`, [{ path: 'plan', message: r.message ?? 'no route' }]);
  }
  return { ctx, outcome };
}

function perchRows(missionId: string, plan: Plan, versions: Record<string, number>): MissionPerch[] {
  return (plan.perches ?? []).map((p, seq) => Object.assign(new MissionPerch(), { id: generateIdFromEntropySize(10), missionId, seq, spanId: p.spanId, lineId: p.lineId, spanVersion: versions[p.spanId] ?? 1, lat: p.lat, lon: p.lon }));
}

async function conflictOnRace<T>(fn: () => Promise<T>): Promise<T> {
  try {
    return await fn();
  } catch (err) {
    if (err instanceof OptimisticLockError) throw AppError.conflict('This mission was changed by someone else at the same moment. Nothing was saved; reopen it and try again.', [{ path: 'version', message: 'changed meanwhile' }]);
    throw err;
  }
}

async function flushOrConflict(em: EntityManager) {
  try {
    await em.flush();
  } catch (err) {
    if (err instanceof OptimisticLockError) throw AppError.conflict('This mission was changed by someone else at the same moment. Nothing was saved; reopen it and try again.', [{ path: 'version', message: 'changed meanwhile' }]);
    throw err;
  }
}

export async function createMission(em: EntityManager, user: User, input: PlanRequest & { name: string }) {
  const req = requestOf(input);
  const { ctx, outcome } = await planned(em, req);
  const now = new Date();
  const m = em.create(Mission, {
    id: generateIdFromEntropySize(10),
    name: input.name,
    status: 'planned',
    plannerId: user.id,
    droneProfileId: req.droneProfileId,
    harvesterProfileId: req.harvesterProfileId,
    input: req as unknown as Record<string, unknown>,
    plan: outcome.result,
    feasible: true,
    departAt: req.departAt,
    departDate: ctx.localDate,
    stale: false,
    staleReasons: [],
    staleSince: null,
    authorisedAt: null,
    authorisedById: null,
    version: 1,
    createdAt: now,
    updatedAt: now,
  });
  for (const row of perchRows(m.id, outcome.result as Plan, outcome.spanVersions)) em.persist(row);
  audit(em, { actorId: user.id, action: 'mission.create', recordType: 'mission', recordId: m.id, after: snapshot(m) });
  await em.flush();
  return viewOf(em, m);
}

export async function getMission(em: EntityManager, id: string) {
  const m = await em.findOne(Mission, { id });
  if (!m) throw AppError.notFound('Mission');
  return m;
}

export async function listMissions(em: EntityManager) {
  const items = await em.find(Mission, {}, { orderBy: { createdAt: 'desc', id: 'asc' } });
  const names = await namesOf(em, items.flatMap((m) => [m.plannerId, m.authorisedById]));
  return items.map((m) => missionView(m, names));
}

function assertVersion(m: Mission, version: number | undefined) {
  if (version !== undefined && version !== m.version)
    throw AppError.conflict(`This mission was changed by someone else (it is now at version ${m.version}). Nothing was saved; reopen it and try again.`, [{ path: 'version', message: `The saved version is ${m.version}` }]);
}

export async function replanMission(em: EntityManager, user: User, id: string, input: Partial<PlanRequest> & { name?: string; version?: number }) {
  const m = await getMission(em, id);
  assertVersion(m, input.version);
  const before = snapshot(m);
  const { name, version: _v, ...changes } = input;
  const merged = requestOf({ ...(m.input as PlanRequest), ...Object.fromEntries(Object.entries(changes).filter(([, v]) => v !== undefined)) } as PlanRequest);
  const { ctx, outcome } = await planned(em, merged);
  const seen = m.version;
  // One transaction from the version check to the new perches: a racing replan either sees the new version or waits.
  // On PostgreSQL two replans can both read the old version; the later one's versioned update then finds no row.
  const saved = await conflictOnRace(() => em.transactional(async (tx) => {
    // PostgreSQL: the row lock makes a racing replan wait here and then read the new version (409), rather than
    // both reading the old one and colliding on the perches. SQLite's one connection already runs them in turn.
    const cur = await tx.findOne(Mission, { id }, { refresh: true, ...(isPostgres(tx) ? { lockMode: LockMode.PESSIMISTIC_WRITE } : {}) });
    if (!cur) throw AppError.notFound('Mission');
    assertVersion(cur, seen);
    const wasAuthorised = cur.status === 'authorised';
    if (name) cur.name = name;
    cur.input = merged as unknown as Record<string, unknown>;
    cur.plan = outcome.result;
    cur.feasible = true;
    cur.droneProfileId = merged.droneProfileId;
    cur.harvesterProfileId = merged.harvesterProfileId;
    cur.departAt = merged.departAt;
    cur.departDate = ctx.localDate;
    cur.stale = false;
    cur.staleReasons = [];
    cur.staleSince = null;
    // A new plan needs its own authorisation.
    cur.status = 'planned';
    cur.authorisedAt = null;
    cur.authorisedById = null;
    cur.updatedAt = new Date();
    await tx.nativeDelete(MissionPerch, { missionId: cur.id });
    for (const row of perchRows(cur.id, outcome.result as Plan, outcome.spanVersions)) tx.persist(row);
    audit(tx, { actorId: user.id, action: wasAuthorised ? 'mission.replan.authorisation-withdrawn' : 'mission.replan', recordType: 'mission', recordId: cur.id, before, after: { ...snapshot(cur), version: cur.version + 1 } });
    return cur;
  }));
  return viewOf(em, saved);
}

export async function missionHistory(em: EntityManager, id: string) {
  await getMission(em, id);
  const entries = await em.find(AuditEntry, { recordType: 'mission', recordId: id }, { orderBy: { at: 'asc', id: 'asc' } });
  const names = await namesOf(em, entries.map((e) => e.actorId));
  return entries.map((e) => ({ id: e.id, at: e.at.toISOString(), actorId: e.actorId, actorName: e.actorId ? (names.get(e.actorId) ?? null) : null, action: e.action, before: e.before, after: e.after }));
}

/** Lines among the mission's perches with no owner permission valid on the departure date. */
async function linesWithoutPermission(em: EntityManager, m: Mission): Promise<{ lineId: string; name: string }[]> {
  const lineIds = (await em.find(MissionPerch, { missionId: m.id })).map((p) => p.lineId);
  return (await linesLackingPermission(em, lineIds, m.departDate)).map((l) => ({ lineId: l.lineId, name: l.lineName }));
}

export async function authoriseMission(em: EntityManager, user: User, id: string, version: number | undefined) {
  const m = await getMission(em, id);
  assertVersion(m, version);
  if (m.plannerId === user.id) throw AppError.forbidden('You planned this mission, so another safety officer must authorise it');
  // Judge the plan against the records now, not only against what the hooks last marked.
  await refreshStaleness(em, [m.id]);
  if (m.stale) {
    throw AppError.conflict(
      `This mission needs a new plan before it can be authorised: ${m.staleReasons.map((r) => r.message).join('; ')}`,
      m.staleReasons.map((r) => ({ path: r.spanId ? `perches.${r.spanId}` : r.zoneId ? `zones.${r.zoneId}` : 'plan', message: r.message })),
    );
  }
  if (m.status === 'authorised') throw AppError.conflict('This mission is already authorised');
  const missing = await linesWithoutPermission(em, m);
  if (missing.length) {
    const names = missing.map((l) => `"${l.name}"`).join(', ');
    throw AppError.conflict(
      `This mission cannot be authorised: the line${missing.length > 1 ? 's' : ''} ${names} ${missing.length > 1 ? 'have' : 'has'} no owner permission valid on ${m.departDate}. Record the owner's permission on the line first.`,
      missing.map((l) => ({ path: `lines.${l.lineId}`, message: `${l.name}: no permission valid on ${m.departDate}` })),
    );
  }
  const before = snapshot(m);
  m.status = 'authorised';
  m.authorisedAt = new Date();
  m.authorisedById = user.id;
  m.updatedAt = new Date();
  audit(em, { actorId: user.id, action: 'mission.authorise', recordType: 'mission', recordId: m.id, before, after: { ...snapshot(m), version: m.version + 1 } });
  await flushOrConflict(em);
  return viewOf(em, m);
}

// ---------- staleness ----------

const spanName = (line: string | undefined, a: string | undefined, b: string | undefined) => [line, a && b ? `${a}–${b}` : null].filter(Boolean).join(' ') || 'a perch span';

/** Why a mission's plan no longer holds, judged against the records now (empty: it holds). */
async function reasonsFor(em: EntityManager, m: Mission): Promise<MissionStaleReason[]> {
  const reasons: MissionStaleReason[] = [];
  const plan = m.plan as Plan;
  const perches = await em.find(MissionPerch, { missionId: m.id }, { orderBy: { seq: 'asc' } });
  const spans = new Map((perches.length ? await em.find(Span, { id: { $in: perches.map((p) => p.spanId) } }) : []).map((s) => [s.id, s]));
  const structureIds = [...spans.values()].flatMap((s) => [s.fromStructureId, s.toStructureId]);
  const structures = new Map((structureIds.length ? await em.find(Structure, { id: { $in: structureIds } }) : []).map((s) => [s.id, s]));
  for (const p of perches) {
    const shown = plan.perches?.find((x) => x.spanId === p.spanId);
    const name = spanName(shown?.lineName, shown?.fromStructureLabel, shown?.toStructureLabel);
    const span = spans.get(p.spanId);
    if (!span) {
      reasons.push({ code: 'span-missing', spanId: p.spanId, message: `the perch span ${name} no longer exists` });
      continue;
    }
    if (span.status !== 'approved') {
      const why = span.status === 'suspended' ? `was suspended${span.suspendReason ? ` (${span.suspendReason})` : ''}` : span.status === 'submitted' ? 'was edited and is back in review' : `is ${span.status}`;
      reasons.push({ code: 'span-not-approved', spanId: p.spanId, message: `the perch span ${name} ${why}` });
      continue;
    }
    if (span.version !== p.spanVersion) reasons.push({ code: 'span-edited', spanId: p.spanId, message: `the perch span ${name} was edited after the plan was made` });
    const a = structures.get(span.fromStructureId);
    const b = structures.get(span.toStructureId);
    if (a && b) {
      const lat = (a.lat + b.lat) / 2;
      const lon = (a.lon + b.lon) / 2;
      const dy = (lat - p.lat) * 111_320;
      const dx = (lon - p.lon) * 111_320 * Math.cos((lat * Math.PI) / 180);
      if (Math.hypot(dx, dy) > MOVED_M) reasons.push({ code: 'span-moved', spanId: p.spanId, message: `a structure of the perch span ${name} moved, so the perch point moved` });
    }
    const rows = (await sql.all(em, 'select perchable, result from assessments where span_id = ? and harvester_profile_id = ? and drone_profile_id = ?', [p.spanId, m.harvesterProfileId, m.droneProfileId])) as { perchable: number; result: unknown }[];
    const row = rows[0];
    if (!row || !row.perchable) {
      const result = row ? (readStoredResult(row.result) as { gates?: unknown[] } | null) : null;
      const gates = ((result?.gates ?? []) as { id: string; passed: boolean; blocking?: boolean }[]).filter((g) => !g.passed && g.blocking !== false).map((g) => gateWord(g.id));
      reasons.push({ code: 'span-not-perchable', spanId: p.spanId, message: `the perch span ${name} no longer passes its gates for this drone and harvester${gates.length ? ` (${gates.join(', ')})` : ''}` });
    }
  }
  const at = Date.parse(m.departAt);
  const excludes = (await activeZonesOn(em, at)).filter((z) => z.severity === 'exclude');
  if (excludes.length) {
    const seen = new Set<string>();
    (plan.legs ?? []).forEach((leg, i) => {
      for (const z of zonesOnLeg(excludes, leg.from, leg.to, 'exclude')) {
        if (seen.has(z.id)) continue;
        seen.add(z.id);
        reasons.push({ code: 'zone-cuts-leg', zoneId: z.id, message: `the exclude zone "${z.name}" now cuts leg ${i + 1}` });
      }
    });
  }
  return reasons;
}

/**
 * Re-judges missions (all fresh ones when `ids` is omitted) and marks those whose plan no longer holds, with the
 * reasons; an authorised one loses its authorisation. Missions already marked keep their first reasons.
 */
export async function refreshStaleness(em: EntityManager, ids?: readonly string[]): Promise<number> {
  const missions = await em.find(Mission, ids ? { id: { $in: [...ids] }, stale: false } : { stale: false });
  let marked = 0;
  for (const m of missions) {
    const reasons = await reasonsFor(em, m);
    if (!reasons.length) continue;
    const before = snapshot(m);
    const wasAuthorised = m.status === 'authorised';
    m.stale = true;
    m.staleReasons = reasons;
    m.staleSince = new Date();
    m.status = 'planned';
    m.authorisedAt = null;
    m.authorisedById = null;
    m.updatedAt = new Date();
    audit(em, { actorId: null, action: wasAuthorised ? 'mission.needs-new-plan.authorisation-withdrawn' : 'mission.needs-new-plan', recordType: 'mission', recordId: m.id, before, after: { ...snapshot(m), version: m.version + 1 } });
    marked++;
  }
  if (marked) await em.flush();
  return marked;
}

/** Fresh missions that perch on any of these spans. */
export async function missionsOnSpans(em: EntityManager, spanIds: readonly string[]): Promise<string[]> {
  const out = new Set<string>();
  for (let i = 0; i < spanIds.length; i += 400) {
    const chunk = spanIds.slice(i, i + 400);
    const rows = (await sql.all(em, `select distinct mp.mission_id as id from mission_perches mp join missions m on m.id = mp.mission_id where m.stale = false and mp.span_id in (${chunk.map(() => '?').join(',')})`, [...chunk])) as { id: string }[];
    for (const r of rows) out.add(r.id);
  }
  return [...out];
}
