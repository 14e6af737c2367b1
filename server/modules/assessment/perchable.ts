// "Perchable": a span whose assessment passes every blocking gate for at least one active harvester × drone pair.
// One definition for the span list filter, the approval rule, the "needs a decision" flag, the map and mission planning.
import type { EntityManager } from '@mikro-orm/core';
import type { ApiIssue } from '#shared/api-error.ts';
import type { DetailPart, SpanAssessment } from '#shared/engineering/assessment.ts';
import { Span } from '../inventory/span.entity.ts';
import { Assessment } from './assessment.entity.ts';
import { assessSpans } from './assessment.service.ts';
import { DroneProfile, HarvesterProfile } from './profile.entity.ts';
import type { ActiveProfiles } from './profiles.service.ts';
import { sql } from '../../sql/query.ts';
import { readAssessmentSummaries, readPerchFlags } from '../../sql/assessments.ts';

/** The gate names a person reads (messages, the review desk); the ampacity flag is listed but never blocks. */
export const GATE_WORDS: Record<string, string> = {
  clearance: 'clearance',
  'contact-temperature': 'contact temperature',
  'gripper-fit': 'gripper fit',
  'no-perch-zone': 'no-perch zone',
  'useful-harvest': 'useful harvest',
  ampacity: 'ampacity (a data-quality flag)',
};

export const gateWord = (id: string) => GATE_WORDS[id] ?? id.replace(/-/g, ' ');

/**
 * SQL condition (bound parameters only, none needed) that the span aliased `spanAlias` is perchable: a stored row
 * of an active harvester and an active drone that passes every blocking gate.
 */
export function perchableSql(spanAlias = 's'): string {
  return (
    'exists (select 1 from assessments pa ' +
    'join harvester_profiles ph on ph.id = pa.harvester_profile_id and ph.active = true ' +
    'join drone_profiles pd on pd.id = pa.drone_profile_id and pd.active = true ' +
    `where pa.span_id = ${spanAlias}.id and pa.perchable = true)`
  );
}

/** 1 perchable, 0 assessed but not perchable, null not assessed for any active pair (the map's tile property). */
export function perchableFlagSql(spanAlias = 's'): string {
  return (
    `(select max(case when pa.perchable then 1 else 0 end) from assessments pa ` +
    'join harvester_profiles ph on ph.id = pa.harvester_profile_id and ph.active = true ' +
    'join drone_profiles pd on pd.id = pa.drone_profile_id and pd.active = true ' +
    `where pa.span_id = ${spanAlias}.id)`
  );
}

export interface PerchableQuery {
  /** Only these spans (else all). */
  spanIds?: readonly string[];
  /** Only spans in these states; whatever plans passes ['approved']. */
  status?: readonly Span['status'][];
  /** Restrict to one pair (a mission's harvester and drone): perchable for that pair, not for any pair. */
  harvesterProfileId?: string;
  droneProfileId?: string;
}

/**
 * Ids of the perchable spans from the stored assessments (kept current by every span write, zone change and rescore).
 * Missions call it with `status: ['approved']` and their own pair.
 */
export async function perchableSpanIds(em: EntityManager, q: PerchableQuery = {}): Promise<string[]> {
  const params: unknown[] = [];
  const where: string[] = [];
  let pairSql = '';
  if (q.harvesterProfileId) {
    pairSql += ' and pa.harvester_profile_id = ?';
    params.push(q.harvesterProfileId);
  }
  if (q.droneProfileId) {
    pairSql += ' and pa.drone_profile_id = ?';
    params.push(q.droneProfileId);
  }
  where.push(perchableSql('s').replace(/\)$/, `${pairSql})`));
  if (q.status?.length) {
    where.push(`s.status in (${q.status.map(() => '?').join(',')})`);
    params.push(...q.status);
  }
  const out: string[] = [];
  const run = async (ids?: readonly string[]) => {
    const idSql = ids ? ` and s.id in (${ids.map(() => '?').join(',')})` : '';
    const rows = await sql.all<{ id: string }>(em, `select s.id as id from spans s where ${where.join(' and ')}${idSql} order by s.id`, [...params, ...(ids ?? [])]);
    for (const r of rows) out.push(r.id);
  };
  if (!q.spanIds) await run();
  else for (let i = 0; i < q.spanIds.length; i += 400) await run(q.spanIds.slice(i, i + 400));
  return out;
}

export interface GateFailure {
  id: string;
  /** The gate in words: "clearance", "contact temperature", … */
  label: string;
  /** The first failing pair's detail, e.g. "clearance 5.20 m; code 5.83 m, drone 3.00 m". */
  detail: string;
  /** The same detail as text and SI quantities, for a screen in the user's units. */
  parts?: DetailPart[];
  /** The pairs (harvester × drone names) that fail it. */
  pairs: string[];
}

export interface PerchStanding {
  perchable: boolean;
  /** Active pairs assessed. */
  pairCount: number;
  /** When the span is not perchable: the blocking gates each pair fails (every pair fails at least one). Empty when it is perchable. */
  failing: GateFailure[];
}

type Row = Pick<Assessment, 'spanId' | 'harvesterProfileId' | 'droneProfileId' | 'perchable' | 'result'>;

/** A span's standing from all its stored rows of active pairs (the plain rule; perchStandings reads less). */
export function standingOf(rows: Row[], names: Map<string, string>): PerchStanding {
  const failing = new Map<string, GateFailure>();
  for (const row of rows) {
    const pair = `${names.get(row.harvesterProfileId) ?? row.harvesterProfileId} with ${names.get(row.droneProfileId) ?? row.droneProfileId}`;
    for (const g of (row.result as SpanAssessment).gates ?? []) {
      if (g.passed || g.blocking === false) continue;
      const f = failing.get(g.id) ?? { id: g.id, label: gateWord(g.id), detail: g.detail, ...(g.parts ? { parts: g.parts } : {}), pairs: [] };
      f.pairs.push(pair);
      failing.set(g.id, f);
    }
  }
  return { perchable: rows.some((r) => r.perchable), pairCount: rows.length, failing: [...failing.values()] };
}

export async function activePairs(em: EntityManager, given?: ActiveProfiles) {
  const [harvesters, drones] = given ? [given.harvesters, given.drones] : await Promise.all([em.find(HarvesterProfile, { active: true }), em.find(DroneProfile, { active: true })]);
  const names = new Map<string, string>([...harvesters, ...drones].map((p) => [p.id, p.name]));
  return { harvesterIds: harvesters.map((h) => h.id), droneIds: drones.map((d) => d.id), names };
}

/**
 * The perch standing of many spans from their stored rows (span views, the review desk). `profiles`: the active
 * profiles when the caller has read them already (a list request reads them once).
 */
export async function perchStandings(em: EntityManager, spanIds: readonly string[], profiles?: ActiveProfiles): Promise<Map<string, PerchStanding>> {
  const out = new Map<string, PerchStanding>();
  if (!spanIds.length) return out;
  const { harvesterIds, droneIds, names } = await activePairs(em, profiles);
  if (!harvesterIds.length || !droneIds.length) return out;
  // First which pairs perch (no JSON): a span that perches for some pair has no failing gates to list, and a pair
  // that perches fails no blocking gate; only the spans that perch for no pair have their gates read.
  const flags = new Map<string, { pairs: number; perchable: boolean }>();
  for (const r of await readPerchFlags(em, spanIds, { harvesterIds, droneIds })) {
    const f = flags.get(r.spanId) ?? { pairs: 0, perchable: false };
    f.pairs++;
    f.perchable ||= r.perchable;
    flags.set(r.spanId, f);
  }
  const blocked = [...flags].filter(([, f]) => !f.perchable).map(([id]) => id);
  const bySpan = new Map<string, Row[]>();
  // Only the columns a standing reads (no inputs), without the identity map.
  for (const r of await readAssessmentSummaries(em, blocked, { harvesterIds, droneIds })) bySpan.set(r.spanId, [...(bySpan.get(r.spanId) ?? []), r]);
  for (const id of spanIds) {
    const f = flags.get(id);
    if (!f) continue;
    out.set(id, f.perchable ? { perchable: true, pairCount: f.pairs, failing: [] } : standingOf(bySpan.get(id) ?? [], names));
  }
  return out;
}

/**
 * Recomputes the span's assessment now (stored, replacing its rows) and judges it: the approval rule reads this,
 * never a stored row that a new zone, profile or setting may have outdated.
 */
export async function freshPerchStanding(em: EntityManager, spanId: string): Promise<PerchStanding> {
  await assessSpans(em, [spanId]);
  const standing = (await perchStandings(em, [spanId])).get(spanId);
  return standing ?? { perchable: false, pairCount: 0, failing: [] };
}

/** The 409 issues and sentence for a span that no active pair can perch on. */
export function refusalOf(standing: PerchStanding, verb = 'approved'): { message: string; issues: ApiIssue[] } {
  if (standing.pairCount === 0) {
    const message = `This span cannot be ${verb}: there is no active harvester and drone profile to assess it with; an admin must activate one of each`;
    return { message, issues: [{ path: 'assessment', message: 'No active harvester × drone pair' }] };
  }
  const issues = standing.failing.map((f) => ({
    path: `gates.${f.id}`,
    message: `Fails ${f.label}: ${f.detail}${f.pairs.length ? ` (${f.pairs.join('; ')})` : ''}`,
  }));
  const words = standing.failing.map((f) => f.label);
  const list = words.length > 1 ? `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}` : (words[0] ?? 'a blocking gate');
  const message = `This span cannot be ${verb}: no active harvester × drone pair passes every blocking gate. Failing: ${list}. Return it to the surveyor with what to re-measure, or have the cause removed first.`;
  return { message, issues };
}
