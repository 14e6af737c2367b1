// Line inventory core: ids, views (entity → API shape), the conductor catalogue, span-change listeners, stale-version errors.
import type { EntityManager } from '@mikro-orm/core';
import { generateIdFromEntropySize } from 'lucia';
import { geodesicInverse } from '#shared/engineering/geodesic.ts';
import type {
  ConductorCatalogueEntry,
  ConductorMaterial,
  Hazard as HazardView,
  HazardKind as HazardKindView,
  Line as LineView,
  Span as SpanView,
  SpanAssessmentSummary,
  Structure as StructureView,
} from '#shared/schemas/inventory.ts';
import { AppError } from '../../http/errors.ts';
import { assessmentForSpans, defaultPairIds } from '../assessment/assessment.service.ts';
import { perchStandings } from '../assessment/perchable.ts';
import { defaultPairOf, type ActiveProfiles } from '../assessment/profiles.service.ts';
import { ConductorType } from './conductor-type.entity.ts';
import { Hazard } from './hazard.entity.ts';
import { HazardKind } from './hazard-kind.entity.ts';
import { Line } from './line.entity.ts';
import { Span } from './span.entity.ts';
import { Structure } from './structure.entity.ts';
import { marks, sql } from '../../sql/query.ts';
import { tableExistsSql } from '../../sql/dialect.ts';

export const newId = () => generateIdFromEntropySize(10);

// ---------- stale versions ----------

/** A write carried an old `version`: 409, and the saved record travels in `error.current`. */
export class StaleVersionError extends AppError {
  constructor(
    readonly recordType: string,
    readonly currentVersion: number,
    readonly current: unknown,
  ) {
    super(409, 'conflict', `This ${recordType} was changed by someone else (it is now at version ${currentVersion}). Your change was not saved; compare it with the saved one and apply it again.`, [
      { path: 'version', message: `The saved version is ${currentVersion}` },
    ]);
  }
}

// ---------- span-change listeners (the assessment registers here; inventory never imports it) ----------

export interface SpanChange {
  action: 'create' | 'update' | 'transition' | 'structure-move' | 'line-update' | 'import';
  spanIds: string[];
}
export type SpanListener = (em: EntityManager, change: SpanChange) => void | Promise<void>;

/** Everyone called after a span write has been flushed (e.g. the assessment recomputes the span). */
export const onSpanChanged: SpanListener[] = [];

export function registerSpanListener(fn: SpanListener): () => void {
  if (!onSpanChanged.includes(fn)) onSpanChanged.push(fn);
  return () => {
    const i = onSpanChanged.indexOf(fn);
    if (i >= 0) onSpanChanged.splice(i, 1);
  };
}

/** Runs the listeners after the write is saved; a failing listener is logged and never undoes the write. */
export async function notifySpanChanged(em: EntityManager, change: SpanChange): Promise<void> {
  if (!change.spanIds.length) return;
  for (const fn of [...onSpanChanged]) {
    try {
      await fn(em, change);
    } catch (err) {
      console.error(`Span listener failed after ${change.action} of ${change.spanIds.length} span(s):`, err);
    }
  }
}

// ---------- geometry ----------

/** WGS84 geodesic between two structures (Karney's algorithm, GeographicLib), m. */
export function spanLengthM(from: Pick<Structure, 'lat' | 'lon'>, to: Pick<Structure, 'lat' | 'lon'>): number {
  return geodesicInverse({ latDeg: from.lat, lonDeg: from.lon }, { latDeg: to.lat, lonDeg: to.lon }).lengthM;
}

/** The span as a GeoJSON LineString (lon, lat order). */
export function spanLineString(from: Pick<Structure, 'lat' | 'lon'>, to: Pick<Structure, 'lat' | 'lon'>) {
  return { type: 'LineString' as const, coordinates: [[from.lon, from.lat], [to.lon, to.lat]] };
}

// ---------- neighbours: photos (read by table) and the stored assessments ----------

const tableCache = new WeakMap<object, Map<string, boolean>>();
export async function tableExists(em: EntityManager, name: string): Promise<boolean> {
  const key = em.getConnection() as object;
  let known = tableCache.get(key);
  if (!known) tableCache.set(key, (known = new Map()));
  if (known.get(name)) return true;
  const rows = await sql.all<{ name: string }>(em, tableExistsSql(em), [name]);
  const exists = rows.length > 0;
  if (exists) known.set(name, true);
  return exists;
}

/** The default harvester × drone pair (first active of each, as the assessment module defines it), or null. */
export async function defaultAssessmentPair(em: EntityManager): Promise<{ harvesterProfileId: string; droneProfileId: string } | null> {
  return defaultPairIds(em);
}

/** The stored assessment of the default pair per span, in the shape the assessment module gives it. */
async function assessmentsFor(em: EntityManager, spanIds: string[], profiles?: ActiveProfiles): Promise<Map<string, SpanAssessmentSummary>> {
  const out = new Map<string, SpanAssessmentSummary>();
  if (!spanIds.length) return out;
  for (const [id, view] of await assessmentForSpans(em, spanIds, profiles && defaultPairOf(profiles))) if (view) out.set(id, view as unknown as SpanAssessmentSummary);
  return out;
}

async function photoIdsFor(em: EntityManager, spanIds: string[]): Promise<Map<string, string[]>> {
  const out = new Map<string, string[]>();
  if (!spanIds.length || !(await tableExists(em, 'photos'))) return out;
  for (const chunk of chunks(spanIds, 400)) {
    const rows = await sql.all<{ id: string; span_id: string }>(em, `select id, span_id from photos where span_id in (${marks(chunk.length)}) order by created_at, id`, chunk);
    for (const r of rows) {
      const list = out.get(r.span_id) ?? [];
      list.push(r.id);
      out.set(r.span_id, list);
    }
  }
  return out;
}

export function chunks<T>(list: T[], size: number): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < list.length; i += size) out.push(list.slice(i, i + size));
  return out;
}

// ---------- views ----------

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function lineView(l: Line, counts?: { structureCount: number; spanCount: number }): LineView {
  return {
    id: l.id,
    name: l.name,
    owner: l.owner,
    voltageKv: l.voltageKv,
    frequencyHz: l.frequencyHz as 50 | 60,
    phases: l.phases,
    loadTypicalA: l.loadTypicalA,
    loadMinA: l.loadMinA,
    loadPeakA: l.loadPeakA,
    loadProfileA: l.loadProfileA,
    version: l.version,
    ...(counts ?? {}),
    createdAt: l.createdAt.toISOString(),
    updatedAt: l.updatedAt.toISOString(),
  };
}

export function structureView(s: Structure): StructureView {
  return {
    id: s.id,
    lineId: s.lineId,
    lat: s.lat,
    lon: s.lon,
    kind: s.kind,
    label: s.label,
    attachmentHeightM: s.attachmentHeightM,
    version: s.version,
    createdAt: s.createdAt.toISOString(),
    updatedAt: s.updatedAt.toISOString(),
  };
}

export function hazardView(h: Hazard): HazardView {
  return { id: h.id, kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM, note: h.note };
}

export function hazardKindView(k: HazardKind): HazardKindView {
  return { id: k.id, label: k.label, defaultSeverity: k.defaultSeverity, active: k.active };
}

export function conductorCatalogueView(c: ConductorType): ConductorCatalogueEntry {
  return {
    codeWord: c.codeWord,
    size: c.size,
    stranding: c.stranding,
    material: c.material as ConductorMaterial,
    diameterMm: c.diameterMm,
    resistanceDc20OhmPerM: c.resistanceDc20OhmPerM,
    resistanceAc25OhmPerM: c.resistanceAc25OhmPerM,
    resistanceAc75OhmPerM: c.resistanceAc75OhmPerM,
    weightKgPerM: c.weightKgPerM,
  };
}

export function spanConductorView(s: Span): SpanView['conductor'] {
  if (!s.conductorCodeWord && s.conductorDiameterMm === null && !s.conductorMaterial && !s.conductorSize) return null;
  return {
    codeWord: s.conductorCodeWord,
    size: s.conductorSize,
    material: s.conductorMaterial,
    diameterMm: s.conductorDiameterMm,
    resistanceLowOhmPerM: s.conductorResistanceLowOhmPerM,
    tempLowC: s.conductorTempLowC,
    resistanceHighOhmPerM: s.conductorResistanceHighOhmPerM,
    tempHighC: s.conductorTempHighC,
    source: s.conductorCodeWord ? 'catalogue' : 'custom',
  };
}

/**
 * The API shape of many spans at once (lines, structures, hazards, photos and assessments loaded in batches).
 * `profiles`: the active profiles when the caller has read them already (a list request reads them once).
 */
export async function spanViews(em: EntityManager, spans: Span[], profiles?: ActiveProfiles): Promise<SpanView[]> {
  if (!spans.length) return [];
  const ids = spans.map((s) => s.id);
  const lineIds = [...new Set(spans.map((s) => s.lineId))];
  const structureIds = [...new Set(spans.flatMap((s) => [s.fromStructureId, s.toStructureId]))];
  const [lines, structures, hazards, photos, assessments, standings] = await Promise.all([
    em.find(Line, { id: { $in: lineIds } }),
    findStructures(em, structureIds),
    findHazards(em, ids),
    photoIdsFor(em, ids),
    assessmentsFor(em, ids, profiles),
    perchStandings(em, ids, profiles),
  ]);
  const lineById = new Map(lines.map((l) => [l.id, l]));
  const structureById = new Map(structures.map((s) => [s.id, s]));
  const hazardsBySpan = new Map<string, Hazard[]>();
  for (const h of hazards) hazardsBySpan.set(h.spanId, [...(hazardsBySpan.get(h.spanId) ?? []), h]);
  return spans.map((s) => {
    const line = lineById.get(s.lineId);
    return {
      id: s.id,
      lineId: s.lineId,
      lineName: line?.name ?? '',
      fromStructureId: s.fromStructureId,
      toStructureId: s.toStructureId,
      fromStructureLabel: structureById.get(s.fromStructureId)?.label ?? '',
      toStructureLabel: structureById.get(s.toStructureId)?.label ?? '',
      status: s.status,
      version: s.version,
      lengthM: s.lengthM,
      conductor: spanConductorView(s),
      phasePosition: s.phasePosition,
      clearanceM: s.clearanceM,
      lowestClearanceM: s.lowestClearanceM,
      lowestClearanceAlongM: s.lowestClearanceAlongM,
      terrain: s.terrain,
      loadCurrentA: s.loadCurrentA ?? line?.loadTypicalA ?? 0,
      loadCurrentSource: s.loadCurrentA === null ? 'line' : 'span',
      hazards: (hazardsBySpan.get(s.id) ?? []).map(hazardView),
      photoIds: photos.get(s.id) ?? [],
      surveyDate: s.surveyDate,
      surveyorId: s.surveyorId,
      returnReason: s.returnReason,
      suspendReason: s.suspendReason,
      submittedAt: iso(s.submittedAt),
      approvedAt: iso(s.approvedAt),
      approvedById: s.approvedById,
      assessment: assessments.get(s.id) ?? null,
      perchable: standings.get(s.id)?.perchable ?? null,
      // Approved, but its assessment no longer passes for any active pair: a safety officer must decide.
      needsDecision: s.status === 'approved' && standings.get(s.id)?.perchable === false,
      failingGates: standings.get(s.id)?.perchable === false ? standings.get(s.id)!.failing : [],
      createdAt: s.createdAt.toISOString(),
      updatedAt: s.updatedAt.toISOString(),
    };
  });
}

export async function spanViewOf(em: EntityManager, span: Span): Promise<SpanView> {
  return (await spanViews(em, [span]))[0]!;
}

async function findStructures(em: EntityManager, ids: string[]): Promise<Structure[]> {
  const out: Structure[] = [];
  for (const chunk of chunks(ids, 500)) out.push(...(await em.find(Structure, { id: { $in: chunk } })));
  return out;
}

async function findHazards(em: EntityManager, spanIds: string[]): Promise<Hazard[]> {
  const out: Hazard[] = [];
  for (const chunk of chunks(spanIds, 500)) out.push(...(await em.find(Hazard, { spanId: { $in: chunk } }, { orderBy: { createdAt: 'asc', id: 'asc' } })));
  return out;
}

/** The audited snapshot of a span (its fields and hazards, without derived data). */
export function spanSnapshot(s: Span, hazards: Hazard[]) {
  return {
    lineId: s.lineId,
    fromStructureId: s.fromStructureId,
    toStructureId: s.toStructureId,
    status: s.status,
    version: s.version,
    lengthM: s.lengthM,
    conductor: spanConductorView(s),
    phasePosition: s.phasePosition,
    clearanceM: s.clearanceM,
    lowestClearanceM: s.lowestClearanceM,
    lowestClearanceAlongM: s.lowestClearanceAlongM,
    terrain: s.terrain,
    loadCurrentA: s.loadCurrentA,
    surveyDate: s.surveyDate,
    surveyorId: s.surveyorId,
    returnReason: s.returnReason,
    suspendReason: s.suspendReason,
    hazards: hazards.map((h) => ({ kindId: h.kindId, severity: h.severity, positionAlongM: h.positionAlongM, note: h.note })),
  };
}

export function structureSnapshot(s: Structure) {
  return { lineId: s.lineId, label: s.label, lat: s.lat, lon: s.lon, kind: s.kind, attachmentHeightM: s.attachmentHeightM, version: s.version };
}

export function lineSnapshot(l: Line) {
  const { id: _id, createdAt: _c, updatedAt: _u, ...rest } = lineView(l);
  return rest;
}

// ---------- conductor catalogue ----------

/** Catalogue entry by code word, case-insensitive. */
export async function findCatalogueConductor(em: EntityManager, codeWord: string): Promise<ConductorType | null> {
  const all = await em.find(ConductorType, {});
  const key = codeWord.trim().toLowerCase();
  return all.find((c) => c.codeWord.toLowerCase() === key) ?? null;
}
