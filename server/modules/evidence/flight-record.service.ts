// Flight records: perch events found in an uploaded track, matched to approved spans, with the predicted harvest at
// that hour beside the measured one and the line current the measurement implies.
import type { EntityManager } from '@mikro-orm/core';
import { detectPerchEvents, type SpanSegment } from '#shared/engineering/perch-events.ts';
import { harvestPowerW } from '#shared/engineering/ct-harvester.ts';
import { impliedCurrentA, PowerAboveCeilingError } from '#shared/engineering/implied-current.ts';
import type { LoadProfileHour } from '#shared/schemas/load-evidence.ts';
import { AppError } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import type { User } from '../auth/user.entity.ts';
import { Line } from '../inventory/line.entity.ts';
import { Span } from '../inventory/span.entity.ts';
import { Structure } from '../inventory/structure.entity.ts';
import { newId } from '../inventory/inventory.service.ts';
import { HarvesterProfile } from '../assessment/profile.entity.ts';
import { Mission } from '../missions/mission.entity.ts';
import { defaultPair, harvesterModel } from '../assessment/profiles.service.ts';
import { LoadSeriesDay } from './load-series.entity.ts';
import { isoAt, unpackReadings } from './load-series.parse.ts';
import { estimateProfile, seriesProfiles } from './load-series.service.ts';
import { FlightRecord, PerchEvent } from './flight-record.entity.ts';
import { parseFlightRecord } from './flight-record.parse.ts';

/** A measured harvest below this share of the prediction flags the span for a decision. */
export const LOW_HARVEST_RATIO = 0.5;

async function approvedSpansNear(em: EntityManager, box: { minLat: number; maxLat: number; minLon: number; maxLon: number }): Promise<SpanSegment[]> {
  const pad = 0.002; // ≈ 200 m
  const structures = await em.find(Structure, { lat: { $gte: box.minLat - pad, $lte: box.maxLat + pad }, lon: { $gte: box.minLon - pad, $lte: box.maxLon + pad } });
  if (structures.length === 0) return [];
  const ids = structures.map((s) => s.id);
  const spans = await em.find(Span, { status: 'approved', $or: [{ fromStructureId: { $in: ids } }, { toStructureId: { $in: ids } }] });
  const need = [...new Set(spans.flatMap((s) => [s.fromStructureId, s.toStructureId]))].filter((id) => !ids.includes(id));
  const all = new Map([...structures, ...(need.length ? await em.find(Structure, { id: { $in: need } }) : [])].map((s) => [s.id, s]));
  return spans.flatMap((s) => {
    const a = all.get(s.fromStructureId);
    const b = all.get(s.toStructureId);
    return a && b ? [{ id: s.id, lineId: s.lineId, from: { lat: a.lat, lon: a.lon }, to: { lat: b.lat, lon: b.lon } }] : [];
  });
}

async function meteredAt(em: EntityManager, lineId: string, epochS: number, offsetMin: number): Promise<number | null> {
  const day = new Date((epochS + offsetMin * 60) * 1000).toISOString().slice(0, 10);
  const rows = await em.find(LoadSeriesDay, { lineId, day });
  let best: { d: number; a: number } | null = null;
  for (const r of rows.flatMap((d) => unpackReadings(d.readings))) {
    const d = Math.abs(r.epochS - epochS);
    if (d <= 1800 && (!best || d < best.d)) best = { d, a: r.currentA };
  }
  return best ? best.a : null;
}

export async function uploadFlightRecord(
  em: EntityManager,
  user: User,
  file: { text: string; name: string },
  opts: { spanId?: string; missionId?: string; harvesterProfileId?: string },
) {
  const track = parseFlightRecord(file.text, file.name);
  const harvester = opts.harvesterProfileId ? await em.findOne(HarvesterProfile, { id: opts.harvesterProfileId }) : (await defaultPair(em))?.harvester;
  if (!harvester) throw AppError.field('harvesterProfileId', 'no such harvester profile');
  if (opts.spanId && !(await em.findOne(Span, { id: opts.spanId }))) throw AppError.field('spanId', 'no such span');
  if (opts.missionId && !(await em.findOne(Mission, { id: opts.missionId }, { fields: ['id'] }))) throw AppError.field('missionId', 'no such mission: upload the flight record to a saved mission, or leave missionId out');
  const lats = track.points.map((p) => p.lat);
  const lons = track.points.map((p) => p.lon);
  const spans = await approvedSpansNear(em, { minLat: Math.min(...lats), maxLat: Math.max(...lats), minLon: Math.min(...lons), maxLon: Math.max(...lons) });
  const detected = detectPerchEvents(track.points, spans);
  const lineIds = [...new Set(detected.map((e) => e.lineId).filter((x): x is string => !!x))];
  const lines = new Map((lineIds.length ? await em.find(Line, { id: { $in: lineIds } }) : []).map((l) => [l.id, l]));
  const model = harvesterModel(harvester);
  const record = em.create(FlightRecord, {
    id: newId(),
    fileName: file.name.slice(0, 200),
    format: track.format,
    missionId: opts.missionId ?? null,
    spanId: opts.spanId ?? null,
    harvesterProfileId: harvester.id,
    uploadedById: user.id,
    uploadedAt: new Date(),
    startedAt: isoAt(Math.floor(track.points[0].t / 1000), track.offsetMin),
    endedAt: isoAt(Math.floor(track.points[track.points.length - 1].t / 1000), track.offsetMin),
    offsetMin: track.offsetMin,
    pointCount: track.points.length,
    track: track.points.map((p) => [p.lon, p.lat] as [number, number]),
  });
  const events: PerchEvent[] = [];
  // One read of a line's month however many perches the flight made on it.
  const profileCache = new Map<string, LoadProfileHour[] | undefined>();
  for (const e of detected) {
    const startS = Math.floor(e.startT / 1000);
    const local = new Date((startS + track.offsetMin * 60) * 1000);
    const month = local.toISOString().slice(0, 7);
    const hour = local.getUTCHours();
    const line = e.lineId ? lines.get(e.lineId) : undefined;
    let predictedW: number | null = null;
    let lineCurrentA: number | null = null;
    let source: 'series' | 'estimate' | null = null;
    let implied: number | null = null;
    let metered: number | null = null;
    if (line && e.kind === 'perch') {
      const key = `${line.id}|${month}`;
      if (!profileCache.has(key)) profileCache.set(key, (await seriesProfiles(em, [line.id], month)).get(line.id));
      const series = profileCache.get(key);
      const fromSeries = series?.[hour];
      lineCurrentA = fromSeries && fromSeries.n > 0 ? fromSeries.p50A : estimateProfile(line)[hour].p50A;
      source = fromSeries && fromSeries.n > 0 ? 'series' : 'estimate';
      predictedW = harvestPowerW(model, lineCurrentA, line.frequencyHz);
      if (e.measuredHarvestW !== null) {
        try {
          implied = impliedCurrentA(model, line.frequencyHz, e.measuredHarvestW / model.converterEfficiency);
        } catch (err) {
          if (!(err instanceof PowerAboveCeilingError)) throw err;
        }
      }
      metered = await meteredAt(em, line.id, startS, track.offsetMin);
    }
    events.push(
      em.create(PerchEvent, {
        id: newId(),
        flightRecordId: record.id,
        kind: e.kind,
        spanId: e.spanId,
        lineId: e.lineId,
        startAt: isoAt(startS, track.offsetMin),
        endAt: isoAt(Math.floor(e.endT / 1000), track.offsetMin),
        durationS: (e.endT - e.startT) / 1000,
        lat: e.centre.lat,
        lon: e.centre.lon,
        spanDistanceM: e.spanDistanceM,
        measuredW: e.measuredHarvestW,
        predictedW,
        predictedSource: source,
        lineCurrentA,
        impliedCurrentA: implied,
        meteredCurrentA: metered,
        batteryStartPct: e.batteryStartPct,
        batteryEndPct: e.batteryEndPct,
        note: e.note,
      }),
    );
  }
  audit(em, { actorId: user.id, action: 'flight-record.upload', recordType: 'flight-record', recordId: record.id, before: null, after: { fileName: record.fileName, points: record.pointCount, perches: events.filter((x) => x.kind === 'perch').length } });
  await em.flush();
  return flightRecordView(record, events, await spanLabels(em, events));
}

/** "VR138-089 → VR138-090" for each matched span, so screens name the span a perch sat on. */
async function spanLabels(em: EntityManager, events: PerchEvent[]): Promise<Map<string, string>> {
  const ids = [...new Set(events.map((e) => e.spanId).filter((x): x is string => !!x))];
  if (ids.length === 0) return new Map();
  const spans = await em.find(Span, { id: { $in: ids } }, { fields: ['id', 'fromStructureId', 'toStructureId'] });
  const structures = new Map((await em.find(Structure, { id: { $in: spans.flatMap((s) => [s.fromStructureId, s.toStructureId]) } }, { fields: ['id', 'label'] })).map((s) => [s.id, s.label]));
  return new Map(spans.map((s) => [s.id, `${structures.get(s.fromStructureId) ?? '?'} → ${structures.get(s.toStructureId) ?? '?'}`]));
}

export function eventView(e: PerchEvent) {
  const ratio = e.measuredW !== null && e.predictedW ? e.measuredW / e.predictedW : null;
  return { ...e, ratio, lowHarvest: ratio !== null && ratio < LOW_HARVEST_RATIO };
}

export function flightRecordView(r: FlightRecord, events: PerchEvent[], labels = new Map<string, string>()) {
  return { ...r, uploadedAt: r.uploadedAt.toISOString(), events: events.map((e) => ({ ...eventView(e), spanLabel: e.spanId ? (labels.get(e.spanId) ?? null) : null })) };
}

export async function getFlightRecord(em: EntityManager, id: string) {
  const r = await em.findOne(FlightRecord, { id });
  if (!r) throw AppError.notFound('Flight record');
  const events = await em.find(PerchEvent, { flightRecordId: id }, { orderBy: { startAt: 'asc' } });
  return flightRecordView(r, events, await spanLabels(em, events));
}

export async function listFlightRecords(em: EntityManager, filter: { missionId?: string } = {}) {
  const records = await em.find(FlightRecord, filter.missionId ? { missionId: filter.missionId } : {}, { orderBy: { uploadedAt: 'desc' }, fields: ['id', 'fileName', 'format', 'missionId', 'spanId', 'harvesterProfileId', 'startedAt', 'endedAt', 'pointCount', 'uploadedAt', 'uploadedById', 'offsetMin'] });
  return records.map((r) => ({ id: r.id, fileName: r.fileName, format: r.format, missionId: r.missionId, spanId: r.spanId, startedAt: r.startedAt, endedAt: r.endedAt, pointCount: r.pointCount, uploadedAt: r.uploadedAt.toISOString() }));
}

/** Every perch with both figures, for the measured-vs-predicted chart and the residuals per line. */
export async function perchEvidence(em: EntityManager, filter: { spanId?: string; harvesterProfileId?: string } = {}) {
  const recordIds = filter.harvesterProfileId ? (await em.find(FlightRecord, { harvesterProfileId: filter.harvesterProfileId }, { fields: ['id'] })).map((r) => r.id) : null;
  const events = await em.find(
    PerchEvent,
    { kind: 'perch', ...(filter.spanId ? { spanId: filter.spanId } : {}), ...(recordIds ? { flightRecordId: { $in: recordIds } } : {}) },
    { orderBy: { startAt: 'asc' } },
  );
  const lineIds = [...new Set(events.map((e) => e.lineId).filter((x): x is string => !!x))];
  const names = new Map((lineIds.length ? await em.find(Line, { id: { $in: lineIds } }) : []).map((l) => [l.id, l.name]));
  const items = events.map((e) => ({ ...eventView(e), lineName: e.lineId ? (names.get(e.lineId) ?? null) : null }));
  const lowSpans = [...new Set(items.filter((i) => i.lowHarvest).map((i) => i.spanId!))];
  return { items, lowHarvestSpanIds: lowSpans };
}

/**
 * What the fleet measured on one span, for the places where people decide (review desk, span page): how many perches,
 * how many harvested below half the prediction, the median measured ÷ predicted, and the latest perch with figures.
 */
export async function spanEvidence(em: EntityManager, spanId: string) {
  const span = await em.findOne(Span, { id: spanId }, { fields: ['id', 'lineId'] });
  if (!span) throw AppError.notFound('Span');
  const events = (await em.find(PerchEvent, { kind: 'perch', spanId }, { orderBy: { startAt: 'asc' } })).map(eventView);
  const measured = events.filter((e) => e.ratio !== null);
  const ratios = measured.map((e) => e.ratio!).sort((a, b) => a - b);
  const mid = ratios.length ? (ratios.length % 2 ? ratios[(ratios.length - 1) / 2] : (ratios[ratios.length / 2 - 1] + ratios[ratios.length / 2]) / 2) : null;
  const latest = measured.at(-1) ?? null;
  const low = measured.filter((e) => e.lowHarvest);
  return {
    spanId,
    lineId: span.lineId,
    threshold: LOW_HARVEST_RATIO,
    perchCount: events.length,
    measuredCount: measured.length,
    lowHarvestCount: low.length,
    lowHarvest: low.length > 0,
    medianRatio: mid,
    latest: latest && {
      flightRecordId: latest.flightRecordId,
      startAt: latest.startAt,
      measuredW: latest.measuredW,
      predictedW: latest.predictedW,
      predictedSource: latest.predictedSource,
      ratio: latest.ratio,
      lowHarvest: latest.lowHarvest,
    },
  };
}
