// Mission planning from the records: the approved, perchable spans of the pair near the route, their harvest hour
// by hour from the line's load profile (the metered month when there is one), the active zones on the departure
// date, the route search, and — when there is no route — why, in words a planner can act on.
import type { EntityManager } from '@mikro-orm/core';
import type { LineString, Polygon } from 'geojson';
import { bbox as turfBbox, booleanIntersects } from '@turf/turf';
import KDBush from 'kdbush';
import { around } from 'geokdbush';
import { geodesicInverse } from '#shared/engineering/geodesic.ts';
import { harvestPowerW } from '#shared/engineering/ct-harvester.ts';
import { approachDistanceM } from '#shared/engineering/clearance.ts';
import { calmReachM, conductorHeightAtM, localHour, usableWh, type MissionDrone } from '#shared/engineering/mission-energy.ts';
import { windTriangle } from '#shared/engineering/wind-triangle.ts';
import { CALM, type Wind } from '#shared/engineering/mission-leg.ts';
import { parseDeparture, type PlanRequest } from '#shared/schemas/missions.ts';
import { AppError } from '../../http/errors.ts';
import { sql } from '../../sql/query.ts';
import { Line } from '../inventory/line.entity.ts';
import { Zone } from '../zones/zone.entity.ts';
import { isZoneActive } from '../zones/zone.service.ts';
import { DroneProfile, HarvesterProfile } from '../assessment/profile.entity.ts';
import { harvesterModel } from '../assessment/profiles.service.ts';
import { gateWord } from '../assessment/perchable.ts';
import { readStoredResult } from '../assessment/result-codec.ts';
import { withMeasuredLoad, type MeasuredLine } from '../evidence/load-series.service.ts';
import { isoAt } from '../evidence/load-series.parse.ts';
import { buildIndex, searchRoute, type Point, type SearchInput, type SearchResult } from './route-search.ts';

/** Mid-span sag assumed when the survey gives nothing to derive it from: 3 % of the span length (common practice, from memory). */
const ASSUMED_SAG_RATIO = 0.03;
const M_PER_DEG_LAT = 111_320;
/** Spans that would bridge a gap, listed at most. */
const MAX_BRIDGING = 10;
/** Above this many perches near the route the search runs on the best-harvesting span per grid cell (README "Missions"). */
export const MAX_SEARCH_PERCHES = 1500;

export interface PlanContext {
  drone: DroneProfile;
  harvester: HarvesterProfile;
  missionDrone: MissionDrone;
  departAtMs: number;
  offsetMin: number;
  localDate: string;
  /** Perch points the planner moved off mid-span, by span: metres along from the from-structure. */
  perchAlongM: Map<string, number>;
}

/** A moved perch point keeps at least this far from either structure, clear of the attachment hardware (common practice). */
export const PERCH_POINT_END_CLEARANCE_M = 5;

export interface PerchCandidate extends Point {
  spanId: string;
  lineId: string;
  lineName: string;
  voltageKv: number;
  fromLabel: string;
  toLabel: string;
  lineBearingDeg: number;
  /** The perch point, metres along from the from-structure, and who chose it. */
  alongM: number;
  perchPoint: 'mid-span' | 'planner';
  conductorHeightM: number;
  sagSource: 'lowest-clearance' | 'clearance' | 'assumed';
  hourlyHarvestW: number[];
  harvestSource: 'series' | 'estimate';
  loadMonth: string | null;
  spanVersion: number;
}

interface SpanRow {
  id: string;
  line_id: string;
  status: string;
  version: number;
  length_m: number;
  clearance_m: number | null;
  lowest_clearance_m: number | null;
  lowest_clearance_along_m: number | null;
  load_current_a: number | null;
  alat: number;
  alon: number;
  ah: number;
  alabel: string;
  blat: number;
  blon: number;
  bh: number;
  blabel: string;
}

export function missionDroneOf(d: DroneProfile): MissionDrone {
  return {
    batteryWh: d.batteryWh,
    reservePercent: d.reservePercent,
    cruiseSpeedMps: d.cruiseSpeedMps,
    windLimitMps: d.windLimitMps,
    cruisePowerW: d.cruisePowerW,
    perchManoeuvreWh: d.perchManoeuvreWh,
    chargeEfficiency: d.chargeEfficiency,
    chargeToPercent: d.chargeToPercent,
  };
}

/** The profiles and the departure of a (schema-valid) request; unknown or retired profiles → 400 naming the field. */
export async function planContext(em: EntityManager, req: PlanRequest): Promise<PlanContext> {
  const [drone, harvester] = await Promise.all([em.findOne(DroneProfile, { id: req.droneProfileId }), em.findOne(HarvesterProfile, { id: req.harvesterProfileId })]);
  const issues = [];
  if (!drone) issues.push({ path: 'droneProfileId', message: 'no drone profile has this id' });
  else if (!drone.active) issues.push({ path: 'droneProfileId', message: `the drone profile "${drone.name}" is retired` });
  if (!harvester) issues.push({ path: 'harvesterProfileId', message: 'no harvester profile has this id' });
  else if (!harvester.active) issues.push({ path: 'harvesterProfileId', message: `the harvester profile "${harvester.name}" is retired` });
  if (issues.length) throw AppError.badRequest(`Invalid input: ${issues.map((i) => i.path).join(', ')}`, issues);
  const dep = parseDeparture(req.departAt);
  if (!dep.ok) throw AppError.field('departAt', dep.message);
  const perchAlongM = new Map<string, number>();
  const pointIssues: { path: string; message: string }[] = [];
  for (const [i, pp] of (req.perchPoints ?? []).entries()) {
    if (perchAlongM.has(pp.spanId)) {
      pointIssues.push({ path: `perchPoints.${i}.spanId`, message: 'this span already has a perch point in the list' });
      continue;
    }
    const span = (await sql.get(em, 'select s.length_m as length_m, a.label as alabel from spans s join structures a on a.id = s.from_structure_id where s.id = ?', [pp.spanId])) as
      | { length_m: number; alabel: string }
      | undefined;
    if (!span) {
      pointIssues.push({ path: `perchPoints.${i}.spanId`, message: 'no span has this id' });
      continue;
    }
    const lo = PERCH_POINT_END_CLEARANCE_M, hi = span.length_m - PERCH_POINT_END_CLEARANCE_M;
    if (!(pp.alongM >= lo && pp.alongM <= hi)) {
      pointIssues.push({ path: `perchPoints.${i}.alongM`, message: `the perch point must lie ${lo} m to ${Math.max(lo, hi).toFixed(1)} m from ${span.alabel}, clear of both structures` });
      continue;
    }
    perchAlongM.set(pp.spanId, pp.alongM);
  }
  if (pointIssues.length) throw AppError.badRequest(`Invalid input: ${pointIssues.map((i) => i.path).join(', ')}`, pointIssues);
  return { drone: drone!, harvester: harvester!, missionDrone: missionDroneOf(drone!), departAtMs: dep.value.atMs, offsetMin: dep.value.offsetMin, localDate: dep.value.localDate, perchAlongM };
}

const distM = (a: Point, b: Point) => geodesicInverse({ latDeg: a.lat, lonDeg: a.lon }, { latDeg: b.lat, lonDeg: b.lon }).lengthM;

/** A lat/lon box around the points grown by `m` metres. */
function boxAround(points: Point[], m: number) {
  const lats = points.map((p) => p.lat);
  const lons = points.map((p) => p.lon);
  const dLat = m / M_PER_DEG_LAT;
  const maxAbsLat = Math.min(89, Math.max(...lats.map(Math.abs)) + dLat);
  const dLon = m / (M_PER_DEG_LAT * Math.cos((maxAbsLat * Math.PI) / 180));
  return { lat0: Math.min(...lats) - dLat, lat1: Math.max(...lats) + dLat, lon0: Math.min(...lons) - dLon, lon1: Math.max(...lons) + dLon };
}

const SPAN_COLUMNS =
  's.id as id, s.line_id as line_id, s.status as status, s.version as version, s.length_m as length_m, s.clearance_m as clearance_m, ' +
  's.lowest_clearance_m as lowest_clearance_m, s.lowest_clearance_along_m as lowest_clearance_along_m, s.load_current_a as load_current_a, ' +
  'a.lat as alat, a.lon as alon, a.attachment_height_m as ah, a.label as alabel, b.lat as blat, b.lon as blon, b.attachment_height_m as bh, b.label as blabel';
const SPAN_FROM = 'from spans s join structures a on a.id = s.from_structure_id join structures b on b.id = s.to_structure_id';
const IN_BOX = '(a.lat + b.lat) / 2 between ? and ? and (a.lon + b.lon) / 2 between ? and ?';

/** Mid-span sag: from the lowest clearance and where it was measured (flat ground), else the clearance at mid-span, else assumed. */
function sagOf(r: SpanRow): { sagM: number; source: PerchCandidate['sagSource'] } {
  const S = r.length_m;
  const chordAt = (x: number) => r.ah + ((r.bh - r.ah) * x) / S;
  const x = r.lowest_clearance_along_m;
  if (r.lowest_clearance_m !== null && x !== null && x > 0 && x < S) {
    const d = ((chordAt(x) - r.lowest_clearance_m) * S * S) / (4 * x * (S - x));
    if (d >= 0) return { sagM: d, source: 'lowest-clearance' };
  }
  if (r.clearance_m !== null) {
    const d = chordAt(S / 2) - r.clearance_m;
    if (d >= 0) return { sagM: d, source: 'clearance' };
  }
  return { sagM: ASSUMED_SAG_RATIO * S, source: 'assumed' };
}

/** Harvest after the converter for each local hour: the line's 24-hour profile (scaled by the span's own load estimate). */
function hourlyHarvest(harvester: HarvesterProfile, line: MeasuredLine, spanLoadA: number | null): number[] {
  const model = harvesterModel(harvester);
  const scale = spanLoadA !== null && line.loadTypicalA > 0 ? spanLoadA / line.loadTypicalA : 1;
  const profile = Array.isArray(line.loadProfileA) && line.loadProfileA.length === 24 ? line.loadProfileA : Array.from({ length: 24 }, () => (spanLoadA ?? line.loadTypicalA) / scale);
  return profile.map((a) => harvestPowerW(model, a * scale, line.frequencyHz));
}

/** A capsule around the straight line from `a` to `b`: every point within `widthM` of it. */
export interface Corridor {
  a: Point;
  b: Point;
  widthM: number;
}

/** Distance from p to the segment a–b, m (local equirectangular plane: legs are at most a few hundred km). */
function toSegmentM(p: Point, c: Corridor): number {
  const lat0 = ((c.a.lat + c.b.lat) / 2) * (Math.PI / 180);
  const kx = M_PER_DEG_LAT * Math.cos(lat0);
  const bx = (c.b.lon - c.a.lon) * kx;
  const by = (c.b.lat - c.a.lat) * M_PER_DEG_LAT;
  const px = (p.lon - c.a.lon) * kx;
  const py = (p.lat - c.a.lat) * M_PER_DEG_LAT;
  const len2 = bx * bx + by * by;
  const t = len2 > 0 ? Math.max(0, Math.min(1, (px * bx + py * by) / len2)) : 0;
  return Math.hypot(px - t * bx, py - t * by);
}

function corridorAreaM2(c: Corridor): number {
  const lengthM = toSegmentM(c.b, { a: c.a, b: c.a, widthM: 0 });
  return 2 * c.widthM * lengthM + Math.PI * c.widthM * c.widthM;
}

/**
 * The approved spans perchable for the pair whose mid-point lies in the corridor, as perches (thinned above `max`).
 * A narrow query finds them; the full records are read only for the ones kept.
 */
export async function perchCandidates(em: EntityManager, ctx: PlanContext, corridor: Corridor, max = MAX_SEARCH_PERCHES): Promise<{ perches: PerchCandidate[]; nearRoute: number }> {
  const box = boxAround([corridor.a, corridor.b], corridor.widthM);
  const found = (await sql.all(
      em,
      `select s.id as id, (a.lat + b.lat) / 2 as lat, (a.lon + b.lon) / 2 as lon, pa.harvest_w as harvest_w ${SPAN_FROM} ` +
        'join assessments pa on pa.span_id = s.id and pa.harvester_profile_id = ? and pa.drone_profile_id = ? and pa.perchable = true ' +
        `where s.status = ? and ${IN_BOX}`,
      [ctx.harvester.id, ctx.drone.id, 'approved', box.lat0, box.lat1, box.lon0, box.lon1],
    )) as { id: string; lat: number; lon: number; harvest_w: number }[];
  const near = found.filter((r) => toSegmentM(r, corridor) <= corridor.widthM);
  const kept = thinPerches(near, corridorAreaM2(corridor), max);
  if (kept.length === 0) return { perches: [], nearRoute: near.length };
  const rows: SpanRow[] = [];
  const ids = kept.map((k) => k.id).sort();
  for (let i = 0; i < ids.length; i += 400) {
    const chunk = ids.slice(i, i + 400);
    rows.push(...((await sql.all(em, `select ${SPAN_COLUMNS} ${SPAN_FROM} where s.id in (${chunk.map(() => '?').join(',')}) order by s.id`, chunk)) as SpanRow[]));
  }
  const lineIds = [...new Set(rows.map((r) => r.line_id))];
  const lines: MeasuredLine[] = [];
  // The departure's month as written in its own offset: series days are local days, so months are local too.
  for (let i = 0; i < lineIds.length; i += 400) lines.push(...(await withMeasuredLoad(em, await em.find(Line, { id: { $in: lineIds.slice(i, i + 400) } }), ctx.localDate.slice(0, 7))));
  const byId = new Map(lines.map((l) => [l.id, l]));
  const lineHarvest = new Map<string, number[]>();
  const out: PerchCandidate[] = [];
  for (const r of rows) {
    const line = byId.get(r.line_id);
    if (!line) continue;
    let hw = r.load_current_a === null ? lineHarvest.get(line.id) : undefined;
    if (!hw) {
      hw = hourlyHarvest(ctx.harvester, line, r.load_current_a);
      if (r.load_current_a === null) lineHarvest.set(line.id, hw);
    }
    const g = geodesicInverse({ latDeg: r.alat, lonDeg: r.alon }, { latDeg: r.blat, lonDeg: r.blon });
    const sag = sagOf(r);
    // Mid-span unless the planner moved the point; along a span of a few hundred metres the straight
    // interpolation of latitude and longitude departs from the geodesic by far less than a centimetre.
    const alongM = ctx.perchAlongM.get(r.id) ?? r.length_m / 2;
    const f = ctx.perchAlongM.has(r.id) && g.lengthM > 0 ? Math.min(1, alongM / g.lengthM) : 0.5;
    out.push({
      spanId: r.id,
      lineId: r.line_id,
      lineName: line.name,
      voltageKv: line.voltageKv,
      fromLabel: r.alabel,
      toLabel: r.blabel,
      lat: r.alat + f * (r.blat - r.alat),
      lon: r.alon + f * (r.blon - r.alon),
      alongM,
      perchPoint: ctx.perchAlongM.has(r.id) ? 'planner' : 'mid-span',
      lineBearingDeg: ((g.azimuthDeg % 360) + 360) % 360,
      conductorHeightM: conductorHeightAtM({ fromHeightM: r.ah, toHeightM: r.bh, spanLengthM: r.length_m, xM: alongM, midSpanSagM: sag.sagM }),
      sagSource: sag.source,
      hourlyHarvestW: hw,
      harvestSource: line.measuredMonth ? 'series' : 'estimate',
      loadMonth: line.measuredMonth ?? null,
      spanVersion: r.version,
    });
  }
  return { perches: out, nearRoute: near.length };
}

/**
 * With many perches near the route, keeps the span with the highest assessed harvest (at its typical load) in each
 * cell of a grid sized so that the area holds about `max` cells: a route's perch is then at most one cell diagonal
 * from the one it would have used, on a span harvesting at least as much at its typical load.
 */
export function thinPerches<T extends { id: string; lat: number; lon: number; harvest_w: number }>(rows: T[], areaM2: number, max: number): T[] {
  if (rows.length <= max) return rows;
  const cellM = Math.max(200, Math.sqrt(areaM2 / max));
  const lat0 = Math.min(...rows.map((r) => r.lat));
  const lon0 = Math.min(...rows.map((r) => r.lon));
  const mPerDegLon = M_PER_DEG_LAT * Math.cos(((lat0 + Math.max(...rows.map((r) => r.lat))) / 2) * (Math.PI / 180));
  const best = new Map<string, T>();
  for (const r of rows) {
    const key = `${Math.floor(((r.lat - lat0) * M_PER_DEG_LAT) / cellM)}:${Math.floor(((r.lon - lon0) * mPerDegLon) / cellM)}`;
    const kept = best.get(key);
    if (!kept || r.harvest_w > kept.harvest_w || (r.harvest_w === kept.harvest_w && r.id < kept.id)) best.set(key, r);
  }
  return [...best.values()].sort((a, b) => (a.id < b.id ? -1 : 1));
}

interface ActiveZone {
  id: string;
  name: string;
  severity: Zone['severity'];
  geometry: Polygon;
  box: [number, number, number, number];
}

export async function activeZonesOn(em: EntityManager, atMs: number): Promise<ActiveZone[]> {
  const at = new Date(atMs);
  return (await em.find(Zone, {}, { orderBy: { createdAt: 'asc' } }))
    .filter((z) => isZoneActive(z, at))
    .map((z) => ({ id: z.id, name: z.name, severity: z.severity, geometry: z.geometry, box: turfBbox(z.geometry) as [number, number, number, number] }));
}

/** Zones of a severity that the straight leg a → b touches or crosses. */
export function zonesOnLeg(zones: ActiveZone[], a: Point, b: Point, severity: Zone['severity']): ActiveZone[] {
  const x0 = Math.min(a.lon, b.lon);
  const x1 = Math.max(a.lon, b.lon);
  const y0 = Math.min(a.lat, b.lat);
  const y1 = Math.max(a.lat, b.lat);
  let line: LineString | null = null;
  const hits: ActiveZone[] = [];
  for (const z of zones) {
    if (z.severity !== severity || z.box[0] > x1 || z.box[2] < x0 || z.box[1] > y1 || z.box[3] < y0) continue;
    line ??= { type: 'LineString', coordinates: [[a.lon, a.lat], [b.lon, b.lat]] };
    if (booleanIntersects(z.geometry, line)) hits.push(z);
  }
  return hits;
}

const km = (m: number) => `${(m / 1000).toFixed(1)} km`;

export interface PlanOutcome {
  result: Record<string, unknown> & { feasible: boolean };
  /** Spans and zones the plan rests on (for staleness). */
  spanIds: string[];
  spanVersions: Record<string, number>;
}

/** Plans a mission. The request is schema-valid; `ctx` from planContext. */
export async function planMission(em: EntityManager, req: PlanRequest, ctx: PlanContext): Promise<PlanOutcome> {
  const drone = ctx.missionDrone;
  const wind: Wind = req.wind ? { speedMps: req.wind.speedMps, fromDeg: req.wind.fromDeg } : CALM;
  const returnToBase = req.returnToBase ?? false;
  const objective = req.objective ?? 'time';
  // Perches considered: mid-points within one full-battery hop (at the best ground speed) of the straight line base–target.
  const hopM = (usableWh(drone, 100) * 3600 * (drone.cruiseSpeedMps + wind.speedMps)) / drone.cruisePowerW;
  const corridor = { a: req.base, b: req.target, widthM: Math.min(hopM, 500_000) };
  const [{ perches, nearRoute }, zones] = await Promise.all([perchCandidates(em, ctx, corridor), activeZonesOn(em, ctx.departAtMs)]);
  const index = buildIndex(perches);
  const excludes = zones.filter((z) => z.severity === 'exclude');
  const blocked = (a: Point, b: Point) => zonesOnLeg(excludes, a, b, 'exclude')[0]?.id ?? null;
  const input: SearchInput = {
    drone,
    base: req.base,
    target: req.target,
    departAtMs: ctx.departAtMs,
    utcOffsetMin: ctx.offsetMin,
    wind,
    returnToBase,
    objective,
    perches,
    index,
    blocked: excludes.length ? blocked : undefined,
  };
  const result = searchRoute(input);
  if (result.found) return feasible(req, ctx, input, result, perches, zones, nearRoute);
  const why = await explainNoRoute(em, req, ctx, input, result, perches, zones);
  return { result: { ...why, perchesNearRoute: nearRoute }, spanIds: [], spanVersions: {} };
}

function feasible(req: PlanRequest, ctx: PlanContext, input: SearchInput, r: Extract<SearchResult, { found: true }>, perches: PerchCandidate[], zones: ActiveZone[], nearRoute: number): PlanOutcome {
  const iso = (ms: number) => isoAt(Math.round(ms / 1000), ctx.offsetMin);
  const drone = ctx.missionDrone;
  const stopOf = (s: { kind: string; perch: number; lat: number; lon: number }) => {
    if (s.kind !== 'perch') return { kind: s.kind, lat: s.lat, lon: s.lon, name: s.kind === 'base' ? 'Base' : 'Job site' };
    const p = perches[s.perch]!;
    return { kind: 'perch', lat: p.lat, lon: p.lon, name: `${p.lineName} ${p.fromLabel}–${p.toLabel}`, spanId: p.spanId };
  };
  const legs = r.legs.map((l) => {
    const cautions = zonesOnLeg(zones, l.from, l.to, 'caution');
    return {
      distanceM: l.distanceM,
      courseDeg: ((l.courseDeg % 360) + 360) % 360,
      headingDeg: l.headingDeg,
      windCorrectionDeg: l.windCorrectionDeg,
      groundSpeedMps: l.groundSpeedMps,
      durationS: l.durationS,
      energyWh: l.energyWh,
      socStartPct: l.socStartPct,
      socEndPct: l.socEndPct,
      ...(l.to.kind === 'perch' ? { toSpanId: perches[l.to.perch]!.spanId } : {}),
      from: stopOf(l.from),
      to: stopOf(l.to),
      departAt: iso(l.departMs),
      arriveAt: iso(l.arriveMs),
      cautionZones: cautions.map((z) => ({ id: z.id, name: z.name })),
    };
  });
  let totalHarvestWh = 0;
  const out = r.visits.map((v) => {
    const p = perches[v.perch]!;
    const byHour: { hour: number; harvestW: number; fromAt: string; seconds: number }[] = [];
    let t = v.arriveMs;
    while (t < v.departMs - 1) {
      const hour = localHour(t, ctx.offsetMin);
      const local = t + ctx.offsetMin * 60_000;
      const end = Math.min(v.departMs, t + (3_600_000 - (((local % 3_600_000) + 3_600_000) % 3_600_000)));
      byHour.push({ hour, harvestW: p.hourlyHarvestW[hour]!, fromAt: iso(t), seconds: (end - t) / 1000 });
      totalHarvestWh += (p.hourlyHarvestW[hour]! * (end - t)) / 3_600_000;
      t = end;
      if (byHour.length > 24 * 14) break;
    }
    return {
      spanId: p.spanId,
      lineId: p.lineId,
      arriveAt: iso(v.arriveMs),
      departAt: iso(v.departMs),
      dwellS: v.dwellS,
      harvestW: v.harvestW,
      socArrivePct: v.socArrivePct,
      socDepartPct: v.socDepartPct,
      lineBearingDeg: p.lineBearingDeg,
      conductorHeightM: p.conductorHeightM,
      lat: p.lat,
      lon: p.lon,
      alongM: p.alongM,
      perchPoint: p.perchPoint,
      lineName: p.lineName,
      voltageKv: p.voltageKv,
      fromStructureLabel: p.fromLabel,
      toStructureLabel: p.toLabel,
      spanLabel: `${p.fromLabel}–${p.toLabel}`,
      approachDistanceM: approachDistanceM(p.voltageKv),
      sagSource: p.sagSource,
      harvestSource: p.harvestSource,
      loadMonth: p.loadMonth,
      harvestByHour: byHour,
    };
  });
  const totalDwellS = r.visits.reduce((s, v) => s + v.dwellS, 0);
  const totalEnergyWh = r.legs.reduce((s, l) => s + l.energyWh, 0);
  const result = {
    feasible: true as const,
    totalDistanceM: r.totalDistanceM,
    totalDurationS: r.totalDurationS,
    totalDwellS,
    totalEnergyWh,
    totalHarvestWh,
    departAt: iso(ctx.departAtMs),
    arriveAt: iso(ctx.departAtMs + r.totalDurationS * 1000),
    base: req.base,
    target: req.target,
    returnToBase: input.returnToBase,
    objective: input.objective,
    wind: input.wind,
    reservePercent: drone.reservePercent,
    legs,
    perches: out,
    cautionZones: [...new Map(legs.flatMap((l) => l.cautionZones).map((z) => [z.id, z])).values()],
    perchesConsidered: perches.length,
    perchesNearRoute: nearRoute,
  };
  const spanIds = out.map((p) => p.spanId);
  return { result, spanIds, spanVersions: Object.fromEntries(spanIds.map((id) => [id, perches.find((p) => p.spanId === id)!.spanVersion])) };
}

/** The reach of one hop from a state of charge on a course in this wind, m (no manoeuvre when it ends at the target). */
function reachOnCourse(drone: MissionDrone, wind: Wind, socPct: number, courseDeg: number, toPerch: boolean): number {
  const w = windTriangle({ airspeedMps: drone.cruiseSpeedMps, windSpeedMps: wind.speedMps, windFromDeg: wind.fromDeg, courseDeg, windLimitMps: drone.windLimitMps });
  if (!w.flyable) return 0;
  const wh = usableWh(drone, socPct) - (toPerch ? drone.perchManoeuvreWh : 0);
  return Math.max(0, (wh * 3600 * w.groundSpeedMps) / drone.cruisePowerW);
}

/**
 * The gap no perch bridges: grow the network the drone reaches from the base (hops within calm reach), and the one
 * that reaches the job site; the closest pair between the two is the gap to bridge.
 */
function longestGap(input: SearchInput, perches: PerchCandidate[]) {
  const drone = input.drone;
  const fromBase = calmReachM(drone, 100, true);
  const baseDirect = calmReachM(drone, 100, false);
  const hop = calmReachM(drone, drone.chargeToPercent, true);
  const toTarget = calmReachM(drone, drone.chargeToPercent, false);
  const n = perches.length;
  const index = input.index ?? buildIndex(perches);
  const grow = (seed: Point, seedReach: number): Uint8Array => {
    const seen = new Uint8Array(n);
    const stack: number[] = [];
    const visit = (p: Point, r: number) => {
      if (n === 0) return;
      for (const i of around(index, p.lon, p.lat, Infinity, r / 1000)) {
        if (!seen[i]) {
          seen[i] = 1;
          stack.push(i);
        }
      }
    };
    visit(seed, seedReach);
    while (stack.length) visit(perches[stack.pop()!]!, hop);
    return seen;
  };
  const a = grow(input.base, fromBase);
  const b = grow(input.target, toTarget);
  // Nodes on each side: base (−1) and the perches reached from it; the target (−2) and the perches that reach it.
  const sideA: { p: Point; node: number }[] = [{ p: input.base, node: -1 }];
  const sideB: { p: Point; node: number }[] = [{ p: input.target, node: -2 }];
  for (let i = 0; i < n; i++) {
    if (a[i]) sideA.push({ p: perches[i]!, node: i });
    if (b[i]) sideB.push({ p: perches[i]!, node: i });
  }
  const bIndex = buildIndex(sideB.map((s) => s.p));
  let best = { d: Infinity, from: sideA[0]!, to: sideB[0]! };
  for (const s of sideA) {
    const [j] = around(bIndex, s.p.lon, s.p.lat, 1);
    if (j === undefined) continue;
    const d = distM(s.p, sideB[j]!.p);
    if (d < best.d) best = { d, from: s, to: sideB[j]! };
  }
  const reach = best.from.node === -1 ? (best.to.node === -2 ? baseDirect : fromBase) : best.to.node === -2 ? toTarget : hop;
  const connected = sideA.some((s) => s.node >= 0 && b[s.node]) || distM(input.base, input.target) <= baseDirect;
  return { connected, distanceM: best.d, reachM: reach, from: best.from, to: best.to };
}

async function bridgingSpans(em: EntityManager, ctx: PlanContext, from: Point, to: Point, reachFrom: number, reachTo: number, exclude: Set<string>) {
  const box = boxAround([from, to], Math.max(reachFrom, reachTo));
  const rows = (await sql.all(em, `select ${SPAN_COLUMNS}, l.name as line_name ${SPAN_FROM} join lines l on l.id = s.line_id where ${IN_BOX} order by s.id limit 5000`, [
      box.lat0,
      box.lat1,
      box.lon0,
      box.lon1,
    ])) as (SpanRow & { line_name: string })[];
  const found = rows
    .filter((r) => !exclude.has(r.id))
    .map((r) => {
      const mid = { lat: (r.alat + r.blat) / 2, lon: (r.alon + r.blon) / 2 };
      return { r, a: distM(from, mid), b: distM(mid, to) };
    })
    .filter((x) => x.a <= reachFrom && x.b <= reachTo)
    .sort((x, y) => Math.max(x.a, x.b) - Math.max(y.a, y.b))
    .slice(0, MAX_BRIDGING);
  const out = [];
  for (const { r } of found) {
    const row = await sql.get<{ perchable: number; result: unknown }>(em, 'select perchable, result from assessments where span_id = ? and harvester_profile_id = ? and drone_profile_id = ?', [r.id, ctx.harvester.id, ctx.drone.id]);
    const gates: string[] = [];
    if (row) {
      const result = readStoredResult(row.result) as { gates?: unknown[] } | null;
      for (const g of (result?.gates ?? []) as { id: string; passed: boolean; blocking?: boolean; detail: string }[]) if (!g.passed && g.blocking !== false) gates.push(`${gateWord(g.id)} (${g.detail})`);
    }
    const why: string[] = [];
    if (r.status !== 'approved') why.push(`it is ${r.status === 'submitted' ? 'awaiting review' : r.status === 'draft' ? 'still a draft' : r.status}, not approved`);
    if (!row) why.push('it has no assessment for this drone and harvester');
    else if (gates.length) why.push(`it fails ${gates.join('; ')} for this drone and harvester`);
    out.push({ spanId: r.id, lineId: r.line_id, lineName: r.line_name, label: `${r.alabel}–${r.blabel}`, status: r.status, failingGates: gates, reason: why.join(' and ') || 'not perchable' });
  }
  return out;
}

async function explainNoRoute(
  em: EntityManager,
  req: PlanRequest,
  ctx: PlanContext,
  input: SearchInput,
  first: Extract<SearchResult, { found: false }>,
  perches: PerchCandidate[],
  zones: ActiveZone[],
): Promise<Record<string, unknown> & { feasible: false }> {
  const drone = input.drone;
  const wind = input.wind;
  const common = { feasible: false as const, perchesConsidered: perches.length };
  if (wind.speedMps > drone.windLimitMps) {
    const message = `No leg can be flown: the wind of ${wind.speedMps.toFixed(1)} m/s is above the drone's wind limit of ${drone.windLimitMps.toFixed(1)} m/s. Plan for a calmer time or choose a drone rated for this wind.`;
    return { ...common, reason: 'wind', message, windSpeedMps: wind.speedMps, windLimitMps: drone.windLimitMps };
  }
  // An exclude zone is the cause when the route exists without it.
  if (input.blocked && first.zoneCuts.length) {
    const free = searchRoute({ ...input, blocked: undefined });
    if (free.found) {
      const cutting = new Map<string, { zone: ActiveZone; legs: string[] }>();
      free.legs.forEach((l, i) => {
        for (const z of zonesOnLeg(zones, l.from, l.to, 'exclude')) {
          const e = cutting.get(z.id) ?? { zone: z, legs: [] };
          e.legs.push(`leg ${i + 1}`);
          cutting.set(z.id, e);
        }
      });
      const list = [...cutting.values()];
      const names = list.map((c) => `"${c.zone.name}"`).join(', ');
      const only = free.legs.length === 1;
      const message = `The exclude zone${list.length > 1 ? 's' : ''} ${names} cut${list.length > 1 ? '' : 's'} ${only ? 'the only leg' : 'every route'} within the drone's reach${only ? ` (the direct ${km(free.legs[0]!.distanceM)} flight)` : ''}, and no approved perch leads around ${list.length > 1 ? 'them' : 'it'}. A leg may not cross an active exclude zone: move the base or the job site, or ask safety whether the zone still applies on the departure date.`;
      return { ...common, reason: 'zone', message, zone: list[0] ? { id: list[0].zone.id, name: list[0].zone.name } : null, zones: list.map((c) => ({ id: c.zone.id, name: c.zone.name, legs: c.legs })) };
    }
  }
  // The wind is the cause when the route exists in still air.
  if (wind.speedMps > 0) {
    const calm = searchRoute({ ...input, wind: CALM });
    if (calm.found) {
      const texts = first.unflyable.length ? ` (${[...new Set(first.unflyable)].slice(0, 3).join('; ')})` : '';
      const message = `The wind of ${wind.speedMps.toFixed(1)} m/s from ${Math.round(wind.fromDeg)}° leaves no route: a route exists in still air, but in this wind a leg of it is unflyable or beyond the battery${texts}. Plan for a calmer time, another departure, or a drone with more reach.`;
      return { ...common, reason: 'wind', message, windSpeedMps: wind.speedMps, windFromDeg: wind.fromDeg, unflyable: first.unflyable };
    }
  }
  const gap = longestGap(input, perches);
  if (!gap.connected && gap.distanceM > gap.reachM) {
    const fromName = gap.from.node === -1 ? 'the base' : `the perch on ${perches[gap.from.node]!.lineName} ${perches[gap.from.node]!.fromLabel}–${perches[gap.from.node]!.toLabel}`;
    const toName = gap.to.node === -2 ? 'the job site' : `the perch on ${perches[gap.to.node]!.lineName} ${perches[gap.to.node]!.fromLabel}–${perches[gap.to.node]!.toLabel}`;
    const reachFrom = gap.from.node === -1 ? calmReachM(drone, 100, true) : calmReachM(drone, drone.chargeToPercent, true);
    const reachTo = gap.to.node === -2 ? calmReachM(drone, drone.chargeToPercent, false) : calmReachM(drone, drone.chargeToPercent, true);
    const bridging = await bridgingSpans(em, ctx, gap.from.p, gap.to.p, reachFrom, reachTo, new Set(perches.map((p) => p.spanId)));
    const bridgeText = bridging.length
      ? ` ${bridging.length === 1 ? 'One span' : `${bridging.length} spans`} would bridge it but cannot be used: ${bridging.map((b) => `${b.lineName} ${b.label} (${b.reason})`).join('; ')}.`
      : ' No span in the inventory lies within reach of both sides.';
    const message = `No perch bridges the ${km(gap.distanceM)} gap from ${fromName} to ${toName}; the drone reaches ${km(gap.reachM)} on one charge in still air.${bridgeText}`;
    return {
      ...common,
      reason: 'gap',
      message,
      longestGapM: gap.distanceM,
      reachM: gap.reachM,
      gap: { from: { lat: gap.from.p.lat, lon: gap.from.p.lon }, to: { lat: gap.to.p.lat, lon: gap.to.p.lon }, distanceM: gap.distanceM, reachM: gap.reachM },
      blockedSpans: bridging,
    };
  }
  const dead = perches.filter((p) => !p.hourlyHarvestW.some((w) => w > 0)).length;
  if (dead > 0 && dead === perches.length) {
    return { ...common, reason: 'no-harvest', message: `The perches within reach harvest nothing at any hour of the line's load profile (${dead} span${dead === 1 ? '' : 's'}), so the drone could never recharge there.` };
  }
  return {
    ...common,
    reason: 'energy',
    message: `Every chain of perches within reach leaves a leg that needs more energy than the battery holds above the ${drone.reservePercent} % reserve${req.returnToBase ? ' on the way out or back' : ''}. A drone with more reach, or more approved perches between the base and the job site, would make it possible.`,
  };
}
