// Flight records: CSV (time, lat, lon, altitude_m, battery_pct, harvest_w) or a GPX 1.1 track whose extra values sit
// in Roostline's own extension namespace. Any bad row refuses the whole file with its row (or point) number.
import Papa from 'papaparse';
import { XMLParser } from 'fast-xml-parser';
import type { TrackPoint } from '#shared/engineering/perch-events.ts';
import { AppError } from '../../http/errors.ts';

export const FLIGHT_CSV_COLUMNS = ['time', 'lat', 'lon', 'altitude_m', 'battery_pct', 'harvest_w'] as const;
/** The namespace of Roostline's GPX extension elements (`battery_pct`, `harvest_w`). */
export const FLIGHT_GPX_NAMESPACE = 'urn:roostline:flight:1';
export const MAX_FLIGHT_POINTS = 200_000;

const ISO_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/;

export interface ParsedTrack {
  points: TrackPoint[];
  /** UTC offset of the first point's time as written, minutes. */
  offsetMin: number;
}

function offsetOf(text: string): number {
  const m = /(Z|([+-])(\d{2}):(\d{2}))$/.exec(text);
  if (!m || m[1] === 'Z') return 0;
  return (m[2] === '-' ? -1 : 1) * (Number(m[3]) * 60 + Number(m[4]));
}

function refuse(where: string, message: string): never {
  throw new AppError(400, 'bad_request', `${where}: ${message}; nothing was stored`, [{ path: where, message }]);
}

function point(where: string, time: string, lat: string, lon: string, alt: string, bat: string, harvest: string): TrackPoint {
  if (!ISO_OFFSET.test(time.trim())) refuse(where, `time "${time}" must be ISO 8601 with its UTC offset`);
  const num = (name: string, text: string, min: number, max: number, optional: boolean): number | null => {
    if (text.trim() === '') {
      if (optional) return null;
      refuse(where, `${name} is missing`);
    }
    const v = Number(text);
    if (!Number.isFinite(v) || v < min || v > max) refuse(where, `${name} "${text}" must be a number from ${min} to ${max}`);
    return v;
  };
  return {
    t: Date.parse(time.trim()),
    lat: num('lat', lat, -90, 90, false)!,
    lon: num('lon', lon, -180, 180, false)!,
    altitudeM: num('altitude_m', alt, -500, 10_000, true),
    batteryPct: num('battery_pct', bat, 0, 100, true),
    harvestW: num('harvest_w', harvest, 0, 100_000, true),
  };
}

function ordered(points: TrackPoint[], label: (i: number) => string): void {
  if (points.length < 2) refuse('file', 'a flight record needs at least two points');
  if (points.length > MAX_FLIGHT_POINTS) refuse('file', `at most ${MAX_FLIGHT_POINTS} points`);
  for (let i = 1; i < points.length; i++) if (points[i].t < points[i - 1].t) refuse(label(i), 'the time is earlier than the point before');
}

export function parseFlightCsv(text: string): ParsedTrack {
  const parsed = Papa.parse<string[]>(text.trim(), { skipEmptyLines: 'greedy' });
  const [header, ...rows] = parsed.data;
  const names = (header ?? []).map((h) => h.trim().toLowerCase());
  const col = Object.fromEntries(FLIGHT_CSV_COLUMNS.map((c) => [c, names.indexOf(c)]));
  for (const c of ['time', 'lat', 'lon'] as const) if (col[c] < 0) refuse('file', `the header must name the columns ${FLIGHT_CSV_COLUMNS.join(', ')} (missing "${c}")`);
  const cell = (r: string[], c: (typeof FLIGHT_CSV_COLUMNS)[number]) => (col[c] >= 0 ? (r[col[c]] ?? '') : '');
  const points = rows.map((r, i) => point(`row ${i + 1}`, cell(r, 'time'), cell(r, 'lat'), cell(r, 'lon'), cell(r, 'altitude_m'), cell(r, 'battery_pct'), cell(r, 'harvest_w')));
  ordered(points, (i) => `row ${i + 1}`);
  return { points, offsetMin: offsetOf(cell(rows[0], 'time').trim()) };
}

export function parseFlightGpx(text: string): ParsedTrack {
  let doc: Record<string, unknown>;
  try {
    doc = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '@', removeNSPrefix: true, isArray: (name) => ['trk', 'trkseg', 'trkpt'].includes(name), processEntities: false }).parse(text, true) as Record<string, unknown>;
  } catch (e) {
    refuse('file', `the GPX file is not well-formed XML (${(e as Error).message.split('\n')[0]})`);
  }
  const gpx = doc.gpx as Record<string, unknown> | undefined;
  if (!gpx) refuse('file', 'not a GPX file (no <gpx> element)');
  const pts: Record<string, unknown>[] = [];
  for (const trk of (gpx.trk as Record<string, unknown>[] | undefined) ?? []) for (const seg of (trk.trkseg as Record<string, unknown>[] | undefined) ?? []) pts.push(...((seg.trkpt as Record<string, unknown>[] | undefined) ?? []));
  const s = (v: unknown) => (v === undefined || v === null ? '' : String(typeof v === 'object' ? ((v as Record<string, unknown>)['#text'] ?? '') : v));
  const points = pts.map((p, i) => {
    const ext = (p.extensions ?? {}) as Record<string, unknown>;
    return point(`point ${i + 1}`, s(p.time), s(p['@lat']), s(p['@lon']), s(p.ele), s(ext.battery_pct), s(ext.harvest_w));
  });
  ordered(points, (i) => `point ${i + 1}`);
  return { points, offsetMin: offsetOf(s(pts[0].time).trim()) };
}

export function parseFlightRecord(text: string, fileName: string): ParsedTrack & { format: 'csv' | 'gpx' } {
  const gpx = /\.gpx$/i.test(fileName) || /^\s*(<\?xml|<gpx)/.test(text);
  return gpx ? { ...parseFlightGpx(text), format: 'gpx' } : { ...parseFlightCsv(text), format: 'csv' };
}
