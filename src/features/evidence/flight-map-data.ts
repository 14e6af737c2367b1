// A flight record as GeoJSON for the map: the track, one point per stop (perch or hover) with its label, and the
// spans its perches matched. Pure, so it is tested without WebGL.
import type { FlightRecordView, PerchEventView } from './api.ts';

export interface StopProperties {
  kind: 'perch' | 'hover';
  /** "Perch 1", "Hover 2": numbered in flight order across both kinds, as in the table. */
  label: string;
  eventId: string;
  spanId: string | null;
  spanDistanceM: number | null;
  lowHarvest: boolean;
}

type Feature<G, P> = { type: 'Feature'; id?: number; geometry: G; properties: P };
type Line = { type: 'LineString'; coordinates: [number, number][] };
type Point = { type: 'Point'; coordinates: [number, number] };

export function stopLabel(e: Pick<PerchEventView, 'kind'>, index: number): string {
  return `${e.kind === 'perch' ? 'Perch' : 'Hover'} ${index + 1}`;
}

export function flightGeoJson(record: Pick<FlightRecordView, 'track' | 'events'>) {
  const track: Feature<Line, { kind: 'track' }> = { type: 'Feature', geometry: { type: 'LineString', coordinates: record.track }, properties: { kind: 'track' } };
  const stops: Feature<Point, StopProperties>[] = record.events.map((e, i) => ({
    type: 'Feature',
    id: i + 1,
    geometry: { type: 'Point', coordinates: [e.lon, e.lat] },
    properties: { kind: e.kind, label: stopLabel(e, i), eventId: e.id, spanId: e.spanId, spanDistanceM: e.spanDistanceM, lowHarvest: e.lowHarvest },
  }));
  return {
    track: { type: 'FeatureCollection' as const, features: record.track.length >= 2 ? [track] : [] },
    stops: { type: 'FeatureCollection' as const, features: stops },
    /** Spans a perch matched: highlighted on the span tiles. */
    matchedSpanIds: [...new Set(record.events.filter((e) => e.kind === 'perch' && e.spanId).map((e) => e.spanId!))],
  };
}

/** [west, south, east, north] of the track and its stops; null for an empty record. */
export function flightBounds(record: Pick<FlightRecordView, 'track' | 'events'>): [number, number, number, number] | null {
  const pts = [...record.track, ...record.events.map((e) => [e.lon, e.lat] as [number, number])];
  if (pts.length === 0) return null;
  const lons = pts.map((p) => p[0]);
  const lats = pts.map((p) => p[1]);
  return [Math.min(...lons), Math.min(...lats), Math.max(...lons), Math.max(...lats)];
}
