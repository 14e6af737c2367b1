// A mission's plan as files other tools open: GPX 1.1 (a route), GeoJSON (RFC 7946) and KML 2.2 (OGC 07-147r2).
// Pure functions of a mission and its feasible plan; the router reads the mission and sends the text.
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { kmlColour } from '#shared/span-status-colours.ts';
import { MISSION_COLOURS } from '#shared/mission-colours.ts';
import type { FeasiblePlan, MissionStop, PlanLeg, PlanPerch } from '#shared/schemas/missions.ts';

/** The words every exported file carries, as every plan view does. */
export const MISSION_CAUTION =
  "Caution: this plan supports the flight and never replaces the line owner's authorisation, the airspace rules or the pilot's own judgement. Approach figures defer to local codes and licensed practice.";

/** The plan's own shape (shared with the screens); a file needs every stop's and perch's position, which the
 * planner always writes. */
export type ExportStop = MissionStop;
export type ExportLeg = PlanLeg & { from: MissionStop; to: MissionStop };
export type ExportPerch = PlanPerch & { lat: number; lon: number };
export type ExportPlan = Omit<FeasiblePlan, 'legs' | 'perches'> & { legs: ExportLeg[]; perches: ExportPerch[] };

export interface ExportMission {
  id: string;
  name: string;
  plan: ExportPlan;
  plannerName?: string | null;
  authorisedByName?: string | null;
  authorisedAt?: string | null;
}

export interface ExportOptions {
  units?: UnitSystem;
  /** When the file is written (GPX metadata time). */
  generatedAt?: Date;
}

/** One point of the route in flight order: the base, each perch visit, the job site (and the base again on a return). */
export interface RoutePoint {
  kind: 'base' | 'perch' | 'target';
  lat: number;
  lon: number;
  name: string;
  desc: string;
  /** Departure from the base at the start, else the arrival, ISO 8601 with the departure's offset. */
  time: string | null;
  perch: (ExportPerch & { order: number }) | null;
}

const hhmm = (iso: string | undefined | null) => (iso && /T\d{2}:\d{2}/.test(iso) ? iso.slice(11, 16) : '—');
/** "2026-06-01 09:00 UTC+02:00" from an ISO time with its offset. */
const when = (iso: string | undefined | null) => {
  if (!iso || !/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/.test(iso)) return '—';
  const off = /(Z|[+-]\d{2}:\d{2})$/.exec(iso)?.[1];
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)}${off ? ` UTC${off === 'Z' ? '' : off}` : ''}`;
};
const minutes = (s: number) => `${Math.round(s / 60)} min`;
/** Route distances in km, or statute miles for US units (1 mi = 1 609.344 m, exact). */
const far = (m: number, units: UnitSystem) => (units === 'us' ? `${(m / 1609.344).toFixed(1)} mi` : `${(m / 1000).toFixed(1)} km`);
const pct = (x: number) => `${Math.round(x)} %`;
const deg = (x: number) => `${Math.round(((x % 360) + 360) % 360)}°`;

function perchName(p: ExportPerch, order: number) {
  const where = [p.lineName, p.spanLabel].filter(Boolean).join(' ');
  return `Perch ${order}${where ? ` — ${where}` : ''}`;
}

/** The route points of a feasible plan, with a name and a description in the reader's units. */
export function routePoints(mission: ExportMission, units: UnitSystem = 'metric'): RoutePoint[] {
  const { plan } = mission;
  if (!plan.legs.length) return [];
  const q = (v: number, kind: Parameters<typeof formatQuantity>[1]) => formatQuantity(v, kind, units);
  const first = plan.legs[0]!;
  const out: RoutePoint[] = [
    {
      kind: 'base',
      lat: first.from.lat,
      lon: first.from.lon,
      name: 'Base',
      desc: `Depart ${hhmm(first.departAt ?? plan.departAt)} at ${pct(first.socStartPct)} charge; first leg ${far(first.distanceM, units)} on course ${deg(first.courseDeg)}.`,
      time: first.departAt ?? plan.departAt ?? null,
      perch: null,
    },
  ];
  let perchIndex = 0;
  plan.legs.forEach((leg, i) => {
    const next = plan.legs[i + 1];
    const legText = `Leg ${i + 1}: ${far(leg.distanceM, units)} on course ${deg(leg.courseDeg)} at ${q(leg.groundSpeedMps, 'speed')} over the ground, ${minutes(leg.durationS)}, ${q(leg.energyWh, 'energy')}, charge ${pct(leg.socStartPct)} → ${pct(leg.socEndPct)}${leg.cautionZones?.length ? `; crosses caution zone ${leg.cautionZones.map((z) => `“${z.name}”`).join(', ')}` : ''}.`;
    if (leg.to.kind === 'perch') {
      const p = plan.perches[perchIndex]!;
      perchIndex += 1;
      const approach = p.approachDistanceM !== undefined ? ` Approach distance for ${p.voltageKv ?? '—'} kV: ${formatQuantity(p.approachDistanceM, 'length', units, { digits: 1 })} (local codes govern).` : '';
      out.push({
        kind: 'perch',
        lat: p.lat,
        lon: p.lon,
        name: perchName(p, perchIndex),
        desc: `${legText} Arrive ${hhmm(p.arriveAt)} at ${pct(p.socArrivePct)}, dwell ${minutes(p.dwellS)} harvesting ${q(p.harvestW, 'power')}, leave ${hhmm(p.departAt)} at ${pct(p.socDepartPct)}. Line bearing ${deg(p.lineBearingDeg)}, conductor height ${formatQuantity(p.conductorHeightM, 'length', units, { digits: 1 })}.${approach}`,
        time: p.arriveAt,
        perch: { ...p, order: perchIndex },
      });
    } else {
      const isBase = leg.to.kind === 'base';
      out.push({
        kind: isBase ? 'base' : 'target',
        lat: leg.to.lat,
        lon: leg.to.lon,
        name: isBase ? 'Base (return)' : 'Job site',
        desc: `${legText} Arrive ${hhmm(leg.arriveAt)} at ${pct(leg.socEndPct)} charge.${next ? ` Next leg ${far(next.distanceM, units)} on course ${deg(next.courseDeg)}.` : ''}`,
        time: leg.arriveAt ?? null,
        perch: null,
      });
    }
  });
  return out;
}

/** Escapes text for XML element content and attribute values, dropping characters XML 1.0 does not allow. */
export function xmlText(s: string): string {
  return s
    .replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]/g, '')
    .replace(/[<>&'"]/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', "'": '&apos;', '"': '&quot;' })[c]!);
}

/** WGS84 degrees at 7 decimals (about 1 cm), the sign kept. */
const coord = (x: number) => Number(x.toFixed(7)).toString();

function summary(mission: ExportMission, units: UnitSystem) {
  const { plan } = mission;
  const parts = [
    `${plan.perches.length} perch${plan.perches.length === 1 ? '' : 'es'}`,
    far(plan.totalDistanceM, units),
    `${minutes(plan.totalDurationS)} in all`,
  ];
  const by = [mission.plannerName ? `planned by ${mission.plannerName}` : '', mission.authorisedByName ? `authorised by ${mission.authorisedByName}` : 'not authorised'].filter(Boolean).join(', ');
  return `${parts.join(', ')}; depart ${when(plan.departAt)}, arrive ${when(plan.arriveAt)}; ${by}.`;
}

/** GPX 1.1 (topografix.com/GPX/1/1): one route, one rtept per base, perch and job site, in flight order. */
export function missionToGpx(mission: ExportMission, opts: ExportOptions = {}): string {
  const units = opts.units ?? 'metric';
  const points = routePoints(mission, units);
  const out: string[] = [];
  out.push('<?xml version="1.0" encoding="UTF-8"?>');
  out.push(
    '<gpx version="1.1" creator="Roostline" xmlns="http://www.topografix.com/GPX/1/1" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" xsi:schemaLocation="http://www.topografix.com/GPX/1/1 http://www.topografix.com/GPX/1/1/gpx.xsd">',
  );
  out.push('  <metadata>');
  out.push(`    <name>${xmlText(mission.name)}</name>`);
  out.push(`    <desc>${xmlText(`${summary(mission, units)} ${MISSION_CAUTION}`)}</desc>`);
  out.push(`    <time>${(opts.generatedAt ?? new Date()).toISOString()}</time>`);
  out.push('  </metadata>');
  out.push('  <rte>');
  out.push(`    <name>${xmlText(mission.name)}</name>`);
  out.push(`    <cmt>${xmlText(MISSION_CAUTION)}</cmt>`);
  out.push(`    <desc>${xmlText(summary(mission, units))}</desc>`);
  out.push('    <src>Roostline mission plan</src>');
  out.push('    <type>perch mission</type>');
  for (const p of points) {
    out.push(`    <rtept lat="${coord(p.lat)}" lon="${coord(p.lon)}">`);
    if (p.time) out.push(`      <time>${xmlText(p.time)}</time>`);
    out.push(`      <name>${xmlText(p.name)}</name>`);
    out.push(`      <desc>${xmlText(p.desc)}</desc>`);
    out.push(`      <type>${p.kind === 'target' ? 'job site' : p.kind}</type>`);
    out.push('    </rtept>');
  }
  out.push('  </rte>');
  out.push('</gpx>');
  return out.join('\n') + '\n';
}

/** GeoJSON (RFC 7946): the route as a LineString, then the base, each perch with its figures, and the job site as Points. */
export function missionToGeoJson(mission: ExportMission, opts: ExportOptions = {}) {
  const units = opts.units ?? 'metric';
  const points = routePoints(mission, units);
  const pos = (p: { lat: number; lon: number }) => [Number(p.lon.toFixed(7)), Number(p.lat.toFixed(7))];
  const { plan } = mission;
  return {
    type: 'FeatureCollection' as const,
    features: [
      {
        type: 'Feature' as const,
        geometry: { type: 'LineString' as const, coordinates: points.map(pos) },
        properties: {
          kind: 'route',
          missionId: mission.id,
          name: mission.name,
          totalDistanceM: plan.totalDistanceM,
          totalDurationS: plan.totalDurationS,
          departAt: plan.departAt ?? null,
          arriveAt: plan.arriveAt ?? null,
          returnToBase: plan.returnToBase ?? false,
          perchCount: plan.perches.length,
          legs: plan.legs.map((l) => ({
            distanceM: l.distanceM,
            courseDeg: l.courseDeg,
            groundSpeedMps: l.groundSpeedMps,
            durationS: l.durationS,
            energyWh: l.energyWh,
            socStartPct: l.socStartPct,
            socEndPct: l.socEndPct,
            cautionZones: (l.cautionZones ?? []).map((z) => z.name),
          })),
          caution: MISSION_CAUTION,
        },
      },
      ...points.map((p, i) => ({
        type: 'Feature' as const,
        geometry: { type: 'Point' as const, coordinates: pos(p) },
        properties: {
          kind: p.kind,
          order: i,
          name: p.name,
          description: p.desc,
          time: p.time,
          ...(p.perch
            ? {
                perchOrder: p.perch.order,
                spanId: p.perch.spanId,
                lineId: p.perch.lineId,
                lineName: p.perch.lineName ?? null,
                spanLabel: p.perch.spanLabel ?? null,
                voltageKv: p.perch.voltageKv ?? null,
                arriveAt: p.perch.arriveAt,
                departAt: p.perch.departAt,
                dwellS: p.perch.dwellS,
                harvestW: p.perch.harvestW,
                socArrivePct: p.perch.socArrivePct,
                socDepartPct: p.perch.socDepartPct,
                lineBearingDeg: p.perch.lineBearingDeg,
                conductorHeightM: p.perch.conductorHeightM,
                approachDistanceM: p.perch.approachDistanceM ?? null,
              }
            : {}),
        },
      })),
    ],
  };
}

/** KML 2.2 in the app's own mission palette (kml:color in aabbggrr order, OGC 07-147r2 §16.9). */
export function missionToKml(mission: ExportMission, opts: ExportOptions = {}): string {
  const units = opts.units ?? 'metric';
  const points = routePoints(mission, units);
  const out: string[] = [];
  out.push('<?xml version="1.0" encoding="UTF-8"?>');
  out.push('<kml xmlns="http://www.opengis.net/kml/2.2">');
  out.push('<Document>');
  out.push(`<name>${xmlText(mission.name)}</name>`);
  out.push(`<description>${xmlText(`${summary(mission, units)} ${MISSION_CAUTION}`)}</description>`);
  out.push(
    `<Style id="mission-route"><LineStyle><color>${kmlColour(MISSION_COLOURS.route)}</color><width>4</width></LineStyle><PolyStyle><fill>0</fill></PolyStyle></Style>`,
  );
  for (const kind of ['base', 'perch', 'target'] as const) {
    out.push(
      `<Style id="mission-${kind}"><IconStyle><color>${kmlColour(MISSION_COLOURS[kind])}</color><scale>1.1</scale></IconStyle><LabelStyle><color>${kmlColour(MISSION_COLOURS.route)}</color></LabelStyle></Style>`,
    );
  }
  out.push('<Placemark>');
  out.push(`<name>${xmlText(`${mission.name} — route`)}</name>`);
  out.push(`<description>${xmlText(summary(mission, units))}</description>`);
  out.push('<styleUrl>#mission-route</styleUrl>');
  out.push(`<LineString><tessellate>1</tessellate><coordinates>${points.map((p) => `${coord(p.lon)},${coord(p.lat)},0`).join(' ')}</coordinates></LineString>`);
  out.push('</Placemark>');
  out.push('<Folder><name>Stops</name>');
  for (const p of points) {
    const data: [string, string][] = [
      ['kind', p.kind === 'target' ? 'job site' : p.kind],
      ['time', p.time ?? ''],
    ];
    if (p.perch)
      data.push(
        ['spanId', p.perch.spanId],
        ['lineName', p.perch.lineName ?? ''],
        ['dwellS', String(Math.round(p.perch.dwellS))],
        ['harvestW', p.perch.harvestW.toFixed(1)],
        ['socArrivePct', p.perch.socArrivePct.toFixed(1)],
        ['socDepartPct', p.perch.socDepartPct.toFixed(1)],
        ['lineBearingDeg', p.perch.lineBearingDeg.toFixed(1)],
        ['conductorHeightM', p.perch.conductorHeightM.toFixed(2)],
        ['approachDistanceM', p.perch.approachDistanceM === undefined ? '' : p.perch.approachDistanceM.toFixed(2)],
      );
    out.push('<Placemark>');
    out.push(`<name>${xmlText(p.name)}</name>`);
    out.push(`<description>${xmlText(p.desc)}</description>`);
    out.push(`<styleUrl>#mission-${p.kind}</styleUrl>`);
    out.push('<ExtendedData>' + data.map(([k, v]) => `<Data name="${k}"><value>${xmlText(v)}</value></Data>`).join('') + '</ExtendedData>');
    out.push(`<Point><coordinates>${coord(p.lon)},${coord(p.lat)},0</coordinates></Point>`);
    out.push('</Placemark>');
  }
  out.push('</Folder>');
  out.push('</Document>');
  out.push('</kml>');
  return out.join('\n') + '\n';
}
