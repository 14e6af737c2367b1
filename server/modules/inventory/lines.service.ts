// Lines and structures: create, edit (versioned), moving a structure re-measures every span touching it.
import type { EntityManager } from '@mikro-orm/core';
import type { LineCreateInput, LineUpdateInput, StructureCreateInput, StructureUpdateInput } from '#shared/schemas/inventory.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import type { User } from '../auth/user.entity.ts';
import { Hazard } from './hazard.entity.ts';
import { Line } from './line.entity.ts';
import { Span } from './span.entity.ts';
import { Structure } from './structure.entity.ts';
import { StaleVersionError, lineSnapshot, lineView, newId, notifySpanChanged, spanLengthM, spanSnapshot, structureSnapshot, structureView } from './inventory.service.ts';
import { sql } from '../../sql/query.ts';

export async function lineCounts(em: EntityManager): Promise<Map<string, { structureCount: number; spanCount: number }>> {
  const [st, sp] = await Promise.all([
    sql.all<{ line_id: string; n: number }>(em, 'select line_id, count(*) as n from structures group by line_id'),
    sql.all<{ line_id: string; n: number }>(em, 'select line_id, count(*) as n from spans group by line_id'),
  ]);
  const out = new Map<string, { structureCount: number; spanCount: number }>();
  for (const r of st) out.set(r.line_id, { structureCount: Number(r.n), spanCount: 0 });
  for (const r of sp) out.set(r.line_id, { structureCount: out.get(r.line_id)?.structureCount ?? 0, spanCount: Number(r.n) });
  return out;
}

async function assertUniqueName(em: EntityManager, name: string, exceptId?: string) {
  const other = await em.findOne(Line, { name, ...(exceptId ? { id: { $ne: exceptId } } : {}) });
  if (other) throw AppError.field('name', 'A line with this name already exists');
}

export async function createLine(em: EntityManager, user: User, input: LineCreateInput) {
  await assertUniqueName(em, input.name);
  const now = new Date();
  const line = em.create(Line, {
    id: newId(),
    name: input.name,
    owner: input.owner,
    voltageKv: input.voltageKv,
    frequencyHz: input.frequencyHz,
    phases: input.phases ?? 3,
    loadTypicalA: input.loadTypicalA,
    loadMinA: input.loadMinA,
    loadPeakA: input.loadPeakA,
    loadProfileA: input.loadProfileA ?? null,
    version: 1,
    createdAt: now,
    updatedAt: now,
  });
  audit(em, { actorId: user.id, action: 'line.create', recordType: 'line', recordId: line.id, before: null, after: lineSnapshot(line) });
  await em.flush();
  return lineView(line, { structureCount: 0, spanCount: 0 });
}

/** Editing a line's load estimate re-assesses its spans; their review status stays (the span fields did not change). */
export async function updateLine(em: EntityManager, user: User, id: string, input: LineUpdateInput) {
  const line = await em.findOne(Line, { id });
  if (!line) throw AppError.notFound('Line');
  if (input.version !== line.version) throw new StaleVersionError('line', line.version, lineView(line));
  if (input.name !== undefined && input.name !== line.name) await assertUniqueName(em, input.name, line.id);
  const before = lineSnapshot(line);
  const { version: _v, ...fields } = input;
  for (const [k, v] of Object.entries(fields)) if (v !== undefined) (line as any)[k] = v;
  if (line.loadMinA > line.loadTypicalA) throw AppError.field('loadMinA', 'The minimum load cannot be above the typical load');
  if (line.loadTypicalA > line.loadPeakA) throw AppError.field('loadPeakA', 'The peak load cannot be below the typical load');
  if (JSON.stringify(before) === JSON.stringify(lineSnapshot(line))) return lineView(line);
  line.updatedAt = new Date();
  audit(em, { actorId: user.id, action: 'line.update', recordType: 'line', recordId: line.id, before, after: { ...lineSnapshot(line), version: line.version + 1 } });
  await em.flush();
  const spans = await em.find(Span, { lineId: line.id }, { fields: ['id'] });
  await notifySpanChanged(em, { action: 'line-update', spanIds: spans.map((s) => s.id) });
  return lineView(line);
}

// ---------- structures ----------

/** Next free label on a line: "<prefix>-001", "<prefix>-002", … where the prefix comes from the line name. */
export async function nextStructureLabel(em: EntityManager, line: Line): Promise<string> {
  const prefix =
    line.name
      .toUpperCase()
      .replace(/[^A-Z0-9]+/g, '-')
      .replace(/^-|-$/g, '')
      .slice(0, 16) || 'S';
  const taken = new Set((await em.find(Structure, { lineId: line.id }, { fields: ['label'] })).map((s) => s.label));
  for (let n = taken.size + 1; ; n++) {
    const label = `${prefix}-${String(n).padStart(3, '0')}`;
    if (!taken.has(label)) return label;
  }
}

// Numbering reads the highest label and writes the next one: creations run one at a time in this process
// (SQLite has one writer anyway), so parallel requests on one line get distinct labels instead of a unique-key 500.
let structureChain: Promise<unknown> = Promise.resolve();

export function createStructure(em: EntityManager, user: User, input: StructureCreateInput) {
  const run = structureChain.then(() => createStructureNow(em, user, input));
  structureChain = run.catch(() => undefined);
  return run;
}

async function createStructureNow(em: EntityManager, user: User, input: StructureCreateInput) {
  const line = await em.findOne(Line, { id: input.lineId });
  if (!line) throw AppError.field('lineId', 'No such line');
  if (input.label && (await em.findOne(Structure, { lineId: line.id, label: input.label }))) throw AppError.field('label', 'This line already has a structure with this label');
  const now = new Date();
  const s = em.create(Structure, {
    id: newId(),
    lineId: line.id,
    lat: input.lat,
    lon: input.lon,
    kind: input.kind,
    label: input.label ?? (await nextStructureLabel(em, line)),
    attachmentHeightM: input.attachmentHeightM,
    version: 1,
    createdAt: now,
    updatedAt: now,
  });
  audit(em, { actorId: user.id, action: 'structure.create', recordType: 'structure', recordId: s.id, before: null, after: structureSnapshot(s) });
  await em.flush();
  return structureView(s);
}

/**
 * Edits a structure. When it moves, every span touching it gets its geodesic length recomputed
 * (and an approved one goes back to review: its geometry is safety-relevant); each span change is audited.
 */
export async function updateStructure(em: EntityManager, user: User, id: string, input: StructureUpdateInput) {
  const s = await em.findOne(Structure, { id });
  if (!s) throw AppError.notFound('Structure');
  if (input.version !== s.version) throw new StaleVersionError('structure', s.version, structureView(s));
  if (input.label !== undefined && input.label !== s.label && (await em.findOne(Structure, { lineId: s.lineId, label: input.label, id: { $ne: s.id } })))
    throw AppError.field('label', 'This line already has a structure with this label');
  const before = structureSnapshot(s);
  const moved = (input.lat !== undefined && input.lat !== s.lat) || (input.lon !== undefined && input.lon !== s.lon);
  const heightChanged = input.attachmentHeightM !== undefined && input.attachmentHeightM !== s.attachmentHeightM;
  if (input.lat !== undefined) s.lat = input.lat;
  if (input.lon !== undefined) s.lon = input.lon;
  if (input.kind !== undefined) s.kind = input.kind;
  if (input.label !== undefined) s.label = input.label;
  if (input.attachmentHeightM !== undefined) s.attachmentHeightM = input.attachmentHeightM;
  if (JSON.stringify(before) === JSON.stringify(structureSnapshot(s))) return { structure: structureView(s), spanIds: [] as string[] };
  const now = new Date();
  s.updatedAt = now;
  audit(em, { actorId: user.id, action: moved ? 'structure.move' : 'structure.update', recordType: 'structure', recordId: s.id, before, after: { ...structureSnapshot(s), version: s.version + 1 } });

  const touched = moved || heightChanged ? await em.find(Span, { $or: [{ fromStructureId: s.id }, { toStructureId: s.id }] }) : [];
  if (touched.length) {
    const others = await em.find(Structure, { id: { $in: touched.map((sp) => (sp.fromStructureId === s.id ? sp.toStructureId : sp.fromStructureId)) } });
    const byId = new Map([...others, s].map((x) => [x.id, x]));
    const hazards = await em.find(Hazard, { spanId: { $in: touched.map((sp) => sp.id) } });
    for (const span of touched) {
      const from = byId.get(span.fromStructureId);
      const to = byId.get(span.toStructureId);
      if (!from || !to) continue;
      const spanHazards = hazards.filter((h) => h.spanId === span.id);
      const spanBefore = spanSnapshot(span, spanHazards);
      span.lengthM = spanLengthM(from, to);
      let action = 'span.structure-moved';
      if (span.status === 'approved') {
        span.status = 'submitted';
        span.submittedAt = now;
        span.approvedAt = null;
        span.approvedById = null;
        action = 'span.structure-moved.back-to-review';
      }
      span.updatedAt = now;
      audit(em, { actorId: user.id, action, recordType: 'span', recordId: span.id, before: spanBefore, after: { ...spanSnapshot(span, spanHazards), version: span.version + 1, structureId: s.id } });
    }
  }
  await em.flush();
  await notifySpanChanged(em, { action: 'structure-move', spanIds: touched.map((sp) => sp.id) });
  return { structure: structureView(s), spanIds: touched.map((sp) => sp.id) };
}
