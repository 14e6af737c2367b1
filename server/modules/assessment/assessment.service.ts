// Span assessment from the inventory records: builds each span's input, runs the pure method for every active
// harvester × drone pair and stores one row per pair (replacing the previous ones).
import type { EntityManager } from '@mikro-orm/core';
import type { LineString } from 'geojson';
import { bbox as turfBbox, booleanIntersects } from '@turf/turf';
import {
  assessSpan as assessSpanPure,
  DEFAULT_DESIGN_WEATHER,
  detailText,
  gripperRange,
  createAssessmentMemo,
  METHOD_VERSION,
  type AssessmentMemo,
  type ScoringSettings,
  type SpanAssessment,
  type SpanAssessmentInput,
} from '#shared/engineering/assessment.ts';
import { ACSR_CONDUCTORS, DEFAULT_ABSORPTIVITY, DEFAULT_EMISSIVITY, findConductor, thermalConductorOf } from '#shared/engineering/conductors.ts';
import { harvestCurve, harvestPowerW, type HarvesterProfile as HarvesterModel } from '#shared/engineering/ct-harvester.ts';
import { loadSourceOf, type HarvestCurveView, type SpanAssessmentView } from '#shared/schemas/assessment.ts';
import { Span } from '../inventory/span.entity.ts';
import { Line } from '../inventory/line.entity.ts';
import { Structure } from '../inventory/structure.entity.ts';
import { Hazard } from '../inventory/hazard.entity.ts';
import { Zone } from '../zones/zone.entity.ts';
import { isZoneActive } from '../zones/zone.service.ts';
import { Assessment } from './assessment.entity.ts';
import { DroneProfile, HarvesterProfile } from './profile.entity.ts';
import { activeDrones, activeHarvesters, currentSettings, defaultPair, defaultPairOf, droneModel, harvesterModel, readActiveProfiles } from './profiles.service.ts';
import { AppError } from '../../http/errors.ts';
import { encodeAssessmentWrite, writeAssessmentRows, deleteOrphanAssessments, readAssessmentSummaries } from '../../sql/assessments.ts';
import { withMeasuredLoad, type MeasuredLine } from '../evidence/load-series.service.ts';
import { marks, sql } from '../../sql/query.ts';
import { lockForTransaction } from '../../sql/dialect.ts';

const BATCH = 500;
const DAY_MS = 86_400_000;

/** What an assessment reads of a structure. */
export type StructurePosition = Pick<Structure, 'id' | 'lat' | 'lon'>;

/** Ids per IN list of a batch read (under every database's bound-parameter limit). */
const READ_CHUNK = 900;

export interface SpanRecords {
  span: Span;
  line: Line;
  from: StructurePosition | null;
  to: StructurePosition | null;
  hazards: Hazard[];
  zones: { inExclude: boolean; inCautionCount: number; zoneIds: string[] };
}

/** Load at min/typical/peak: the line's estimate, or the span's own typical value scaled by the line's ratios. */
export function effectiveLoad(span: Pick<Span, 'loadCurrentA'>, line: Pick<Line, 'loadMinA' | 'loadTypicalA' | 'loadPeakA'>) {
  if (span.loadCurrentA === null || span.loadCurrentA === undefined) {
    return { min: line.loadMinA, typical: line.loadTypicalA, peak: line.loadPeakA, source: 'line' as const };
  }
  const typical = span.loadCurrentA;
  const scale = line.loadTypicalA > 0 ? typical / line.loadTypicalA : 1;
  const min = line.loadTypicalA > 0 ? line.loadMinA * scale : typical;
  const peak = line.loadTypicalA > 0 ? line.loadPeakA * scale : typical;
  return { min: Math.min(min, typical), typical, peak: Math.max(peak, typical), source: 'span' as const };
}

/**
 * The conductor's thermal data: the span's own resistances when surveyed, else the catalogue row of its code word,
 * else the catalogue row nearest its diameter (an estimate, flagged in the data completeness).
 */
function conductorFor(span: Span) {
  const own =
    span.conductorDiameterMm !== null &&
    span.conductorResistanceLowOhmPerM !== null &&
    span.conductorTempLowC !== null &&
    span.conductorResistanceHighOhmPerM !== null &&
    span.conductorTempHighC !== null &&
    span.conductorTempHighC > span.conductorTempLowC;
  if (own) {
    return {
      source: 'span' as const,
      thermal: {
        diameterMm: span.conductorDiameterMm!,
        resistanceLowOhmPerM: span.conductorResistanceLowOhmPerM!,
        tempLowC: span.conductorTempLowC!,
        resistanceHighOhmPerM: span.conductorResistanceHighOhmPerM!,
        tempHighC: span.conductorTempHighC!,
        emissivity: DEFAULT_EMISSIVITY,
        absorptivity: DEFAULT_ABSORPTIVITY,
      },
    };
  }
  const byCode = span.conductorCodeWord ? findConductor(span.conductorCodeWord) : undefined;
  if (byCode) {
    const thermal = thermalConductorOf(byCode);
    return { source: 'catalogue' as const, thermal: { ...thermal, diameterMm: span.conductorDiameterMm ?? thermal.diameterMm } };
  }
  const d = span.conductorDiameterMm;
  const nearest = [...ACSR_CONDUCTORS].sort((a, b) => Math.abs(a.diameterMm - (d ?? 21.79)) - Math.abs(b.diameterMm - (d ?? 21.79)))[0];
  return { source: d === null ? ('unknown' as const) : ('estimate' as const), thermal: { ...thermalConductorOf(nearest), diameterMm: d ?? nearest.diameterMm } };
}

/** The pure method's input from the inventory records (design weather: the IEEE 738 sample's hot still noon). */
export function spanInputOf(rec: SpanRecords, now: Date = new Date()): { input: SpanAssessmentInput; conductorSource: string; loadSource: string } {
  const { span, line } = rec;
  const conductor = conductorFor(span);
  const load = effectiveLoad(span, line);
  const surveyAgeDays = span.surveyDate ? Math.max(0, Math.floor((now.getTime() - Date.parse(`${span.surveyDate}T00:00:00Z`)) / DAY_MS)) : null;
  return {
    conductorSource: conductor.source,
    loadSource: load.source === 'line' && (line as MeasuredLine).measuredMonth ? `series ${(line as MeasuredLine).measuredMonth}` : load.source,
    input: {
      conductor: conductor.thermal,
      clearanceM: span.clearanceM,
      loadCurrentA: { min: load.min, typical: load.typical, peak: load.peak },
      voltageKv: line.voltageKv,
      frequencyHz: line.frequencyHz,
      lengthM: span.lengthM,
      hazards: rec.hazards.map((h) => ({ severity: h.severity })),
      completeness: {
        conductorDiameter: span.conductorDiameterMm !== null,
        conductorResistance: conductor.source === 'span' || conductor.source === 'catalogue',
        material: span.conductorMaterial !== null,
        phasePosition: span.phasePosition !== null && span.phasePosition !== '',
        clearance: span.clearanceM !== null,
        lowestClearance: span.lowestClearanceM !== null,
        terrain: span.terrain !== null,
        loadProfile: Array.isArray(line.loadProfileA) && line.loadProfileA.length === 24,
        surveyDate: span.surveyDate !== null,
      },
      surveyAgeDays,
      zones: { inExclude: rec.zones.inExclude, inCautionCount: rec.zones.inCautionCount },
    },
  };
}

/** Runs the pure method and applies what only the records know (a diameter never surveyed cannot fit a gripper). */
export function assessRecords(rec: SpanRecords, harvester: HarvesterProfile, drone: DroneProfile, settings: ScoringSettings, now = new Date()) {
  const built = spanInputOf(rec, now);
  const result: SpanAssessment = assessSpanPure(built.input, harvesterModel(harvester), droneModel(drone), DEFAULT_DESIGN_WEATHER, settings);
  return { ...built, result: withRecordRules(rec, harvester, result) };
}

/** What only the records know, applied to the method's result: a diameter never surveyed cannot fit a gripper. */
function withRecordRules(rec: SpanRecords, harvester: HarvesterProfile, result: SpanAssessment): SpanAssessment {
  if (rec.span.conductorDiameterMm === null) {
    const gate = result.gates.find((g) => g.id === 'gripper-fit');
    if (gate) {
      gate.passed = false;
      gate.parts = ['conductor diameter not surveyed; gripper ', ...gripperRange(harvester)];
      gate.detail = detailText(gate.parts);
    }
    result.perchable = result.gates.every((g) => g.passed || !g.blocking);
  }
  return result;
}

/** Zones are read once per batch run; a span is in a zone when the polygon touches its line (zones module rule). */
function zoneIndex(zones: Zone[], at: Date) {
  const active = zones
    .filter((z) => isZoneActive(z, at))
    .map((z) => ({ zone: z, box: turfBbox(z.geometry) as [number, number, number, number] }));
  return (line: LineString | null) => {
    if (!line || active.length === 0) return { inExclude: false, inCautionCount: 0, zoneIds: [] as string[] };
    const [x0, y0, x1, y1] = turfBbox(line) as [number, number, number, number];
    const hits = active.filter(({ zone, box }) => box[0] <= x1 && box[2] >= x0 && box[1] <= y1 && box[3] >= y0 && booleanIntersects(zone.geometry, line));
    return {
      inExclude: hits.some((h) => h.zone.severity === 'exclude'),
      inCautionCount: hits.filter((h) => h.zone.severity === 'caution').length,
      zoneIds: hits.map((h) => h.zone.id),
    };
  };
}

function lineStringOf(from: StructurePosition | null, to: StructurePosition | null): LineString | null {
  if (!from || !to) return null;
  return { type: 'LineString', coordinates: [[from.lon, from.lat], [to.lon, to.lat]] };
}

/** Loads everything a batch of spans needs in a handful of queries. */
async function recordsFor(em: EntityManager, spans: Span[], lineCache: Map<string, Line>, zonesOf: ReturnType<typeof zoneIndex>): Promise<SpanRecords[]> {
  const missingLines = [...new Set(spans.map((s) => s.lineId))].filter((id) => !lineCache.has(id));
  // A line with a metered series for this month is assessed on it instead of its estimate (load evidence).
  if (missingLines.length) for (const l of await withMeasuredLoad(em, await em.find(Line, { id: { $in: missingLines } }))) lineCache.set(l.id, l);
  const structureIds = [...new Set(spans.flatMap((s) => [s.fromStructureId, s.toStructureId]))];
  // Only the positions are read (the zone test's line); raw rows, so the identity map takes no structures.
  const structures = new Map<string, StructurePosition>();
  for (let i = 0; i < structureIds.length; i += READ_CHUNK) {
    const ids = structureIds.slice(i, i + READ_CHUNK);
    for (const r of await sql.all<StructurePosition>(em, `select id, lat, lon from structures where id in (${marks(ids.length)})`, ids)) {
      structures.set(r.id, { id: r.id, lat: Number(r.lat), lon: Number(r.lon) });
    }
  }
  const hazards = await em.find(Hazard, { spanId: { $in: spans.map((s) => s.id) } });
  const hazardsBySpan = new Map<string, Hazard[]>();
  for (const h of hazards) hazardsBySpan.set(h.spanId, [...(hazardsBySpan.get(h.spanId) ?? []), h]);
  const out: SpanRecords[] = [];
  for (const span of spans) {
    const line = lineCache.get(span.lineId);
    if (!line) continue; // a span always has its line (foreign key); skip rather than fail the whole batch
    const from = structures.get(span.fromStructureId) ?? null;
    const to = structures.get(span.toStructureId) ?? null;
    out.push({ span, line, from, to, hazards: hazardsBySpan.get(span.id) ?? [], zones: zonesOf(lineStringOf(from, to)) });
  }
  return out;
}

/** Models of the active pairs, built once per run (the memo keys harvesters by object identity). */
interface PairModels {
  harvester: HarvesterProfile;
  drone: DroneProfile;
  harvesterModel: HarvesterModel;
  droneModel: ReturnType<typeof droneModel>;
}

function pairModelsOf(harvesters: HarvesterProfile[], drones: DroneProfile[]): PairModels[] {
  const out: PairModels[] = [];
  for (const h of harvesters) {
    const hm = harvesterModel(h);
    for (const d of drones) out.push({ harvester: h, drone: d, harvesterModel: hm, droneModel: droneModel(d) });
  }
  return out;
}

/** The stored rows of a batch of spans: one per span and active pair, harvester-major (the per-span path's order). */
function assessmentRows(
  records: SpanRecords[],
  harvesters: HarvesterProfile[],
  drones: DroneProfile[],
  settings: ScoringSettings,
  settingsVersion: number,
  now: Date,
  fast?: { pairs: PairModels[]; memo: AssessmentMemo },
): Partial<Assessment>[] {
  const rows: Partial<Assessment>[] = [];
  const pairs = fast?.pairs ?? pairModelsOf(harvesters, drones);
  for (const rec of records) {
    // The inputs are the same for every pair of a span; the per-span path builds them once per pair.
    const built = fast ? spanInputOf(rec, now) : undefined;
    // One inputs object for all the span's rows on the fast path (written as one JSON text).
    const shared = built ? inputsOf(rec, built) : undefined;
    for (const p of pairs) {
      const { input, result, conductorSource, loadSource } = fast
        ? assessBuilt(rec, built!, p, settings, fast.memo)
        : assessRecords(rec, p.harvester, p.drone, settings, now);
      const chargeTimeMin = Number.isFinite(result.chargeTimeMin) ? result.chargeTimeMin : null;
      rows.push({
        spanId: rec.span.id,
        harvesterProfileId: p.harvester.id,
        droneProfileId: p.drone.id,
        perchable: result.perchable,
        score: result.score,
        harvestW: result.harvestW,
        chargeTimeMin,
        conductorTempC: result.conductorTempC,
        ampacityA: result.ampacityA,
        result: { ...result, chargeTimeMin },
        inputs: shared ?? inputsOf(rec, { input, conductorSource, loadSource }),
        methodVersion: METHOD_VERSION,
        settingsVersion,
        harvesterVersion: p.harvester.version,
        droneVersion: p.drone.version,
        computedAt: now,
      });
    }
  }
  return rows;
}

/** The stored inputs of a span's assessment (the same for every pair). */
function inputsOf(rec: SpanRecords, built: Pick<ReturnType<typeof spanInputOf>, 'input' | 'conductorSource' | 'loadSource'>) {
  return { span: built.input, designWeather: DEFAULT_DESIGN_WEATHER, conductorSource: built.conductorSource, loadSource: built.loadSource, zoneIds: rec.zones.zoneIds, spanVersion: rec.span.version, lineVersion: rec.line.version };
}

/** assessRecords with the inputs built once and the memo (the fast path); same result. */
function assessBuilt(rec: SpanRecords, built: ReturnType<typeof spanInputOf>, p: PairModels, settings: ScoringSettings, memo: AssessmentMemo) {
  const result: SpanAssessment = assessSpanPure(built.input, p.harvesterModel, p.droneModel, DEFAULT_DESIGN_WEATHER, settings, memo);
  return { ...built, result: withRecordRules(rec, p.harvester, result) };
}

/** Called after each batch of spans has new stored assessments (missions re-judge the plans that perch on them). */
export type AssessedListener = (em: EntityManager, spanIds: string[]) => void | Promise<void>;
const assessedListeners = new Set<AssessedListener>();

export function registerAssessedListener(fn: AssessedListener): () => void {
  assessedListeners.add(fn);
  return () => assessedListeners.delete(fn);
}

async function notifyAssessed(em: EntityManager, spanIds: string[]) {
  for (const fn of assessedListeners) {
    try {
      await fn(em, spanIds);
    } catch (err) {
      // A listener's failure never undoes the stored assessments; it is logged for the operator.
      console.error('assessment listener failed', err);
    }
  }
}

export interface AssessOptions {
  /** Progress of a background job: called with the number of spans done in each batch. */
  onBatch?: (doneInBatch: number) => void;
  /** Set for long runs on a private EntityManager: frees the identity map between batches. */
  clearBetweenBatches?: boolean;
  shouldStop?: () => boolean;
  now?: Date;
}

/** Counts the spans a run will cover (for a job's total). */
export async function countSpans(em: EntityManager, filter: { lineId?: string } = {}): Promise<number> {
  return em.count(Span, filter.lineId ? { lineId: filter.lineId } : {});
}

/** What every rescoring run reads once before its batches: the active pairs, the current settings and the zones in force at `now`. */
async function runInputs(em: EntityManager, now: Date) {
  const [harvesters, drones, { version: settingsVersion, settings }, zones] = await Promise.all([
    activeHarvesters(em),
    activeDrones(em),
    currentSettings(em),
    em.find(Zone, {}),
  ]);
  return { harvesters, drones, settingsVersion, settings, zonesOf: zoneIndex(zones, now) };
}

/**
 * Recomputes the stored assessments of the given spans (all spans when omitted, or a line's spans) for every
 * active harvester × drone pair. Replaces each span's rows; returns the number of spans assessed.
 */
export async function assessSpans(em: EntityManager, spanIds?: readonly string[], opts: AssessOptions & { lineId?: string } = {}): Promise<number> {
  const now = opts.now ?? new Date();
  const { harvesters, drones, settingsVersion, settings, zonesOf } = await runInputs(em, now);
  const lineCache = new Map<string, Line>();
  let assessed = 0;

  const runBatch = async (spans: Span[]) => {
    const records = await recordsFor(em, spans, lineCache, zonesOf);
    const rows = assessmentRows(records, harvesters, drones, settings, settingsVersion, now);
    const ids = spans.map((s) => s.id);
    await em.transactional(async (tx) => {
      // Two writers of the same span's rows (a request and a background rescore, or two processes) take turns.
      await lockForTransaction(tx, 'assessments');
      await tx.nativeDelete(Assessment, { spanId: { $in: ids } });
      if (rows.length) await tx.insertMany(Assessment, rows);
    });
    assessed += records.length;
    await notifyAssessed(em, ids);
    opts.onBatch?.(spans.length);
  };

  if (spanIds) {
    for (let i = 0; i < spanIds.length; i += BATCH) {
      if (opts.shouldStop?.()) break;
      const spans = await em.find(Span, { id: { $in: spanIds.slice(i, i + BATCH) } });
      // Spans that no longer exist lose their rows.
      const gone = spanIds.slice(i, i + BATCH).filter((id) => !spans.some((s) => s.id === id));
      if (gone.length) await em.nativeDelete(Assessment, { spanId: { $in: gone } });
      if (spans.length) await runBatch(spans);
      else opts.onBatch?.(0);
    }
    return assessed;
  }

  let after = '';
  for (;;) {
    if (opts.shouldStop?.()) break;
    const where = opts.lineId ? { lineId: opts.lineId, id: { $gt: after } } : { id: { $gt: after } };
    const spans = await em.find(Span, where, { orderBy: { id: 'asc' }, limit: BATCH });
    if (spans.length === 0) break;
    after = spans[spans.length - 1].id;
    await runBatch(spans);
    if (opts.clearBetweenBatches) {
      em.clear();
      // Lines stay cached by value; they were detached by clear() but are only read.
    }
    // Let requests in between batches.
    await new Promise((r) => setImmediate(r));
  }
  // Rows of spans that were deleted meanwhile.
  if (!opts.lineId && !opts.shouldStop?.()) {
    await sql.run(em, 'delete from assessments where span_id not in (select id from spans)');
  }
  return assessed;
}

/** Spans per transaction on the bulk path: large enough to amortise a commit, short enough for reads to go between. */
const BULK_BATCH = 500;

/**
 * The bulk path of assessSpans for background rescoring: the same rows, computed with the pure method's memo (each
 * distinct conductor × current × profile × settings case once) and written with prepared multi-row statements, one
 * transaction per batch of spans. Reads go between batches. Returns the number of spans assessed.
 */
export async function assessSpansBulk(em: EntityManager, spanIds?: readonly string[], opts: AssessOptions & { lineId?: string } = {}): Promise<number> {
  const now = opts.now ?? new Date();
  const { harvesters, drones, settingsVersion, settings, zonesOf } = await runInputs(em, now);
  const lineCache = new Map<string, Line>();
  const fast = { pairs: pairModelsOf(harvesters, drones), memo: createAssessmentMemo() };
  let assessed = 0;

  // Batches go through a two-stage pipeline: while one batch's transaction runs (its statements run off the main
  // thread), the next batch, read before that transaction began, has its rows computed and encoded. Reads never run
  // inside a write: each batch is read before the previous batch's transaction starts. Writes keep their order,
  // one transaction per batch; progress, listeners and stopping happen after each commit as before.
  let after = '';
  let offset = 0;
  const readNext = async (): Promise<{ spans: Span[]; ids: readonly string[]; records: SpanRecords[] } | null> => {
    let spans: Span[];
    let ids: readonly string[];
    if (spanIds) {
      if (offset >= spanIds.length) return null;
      ids = spanIds.slice(offset, offset + BULK_BATCH);
      offset += BULK_BATCH;
      spans = await em.find(Span, { id: { $in: ids as string[] } });
    } else {
      const where = opts.lineId ? { lineId: opts.lineId, id: { $gt: after } } : { id: { $gt: after } };
      spans = await em.find(Span, where, { orderBy: { id: 'asc' }, limit: BULK_BATCH });
      if (spans.length === 0) return null;
      after = spans[spans.length - 1].id;
      ids = spans.map((s) => s.id);
    }
    return { spans, ids, records: await recordsFor(em, spans, lineCache, zonesOf) };
  };
  const build = async (batch: { ids: readonly string[]; records: SpanRecords[] }) => {
    const rows: Partial<Assessment>[] = [];
    for (let i = 0; i < batch.records.length; i += BUILD_SLICE) {
      // Lets the running transaction's finished statement hand the next one to the database between slices.
      if (i) await yieldToIo();
      for (const r of assessmentRows(batch.records.slice(i, i + BUILD_SLICE), harvesters, drones, settings, settingsVersion, now, fast)) rows.push(r);
    }
    await yieldToIo();
    // Spans asked for that no longer exist lose their rows in the same transaction.
    return encodeAssessmentWrite(em, batch.ids, rows);
  };

  if (opts.shouldStop?.()) return assessed;
  let batch = await readNext();
  let write = batch ? await build(batch) : null;
  while (batch && write) {
    if (opts.shouldStop?.()) break;
    const next = await readNext();
    const writing = writeAssessmentRows(em, write);
    // A failed build must not leave the write unawaited.
    const nextWrite = next ? await build(next).catch(async (err) => { await writing.catch(() => {}); throw err; }) : null;
    await writing;
    // A span a request wrote after this batch was read has been assessed by that request from its new record,
    // and this batch's rows for it came from the old one: such spans are assessed again from what is stored now.
    const stale = await changedSince(em, batch.records);
    if (stale.length) await assessSpans(em.fork(), stale, { now });
    assessed += batch.records.length;
    await notifyAssessed(em, [...batch.ids]);
    opts.onBatch?.(batch.spans.length);
    if (opts.clearBetweenBatches) em.clear();
    await new Promise((r) => setImmediate(r));
    batch = next;
    write = nextWrite;
  }
  if (!spanIds && !opts.lineId && !opts.shouldStop?.()) await deleteOrphanAssessments(em);
  return assessed;
}

/** Spans of a batch whose stored version is no longer the one the batch was computed from (deleted ones are not). */
async function changedSince(em: EntityManager, records: readonly SpanRecords[]): Promise<string[]> {
  const read = new Map(records.map((r) => [r.span.id, r.span.version]));
  const out: string[] = [];
  const all = [...read.keys()];
  for (let i = 0; i < all.length; i += 900) {
    const ids = all.slice(i, i + 900);
    for (const row of await sql.all<{ id: string; version: number }>(em, `select id, version from spans where id in (${marks(ids.length)})`, ids)) {
      if (Number(row.version) !== read.get(row.id)) out.push(row.id);
    }
  }
  return out;
}

/** Spans whose rows are computed between two turns of the event loop while a batch is written. */
const BUILD_SLICE = 50;
const yieldToIo = () => new Promise<void>((r) => setImmediate(r));

/** Deletes the stored rows of a span (when it is deleted). */
export async function forgetSpan(em: EntityManager, spanId: string) {
  await em.nativeDelete(Assessment, { spanId });
}

export function assessmentView(row: Omit<Assessment, 'id' | 'inputs'> & { inputs: unknown }): SpanAssessmentView {
  const r = row.result as SpanAssessment & { chargeTimeMin: number | null };
  return {
    perchable: row.perchable,
    score: row.score,
    gates: r.gates.map((g) => ({ id: g.id, passed: g.passed, blocking: g.blocking, detail: g.detail, ...(g.parts ? { parts: g.parts } : {}) })),
    factors: r.factors.map((f) => ({ id: f.id, value: f.value, weight: f.weight, contribution: f.contribution })),
    harvestW: row.harvestW,
    harvestMinW: r.harvestMinW,
    harvestPeakW: r.harvestPeakW,
    chargeTimeMin: row.chargeTimeMin,
    conductorTempC: row.conductorTempC,
    ampacityA: row.ampacityA,
    codeClearanceM: r.codeClearanceM,
    approachDistanceM: r.approachDistanceM,
    methodVersion: row.methodVersion,
    settingsVersion: row.settingsVersion,
    harvesterProfileId: row.harvesterProfileId,
    harvesterVersion: row.harvesterVersion,
    droneProfileId: row.droneProfileId,
    droneVersion: row.droneVersion,
    computedAt: row.computedAt.toISOString(),
    loadSource: loadSourceOf((row.inputs as { loadSource?: unknown } | null)?.loadSource),
  };
}

/**
 * The span API's `assessment` field: each span's row for the default pair (first active harvester and drone),
 * or null when it has none yet. For the inventory's span views. `given`: the default pair's ids when the caller
 * has read them already (null: there is none).
 */
export async function assessmentForSpans(
  em: EntityManager,
  spanIds: readonly string[],
  given?: { harvesterProfileId: string; droneProfileId: string } | null,
): Promise<Map<string, SpanAssessmentView | null>> {
  const out = new Map<string, SpanAssessmentView | null>(spanIds.map((id) => [id, null]));
  if (spanIds.length === 0) return out;
  const pair = given !== undefined ? given : await defaultPairIds(em);
  if (!pair) return out;
  // Read without the inputs column and without the identity map: the views need neither.
  for (const row of await readAssessmentSummaries(em, spanIds, { harvesterIds: [pair.harvesterProfileId], droneIds: [pair.droneProfileId] })) out.set(row.spanId, assessmentView(row));
  return out;
}

/** The default pair's ids, for the inventory's minHarvestW filter and sort (join on assessments). */
export async function defaultPairIds(em: EntityManager): Promise<{ harvesterProfileId: string; droneProfileId: string } | null> {
  return defaultPairOf(await readActiveProfiles(em));
}

/** Every stored pair of one span, default pair first. */
export async function assessmentsOfSpan(em: EntityManager, spanId: string) {
  const span = await em.findOne(Span, { id: spanId });
  if (!span) throw AppError.notFound('Span');
  const [rows, harvesters, drones] = await Promise.all([
    em.find(Assessment, { spanId }),
    em.find(HarvesterProfile, {}, { orderBy: { sortOrder: 'asc', createdAt: 'asc', id: 'asc' } }),
    em.find(DroneProfile, {}, { orderBy: { sortOrder: 'asc', createdAt: 'asc', id: 'asc' } }),
  ]);
  const hOrder = new Map(harvesters.map((h, i) => [h.id, i]));
  const dOrder = new Map(drones.map((d, i) => [d.id, i]));
  const names = new Map<string, string>([...harvesters, ...drones].map((p) => [p.id, p.name]));
  rows.sort((a, b) => (hOrder.get(a.harvesterProfileId) ?? 1e9) - (hOrder.get(b.harvesterProfileId) ?? 1e9) || (dOrder.get(a.droneProfileId) ?? 1e9) - (dOrder.get(b.droneProfileId) ?? 1e9));
  return rows.map((row) => ({
    ...assessmentView(row),
    harvesterName: names.get(row.harvesterProfileId) ?? row.harvesterProfileId,
    droneName: names.get(row.droneProfileId) ?? row.droneProfileId,
    inputs: row.inputs,
  }));
}

/** Power vs line current for one harvester on this span's line, and power over the day from the line's profile. */
export async function harvestCurveOfSpan(em: EntityManager, spanId: string, harvesterId?: string): Promise<HarvestCurveView> {
  const span = await em.findOne(Span, { id: spanId });
  if (!span) throw AppError.notFound('Span');
  const found = await em.findOne(Line, { id: span.lineId });
  if (!found) throw AppError.notFound('Line');
  const [line] = await withMeasuredLoad(em, [found]);
  const harvester = harvesterId
    ? await em.findOne(HarvesterProfile, { id: harvesterId })
    : (await defaultPair(em))?.harvester ?? (await em.find(HarvesterProfile, {}, { orderBy: { sortOrder: 'asc' }, limit: 1 }))[0];
  if (!harvester) throw harvesterId ? AppError.field('harvesterId', 'No such harvester profile') : AppError.notFound('Harvester profile');
  const model = harvesterModel(harvester);
  const load = effectiveLoad(span, line);
  const f = line.frequencyHz;
  const curve = harvestCurve(model, f, Math.max(100, Math.ceil((load.peak * 1.5) / 100) * 100), 60);
  const at = (a: number) => harvestPowerW(model, a, f);
  // A span's own load estimate scales the line's daily shape.
  const scale = load.source === 'span' && line.loadTypicalA > 0 ? load.typical / line.loadTypicalA : 1;
  const daily =
    Array.isArray(line.loadProfileA) && line.loadProfileA.length === 24
      ? line.loadProfileA.map((a, hour) => ({ hour, currentA: a * scale, powerW: at(a * scale) }))
      : null;
  return {
    spanId,
    harvesterProfileId: harvester.id,
    frequencyHz: f,
    saturationOnsetA: curve.saturationOnsetA,
    points: curve.points,
    loadCurrentA: { min: load.min, typical: load.typical, peak: load.peak },
    harvestW: { min: at(load.min), typical: at(load.typical), peak: at(load.peak) },
    daily,
    loadSource: (line as MeasuredLine).measuredMonth ? 'series' : 'estimate',
    loadMonth: (line as MeasuredLine).measuredMonth ?? null,
  };
}
