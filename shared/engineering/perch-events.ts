// Perch events in a flight track: where the drone stays put (within a few metres) for more than a minute, and
// whether that stop was on a conductor (next to a span, harvesting) or a hover. Distances on WGS84 (Karney).
import { geodesicInverse } from './geodesic.ts';

export interface LatLon {
  lat: number;
  lon: number;
}

export interface TrackPoint {
  /** Epoch milliseconds. */
  t: number;
  lat: number;
  lon: number;
  altitudeM: number | null;
  batteryPct: number | null;
  /** Harvest the drone measured, W (converter output); null when the record has none at that point. */
  harvestW: number | null;
}

export interface SpanSegment {
  id: string;
  lineId: string;
  from: LatLon;
  to: LatLon;
}

export interface StationaryRun {
  startIndex: number;
  endIndex: number;
  startT: number;
  endT: number;
  centre: LatLon;
}

export interface DetectedEvent extends StationaryRun {
  kind: 'perch' | 'hover';
  spanId: string | null;
  lineId: string | null;
  /** Horizontal distance from the stop's centre to the span's straight line, m. */
  spanDistanceM: number | null;
  measuredHarvestW: number | null;
  batteryStartPct: number | null;
  batteryEndPct: number | null;
  /** Why a stop is a hover rather than a perch, in words. */
  note: string | null;
}

export const PERCH_RADIUS_M = 5;
export const PERCH_MIN_DURATION_S = 60;
export const SPAN_MATCH_M = 15;

const dist = (a: LatLon, b: LatLon) => geodesicInverse({ latDeg: a.lat, lonDeg: a.lon }, { latDeg: b.lat, lonDeg: b.lon }).lengthM;

/** Runs of consecutive points all within `radiusM` of the run's first point, lasting at least `minS` seconds. */
export function stationaryRuns(points: readonly TrackPoint[], radiusM = PERCH_RADIUS_M, minS = PERCH_MIN_DURATION_S): StationaryRun[] {
  const runs: StationaryRun[] = [];
  let i = 0;
  while (i < points.length) {
    let j = i;
    while (j + 1 < points.length && dist(points[i], points[j + 1]) <= radiusM) j++;
    if ((points[j].t - points[i].t) / 1000 >= minS) {
      const slice = points.slice(i, j + 1);
      runs.push({
        startIndex: i,
        endIndex: j,
        startT: points[i].t,
        endT: points[j].t,
        centre: { lat: slice.reduce((s, p) => s + p.lat, 0) / slice.length, lon: slice.reduce((s, p) => s + p.lon, 0) / slice.length },
      });
      i = j + 1;
    } else i++;
  }
  return runs;
}

/** Horizontal distance from a point to the straight segment between two structures, m (local flat frame; spans are short). */
export function distanceToSegmentM(p: LatLon, a: LatLon, b: LatLon): number {
  const mPerDegLat = 111_132.954;
  const mPerDegLon = (Math.PI / 180) * 6_378_137 * Math.cos((p.lat * Math.PI) / 180);
  const ax = (a.lon - p.lon) * mPerDegLon;
  const ay = (a.lat - p.lat) * mPerDegLat;
  const bx = (b.lon - p.lon) * mPerDegLon;
  const by = (b.lat - p.lat) * mPerDegLat;
  const dx = bx - ax;
  const dy = by - ay;
  const len2 = dx * dx + dy * dy;
  const t = len2 > 0 ? Math.min(1, Math.max(0, -(ax * dx + ay * dy) / len2)) : 0;
  return Math.hypot(ax + t * dx, ay + t * dy);
}

/** The stationary runs, each matched to the nearest span and judged perch or hover. */
export function detectPerchEvents(points: readonly TrackPoint[], spans: readonly SpanSegment[], matchM = SPAN_MATCH_M): DetectedEvent[] {
  return stationaryRuns(points).map((run) => {
    let best: { span: SpanSegment; d: number } | null = null;
    for (const s of spans) {
      const d = distanceToSegmentM(run.centre, s.from, s.to);
      if (!best || d < best.d) best = { span: s, d };
    }
    const slice = points.slice(run.startIndex, run.endIndex + 1);
    const harvests = slice.map((p) => p.harvestW).filter((w): w is number => w !== null);
    const measured = harvests.length ? harvests.reduce((s, w) => s + w, 0) / harvests.length : null;
    const batteries = slice.map((p) => p.batteryPct).filter((b): b is number => b !== null);
    const batteryStartPct = batteries.length ? batteries[0] : null;
    const batteryEndPct = batteries.length ? batteries[batteries.length - 1] : null;
    const near = best !== null && best.d <= matchM;
    const charging = (measured !== null && measured > 0) || (batteryStartPct !== null && batteryEndPct !== null && batteryEndPct > batteryStartPct);
    const kind = near && charging ? 'perch' : 'hover';
    const note = kind === 'perch' ? null : !near ? `no span within ${matchM} m` : 'no harvest and the battery did not rise';
    return {
      ...run,
      kind,
      spanId: near ? best!.span.id : null,
      lineId: near ? best!.span.lineId : null,
      spanDistanceM: best ? best.d : null,
      measuredHarvestW: measured,
      batteryStartPct,
      batteryEndPct,
      note,
    };
  });
}
