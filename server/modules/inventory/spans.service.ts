// Spans: create, edit (versioned), the review lifecycle and its rules, every change audited.
import type { EntityManager } from '@mikro-orm/core';
import type { ApiIssue } from '#shared/api-error.ts';
import {
  SAFETY_RELEVANT_SPAN_FIELDS,
  type ConductorInput,
  type HazardInput,
  type SpanCreateInput,
  type SpanStatus,
  type SpanUpdateInput,
  type Span as SpanView,
} from '#shared/schemas/inventory.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import type { User } from '../auth/user.entity.ts';
import { Photo } from '../photos/photo.entity.ts';
import { activeZonesForGeometry } from '../zones/zone.service.ts';
import { freshPerchStanding, refusalOf } from '../assessment/perchable.ts';
import { Hazard } from './hazard.entity.ts';
import { HazardKind } from './hazard-kind.entity.ts';
import { Line } from './line.entity.ts';
import { Span } from './span.entity.ts';
import { Structure } from './structure.entity.ts';
import {
  StaleVersionError,
  findCatalogueConductor,
  newId,
  notifySpanChanged,
  spanLengthM,
  spanLineString,
  spanSnapshot,
  spanViewOf,
} from './inventory.service.ts';

export async function getSpanOr404(em: EntityManager, id: string): Promise<Span> {
  const span = await em.findOne(Span, { id });
  if (!span) throw AppError.notFound('Span');
  return span;
}

// ---------- conductor ----------

export type ConductorFields = Pick<
  Span,
  | 'conductorCodeWord'
  | 'conductorSize'
  | 'conductorMaterial'
  | 'conductorDiameterMm'
  | 'conductorResistanceLowOhmPerM'
  | 'conductorTempLowC'
  | 'conductorResistanceHighOhmPerM'
  | 'conductorTempHighC'
>;

const NO_CONDUCTOR: ConductorFields = {
  conductorCodeWord: null,
  conductorSize: null,
  conductorMaterial: null,
  conductorDiameterMm: null,
  conductorResistanceLowOhmPerM: null,
  conductorTempLowC: null,
  conductorResistanceHighOhmPerM: null,
  conductorTempHighC: null,
};

/**
 * A catalogue code word fills size, material, outside diameter and the AC resistances at 25 °C and 75 °C
 * (what the IEEE 738 heat balance interpolates between); a custom conductor keeps what the surveyor entered.
 */
export async function resolveConductor(em: EntityManager, input: ConductorInput | null, path = 'conductor'): Promise<ConductorFields> {
  if (!input) return { ...NO_CONDUCTOR };
  if (input.codeWord) {
    const c = await findCatalogueConductor(em, input.codeWord);
    if (!c) throw AppError.field(`${path}.codeWord`, `"${input.codeWord}" is not in the conductor catalogue; pick one from the list, or clear the code word and describe a custom conductor`);
    return {
      conductorCodeWord: c.codeWord,
      conductorSize: `${c.size} ${c.stranding}`,
      conductorMaterial: c.material as Span['conductorMaterial'],
      conductorDiameterMm: c.diameterMm,
      conductorResistanceLowOhmPerM: c.resistanceAc25OhmPerM,
      conductorTempLowC: 25,
      conductorResistanceHighOhmPerM: c.resistanceAc75OhmPerM,
      conductorTempHighC: 75,
    };
  }
  return {
    conductorCodeWord: null,
    conductorSize: input.size ?? null,
    conductorMaterial: input.material ?? null,
    conductorDiameterMm: input.diameterMm ?? null,
    conductorResistanceLowOhmPerM: input.resistanceLowOhmPerM ?? null,
    conductorTempLowC: input.tempLowC ?? null,
    conductorResistanceHighOhmPerM: input.resistanceHighOhmPerM ?? null,
    conductorTempHighC: input.tempHighC ?? null,
  };
}

// ---------- structures of a span ----------

async function structuresFor(em: EntityManager, lineId: string, fromId: string, toId: string) {
  const [from, to] = await Promise.all([em.findOne(Structure, { id: fromId }), em.findOne(Structure, { id: toId })]);
  const issues: ApiIssue[] = [];
  if (!from) issues.push({ path: 'fromStructureId', message: 'No such structure' });
  else if (from.lineId !== lineId) issues.push({ path: 'fromStructureId', message: 'This structure belongs to another line' });
  if (!to) issues.push({ path: 'toStructureId', message: 'No such structure' });
  else if (to.lineId !== lineId) issues.push({ path: 'toStructureId', message: 'This structure belongs to another line' });
  if (issues.length) throw AppError.badRequest(`Invalid input: ${issues.map((i) => i.path).join(', ')}`, issues);
  return { from: from!, to: to! };
}

async function assertNoDuplicate(em: EntityManager, lineId: string, fromId: string, toId: string, exceptId?: string) {
  const dup = await em.findOne(Span, {
    lineId,
    $or: [
      { fromStructureId: fromId, toStructureId: toId },
      { fromStructureId: toId, toStructureId: fromId },
    ],
    ...(exceptId ? { id: { $ne: exceptId } } : {}),
  });
  if (dup) throw AppError.conflict('A span between these two structures already exists', [{ path: 'toStructureId', message: `Span ${dup.id} already joins these structures` }]);
}

// ---------- hazards ----------

export interface HazardRecord {
  kindId: string;
  severity: Hazard['severity'];
  positionAlongM: number | null;
  note: string;
}

const hazardKey = (h: HazardRecord) => `${h.kindId}|${h.severity}|${h.positionAlongM ?? ''}|${h.note}`;
export function sameHazards(a: HazardRecord[], b: HazardRecord[]) {
  const ka = a.map(hazardKey).sort();
  const kb = b.map(hazardKey).sort();
  return ka.length === kb.length && ka.every((k, i) => k === kb[i]);
}

async function checkHazardKinds(em: EntityManager, inputs: HazardInput[], existing: Hazard[], lengthM: number, path = 'hazards') {
  const kinds = new Map((await em.find(HazardKind, {})).map((k) => [k.id, k]));
  const issues: ApiIssue[] = [];
  inputs.forEach((h, i) => {
    const kind = kinds.get(h.kindId);
    const kept = h.id ? existing.find((e) => e.id === h.id) : undefined;
    if (!kind) issues.push({ path: `${path}.${i}.kindId`, message: `"${h.kindId}" is not in the hazard catalogue` });
    else if (!kind.active && kept?.kindId !== h.kindId) issues.push({ path: `${path}.${i}.kindId`, message: `"${kind.label}" has been retired from the hazard catalogue` });
    if (h.positionAlongM != null && h.positionAlongM > lengthM + 0.5)
      issues.push({ path: `${path}.${i}.positionAlongM`, message: `The position is beyond the end of the span (${lengthM.toFixed(1)} m long)` });
  });
  if (issues.length) throw AppError.badRequest(`Invalid input: ${issues.map((i) => i.path).join(', ')}`, issues);
}

/**
 * Hazards are going: photos that showed them stay on the span but lose the link, in the same flush
 * (one transaction) as the removal, so no photo ever points at a hazard that is gone.
 */
export async function unlinkPhotosFromHazards(em: EntityManager, hazardIds: string[]) {
  if (!hazardIds.length) return;
  for (const photo of await em.find(Photo, { hazardId: { $in: hazardIds } })) photo.hazardId = null;
}

/** The lowest-clearance location must lie on the span: 0 ≤ x ≤ its length. */
export function checkLowestClearanceAlong(alongM: number | null, lengthM: number) {
  if (alongM !== null && alongM > lengthM + 0.5)
    throw AppError.field('lowestClearanceAlongM', `The lowest-clearance location is beyond the end of the span (${lengthM.toFixed(1)} m long); give the distance from the from-structure`);
}

/** Replaces the span's hazards with the list; entries carrying an existing id keep that hazard (and its photos). */
async function replaceHazards(em: EntityManager, spanId: string, inputs: HazardInput[], existing: Hazard[]): Promise<Hazard[]> {
  const keptIds = new Set<string>();
  const result: Hazard[] = [];
  const now = new Date();
  for (const h of inputs) {
    const prior = h.id ? existing.find((e) => e.id === h.id && !keptIds.has(e.id)) : undefined;
    if (prior) {
      keptIds.add(prior.id);
      prior.kindId = h.kindId;
      prior.severity = h.severity;
      prior.positionAlongM = h.positionAlongM ?? null;
      prior.note = h.note ?? '';
      result.push(prior);
    } else {
      result.push(em.create(Hazard, { id: newId(), spanId, kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM ?? null, note: h.note ?? '', createdAt: now }));
    }
  }
  const removed = existing.filter((e) => !keptIds.has(e.id));
  for (const e of removed) em.remove(e);
  await unlinkPhotosFromHazards(em, removed.map((e) => e.id));
  return result;
}

const toRecord = (h: HazardInput | Hazard): HazardRecord => ({ kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM ?? null, note: h.note ?? '' });

// ---------- create ----------

export async function createSpan(em: EntityManager, user: User, input: SpanCreateInput & { hazards?: HazardInput[] }, opts: { action?: string } = {}): Promise<SpanView> {
  const line = await em.findOne(Line, { id: input.lineId });
  if (!line) throw AppError.field('lineId', 'No such line');
  const { from, to } = await structuresFor(em, line.id, input.fromStructureId, input.toStructureId);
  await assertNoDuplicate(em, line.id, from.id, to.id);
  const lengthM = spanLengthM(from, to);
  await checkHazardKinds(em, input.hazards ?? [], [], lengthM);
  checkLowestClearanceAlong(input.lowestClearanceAlongM ?? null, lengthM);
  const conductor = await resolveConductor(em, input.conductor ?? null);
  const now = new Date();
  const span = em.create(Span, {
    id: newId(),
    lineId: line.id,
    fromStructureId: from.id,
    toStructureId: to.id,
    status: 'draft',
    version: 1,
    lengthM,
    ...conductor,
    phasePosition: input.phasePosition ?? null,
    clearanceM: input.clearanceM ?? null,
    lowestClearanceM: input.lowestClearanceM ?? null,
    lowestClearanceAlongM: input.lowestClearanceAlongM ?? null,
    terrain: input.terrain ?? null,
    loadCurrentA: input.loadCurrentA ?? null,
    surveyDate: input.surveyDate ?? null,
    surveyorId: user.id,
    returnReason: null,
    suspendReason: null,
    submittedAt: null,
    approvedAt: null,
    approvedById: null,
    createdAt: now,
    updatedAt: now,
  });
  const hazards = await replaceHazards(em, span.id, input.hazards ?? [], []);
  audit(em, { actorId: user.id, action: opts.action ?? 'span.create', recordType: 'span', recordId: span.id, before: null, after: spanSnapshot(span, hazards) });
  await em.flush();
  await notifySpanChanged(em, { action: 'create', spanIds: [span.id] });
  return spanViewOf(em, span);
}

// ---------- edit ----------

/** Who may edit which span: surveyors, on draft and returned spans, and on approved ones (safety-relevant edits send those back to review). */
export const EDITABLE_STATUSES: readonly SpanStatus[] = ['draft', 'returned', 'approved'];

export async function assertVersion(em: EntityManager, span: Span, version: number | undefined) {
  if (version !== undefined && version !== span.version) throw new StaleVersionError('span', span.version, await spanViewOf(em, span));
}

function jsonEq(a: unknown, b: unknown) {
  return JSON.stringify(a) === JSON.stringify(b);
}

export async function updateSpan(em: EntityManager, user: User, spanId: string, input: SpanUpdateInput & { hazards?: HazardInput[] }): Promise<SpanView> {
  const span = await getSpanOr404(em, spanId);
  await assertVersion(em, span, input.version);
  if (!EDITABLE_STATUSES.includes(span.status))
    throw AppError.conflict(
      span.status === 'submitted'
        ? 'This span is awaiting review and cannot be edited now; a safety officer can send it back to you'
        : 'This span is suspended; a safety officer must reinstate it before it can be edited',
    );
  const existing = await em.find(Hazard, { spanId: span.id }, { orderBy: { createdAt: 'asc', id: 'asc' } });
  const before = spanSnapshot(span, existing);

  if (input.fromStructureId !== undefined || input.toStructureId !== undefined) {
    const fromId = input.fromStructureId ?? span.fromStructureId;
    const toId = input.toStructureId ?? span.toStructureId;
    if (fromId === toId) throw AppError.field('toStructureId', 'A span needs two different structures');
    const { from, to } = await structuresFor(em, span.lineId, fromId, toId);
    await assertNoDuplicate(em, span.lineId, from.id, to.id, span.id);
    span.fromStructureId = from.id;
    span.toStructureId = to.id;
    span.lengthM = spanLengthM(from, to);
  }
  if (input.conductor !== undefined) Object.assign(span, await resolveConductor(em, input.conductor));
  if (input.phasePosition !== undefined) span.phasePosition = input.phasePosition;
  if (input.clearanceM !== undefined) span.clearanceM = input.clearanceM;
  if (input.lowestClearanceM !== undefined) span.lowestClearanceM = input.lowestClearanceM;
  if (span.clearanceM !== null && span.lowestClearanceM !== null && span.lowestClearanceM > span.clearanceM)
    throw AppError.field('lowestClearanceM', 'The lowest clearance cannot be above the clearance at the perch point');
  if (input.lowestClearanceAlongM !== undefined) span.lowestClearanceAlongM = input.lowestClearanceAlongM;
  // Checked against the span as it will be (its structures may have changed above).
  checkLowestClearanceAlong(span.lowestClearanceAlongM, span.lengthM);
  if (input.terrain !== undefined) span.terrain = input.terrain;
  if (input.loadCurrentA !== undefined) span.loadCurrentA = input.loadCurrentA;
  if (input.surveyDate !== undefined) span.surveyDate = input.surveyDate;

  let hazards = existing;
  if (input.hazards !== undefined) {
    await checkHazardKinds(em, input.hazards, existing, span.lengthM);
    if (!sameHazards(input.hazards.map(toRecord), existing.map(toRecord)) || input.hazards.some((h) => h.id && !existing.some((e) => e.id === h.id))) {
      hazards = await replaceHazards(em, span.id, input.hazards, existing);
    }
  }

  const after = spanSnapshot(span, hazards);
  const changed = Object.keys(after).filter((k) => !jsonEq((before as any)[k], (after as any)[k]));
  if (!changed.length) return spanViewOf(em, span);

  const safetyChanged = changed.some((k) => (SAFETY_RELEVANT_SPAN_FIELDS as readonly string[]).includes(k) || k === 'lengthM');
  let action = 'span.update';
  if (span.status === 'approved' && safetyChanged) {
    span.status = 'submitted';
    span.submittedAt = new Date();
    span.approvedAt = null;
    span.approvedById = null;
    action = 'span.update.back-to-review';
  }
  span.updatedAt = new Date();
  audit(em, { actorId: user.id, action, recordType: 'span', recordId: span.id, before, after: { ...spanSnapshot(span, hazards), version: span.version + 1 } });
  await em.flush();
  await notifySpanChanged(em, { action: 'update', spanIds: [span.id] });
  return spanViewOf(em, span);
}

// ---------- lifecycle ----------

export type TransitionName = 'submit' | 'approve' | 'return' | 'suspend' | 'reinstate';

/** The legal transitions: from which states, to which state. Roles are enforced by the routes (see inventory.router.ts). */
export const TRANSITIONS: Record<TransitionName, { from: readonly SpanStatus[]; to: SpanStatus; label: string }> = {
  submit: { from: ['draft', 'returned'], to: 'submitted', label: 'submitted for review' },
  approve: { from: ['submitted'], to: 'approved', label: 'approved' },
  // From approved only when the span needs a decision (it no longer passes its gates): see transitionSpan.
  return: { from: ['submitted', 'approved'], to: 'returned', label: 'sent back to the surveyor' },
  suspend: { from: ['approved'], to: 'suspended', label: 'suspended' },
  reinstate: { from: ['suspended'], to: 'approved', label: 'reinstated' },
};

/** What a span needs before review: conductor diameter, clearance at the perch point, terrain, survey date. */
export function missingForSubmit(span: Span): ApiIssue[] {
  const issues: ApiIssue[] = [];
  if (span.conductorDiameterMm === null) issues.push({ path: 'conductor.diameterMm', message: 'Pick the conductor (code word) or enter its outside diameter' });
  if (span.clearanceM === null) issues.push({ path: 'clearanceM', message: 'Enter the ground clearance at the perch point' });
  if (span.terrain === null) issues.push({ path: 'terrain', message: 'Choose the terrain under the span' });
  if (span.surveyDate === null) issues.push({ path: 'surveyDate', message: 'Enter the survey date' });
  return issues;
}

/** The active exclude zones the span touches, by name (added to a refused approval's words; the gates decide). */
export async function approvalBlockers(em: EntityManager, span: Span): Promise<ApiIssue[]> {
  const [from, to] = await Promise.all([em.findOne(Structure, { id: span.fromStructureId }), em.findOne(Structure, { id: span.toStructureId })]);
  if (!from || !to) return [{ path: 'structures', message: 'The span has lost one of its structures' }];
  const zones = await activeZonesForGeometry(em, spanLineString(from, to), new Date(), { severity: 'exclude' });
  return zones.map((z) => ({ path: 'zones', message: `Inside the exclude zone "${z.name}" (${z.reason})` }));
}

export async function transitionSpan(em: EntityManager, user: User, spanId: string, name: TransitionName, input: { reason?: string; version?: number }): Promise<SpanView> {
  const span = await getSpanOr404(em, spanId);
  await assertVersion(em, span, input.version);
  const t = TRANSITIONS[name];
  if (!t.from.includes(span.status))
    throw AppError.conflict(`A span that is ${span.status} cannot be ${t.label}; only a span that is ${t.from.join(' or ')} can`, [{ path: 'status', message: `The span is ${span.status}` }]);
  if (name === 'submit') {
    const missing = missingForSubmit(span);
    if (missing.length) throw AppError.badRequest(`Fill in before submitting: ${missing.map((i) => i.path).join(', ')}`, missing);
  }
  if (name === 'approve' || name === 'reinstate') {
    // Judged on an assessment recomputed now: a stored row may predate a new zone, profile or setting.
    const standing = await freshPerchStanding(em, span.id);
    if (!standing.perchable) {
      const zones = await approvalBlockers(em, span);
      const refusal = refusalOf(standing, t.label);
      throw AppError.conflict(zones.length ? `${refusal.message} ${zones.map((z) => z.message).join('; ')}.` : refusal.message, [...zones, ...refusal.issues]);
    }
  }
  if (name === 'return' && span.status === 'approved') {
    // An approved span goes back to the surveyor only when it needs a decision; one that passes is suspended instead.
    const standing = await freshPerchStanding(em, span.id);
    if (standing.perchable)
      throw AppError.conflict('This approved span still passes its gates, so it is not returned to the surveyor; suspend it with a reason if it is no longer safe', [
        { path: 'status', message: 'The span is approved and passes every blocking gate' },
      ]);
  }
  const hazards = await em.find(Hazard, { spanId: span.id });
  const before = spanSnapshot(span, hazards);
  const now = new Date();
  span.status = t.to;
  if (name === 'submit') {
    span.submittedAt = now;
    span.returnReason = null;
  } else if (name === 'approve' || name === 'reinstate') {
    span.approvedAt = now;
    span.approvedById = user.id;
    span.suspendReason = null;
  } else if (name === 'return') {
    span.returnReason = input.reason!;
    span.approvedAt = null;
    span.approvedById = null;
  } else if (name === 'suspend') {
    span.suspendReason = input.reason!;
  }
  span.updatedAt = now;
  audit(em, {
    actorId: user.id,
    action: `span.${name}`,
    recordType: 'span',
    recordId: span.id,
    before,
    after: { ...spanSnapshot(span, hazards), version: span.version + 1, ...(input.reason ? { reason: input.reason } : {}) },
  });
  await em.flush();
  await notifySpanChanged(em, { action: 'transition', spanIds: [span.id] });
  return spanViewOf(em, span);
}
