// Pure transforms of a mission plan for the screens: the charge-over-time series, the route as GeoJSON and as an
// SVG drawing, times with the browser's offset, and the infeasible reason in words. Unit-tested without a browser.
import type { Feature, FeatureCollection, LineString, Point, Polygon } from 'geojson';
import { M_PER_FT } from '#shared/units.ts';
import type { UnitSystem } from '#shared/units.ts';
import type { FeasiblePlan, InfeasiblePlan, LatLon, PlanPerch, StaleReason } from './types.ts';

// ——— time ———

const pad = (n: number) => String(Math.trunc(Math.abs(n))).padStart(2, '0');

/** "+02:00" for an offset of +120 min east of UTC (note: Date#getTimezoneOffset has the opposite sign). */
export function formatOffset(offsetMinutesEast: number): string {
  const sign = offsetMinutesEast < 0 ? '-' : '+';
  const m = Math.abs(offsetMinutesEast);
  return `${sign}${pad(m / 60)}:${pad(m % 60)}`;
}

/**
 * A `datetime-local` value ("2026-06-01T09:00") with the browser's offset on that date → ISO 8601 with offset
 * ("2026-06-01T09:00:00+02:00"). `offsetFor` is injectable for tests; by default the browser's own zone.
 */
export function localInputToIso(value: string, offsetFor: (local: string) => number = browserOffsetMinutes): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(value.trim());
  if (!m) return null;
  const [, y, mo, d, h, mi, s = '00'] = m;
  if (+mo < 1 || +mo > 12 || +d < 1 || +d > 31 || +h > 23 || +mi > 59 || +s > 59) return null;
  return `${y}-${mo}-${d}T${h}:${mi}:${s}${formatOffset(offsetFor(value))}`;
}

/** Minutes east of UTC of the browser's zone at that local time. */
export function browserOffsetMinutes(local: string): number {
  const d = new Date(local);
  return Number.isNaN(d.getTime()) ? 0 : -d.getTimezoneOffset();
}

/** ISO instant → the `datetime-local` value in the browser's zone (to reopen a saved departure). */
export function isoToLocalInput(iso: string | undefined | null): string {
  if (!iso) return '';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return '';
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** The offset written in an ISO string ("+02:00", "Z" → "+00:00"); null when none. */
export function offsetOf(iso: string): string | null {
  const m = /(Z|[+-]\d{2}:?\d{2})$/.exec(iso);
  if (!m) return null;
  if (m[1] === 'Z') return '+00:00';
  const o = m[1].replace(':', '');
  return `${o.slice(0, 3)}:${o.slice(3)}`;
}

/**
 * Wall-clock time of an instant in a fixed offset ("09:42", with the date when it is not the departure's day),
 * so a mission brief reads in the departure's own time, whichever zone prints it.
 */
export function wallClock(iso: string, offset: string, withDate = false): string {
  const t = new Date(iso).getTime();
  if (Number.isNaN(t)) return '—';
  const m = /^([+-])(\d{2}):(\d{2})$/.exec(offset);
  const east = m ? (m[1] === '-' ? -1 : 1) * (+m[2] * 60 + +m[3]) : 0;
  const d = new Date(t + east * 60_000);
  const hm = `${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}`;
  if (!withDate) return hm;
  return `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())} ${hm}`;
}

/** "45 s", "12 min", "1 h 06 min", "2 d 3 h". */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return '—';
  const s = Math.max(0, Math.round(seconds));
  if (s < 60) return `${s} s`;
  const min = Math.round(s / 60);
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  if (h < 48) return `${h} h ${pad(min % 60)} min`;
  return `${Math.floor(h / 24)} d ${h % 24} h`;
}

// ——— numbers ———

const M_PER_MI = M_PER_FT * 5280;

/** Mission distances: km (metres under 1 km) or mi (feet under 0.1 mi). */
export function formatDistance(m: number | null | undefined, system: UnitSystem): string {
  if (m === null || m === undefined || !Number.isFinite(m)) return '—';
  const fmt = (x: number, digits: number) => x.toLocaleString('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits });
  if (system === 'us') {
    const mi = m / M_PER_MI;
    return mi < 0.1 ? `${fmt(m / M_PER_FT, 0)} ft` : `${fmt(mi, 2)} mi`;
  }
  return m < 1000 ? `${fmt(m, 0)} m` : `${fmt(m / 1000, 2)} km`;
}

/** A course or bearing, true: "307°" (0–359). */
export function formatCourse(deg: number | null | undefined): string {
  if (deg === null || deg === undefined || !Number.isFinite(deg)) return '—';
  return `${String(Math.round(((deg % 360) + 360) % 360) % 360).padStart(3, '0')}°`;
}

export function formatPercent(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return '—';
  return `${p.toFixed(0)} %`;
}

const COMPASS = ['N', 'NE', 'E', 'SE', 'S', 'SW', 'W', 'NW'];
/** "from 270° (W)". */
export function formatWindFrom(fromDeg: number): string {
  const i = Math.round((((fromDeg % 360) + 360) % 360) / 45) % 8;
  return `from ${formatCourse(fromDeg)} (${COMPASS[i]})`;
}

// ——— the charge chart ———

export interface ChargePoint {
  /** Minutes since departure. */
  tMin: number;
  socPct: number;
  /** What the drone does up to this point. */
  phase: 'start' | 'flight' | 'perch';
  label: string;
}

/**
 * Battery charge over the whole mission: a point at departure, one at the end of every leg (charge falls in
 * flight) and one at the end of every perch dwell (charge climbs). Perches pair with the legs that land on them,
 * by `toSpanId`.
 */
export function chargeSeries(plan: Pick<FeasiblePlan, 'legs' | 'perches'>): ChargePoint[] {
  const { legs, perches } = plan;
  if (legs.length === 0) return [];
  const out: ChargePoint[] = [{ tMin: 0, socPct: legs[0].socStartPct, phase: 'start', label: 'Departure' }];
  let t = 0;
  let nextPerch = 0;
  legs.forEach((leg, i) => {
    t += leg.durationS;
    // The contract sets toSpanId on every leg that ends at a perch; perches come in the same flight order.
    let perch: PlanPerch | undefined;
    if (leg.toSpanId != null) {
      const k = perches.findIndex((p, j) => j >= nextPerch && p.spanId === leg.toSpanId);
      perch = perches[k >= 0 ? k : nextPerch];
      if (perch) nextPerch = (k >= 0 ? k : nextPerch) + 1;
    }
    const where = perch ? `perch ${nextPerch}` : i === legs.length - 1 ? 'arrival' : `waypoint ${i + 1}`;
    out.push({ tMin: round2(t / 60), socPct: round2(leg.socEndPct), phase: 'flight', label: `Leg ${i + 1} to ${where}` });
    if (perch) {
      t += perch.dwellS;
      out.push({ tMin: round2(t / 60), socPct: round2(perch.socDepartPct), phase: 'perch', label: `Charging at perch ${nextPerch}` });
    }
  });
  return out;
}

const round2 = (x: number) => Math.round(x * 100) / 100;

// ——— the route ———

export interface RouteStop extends LatLon {
  kind: 'base' | 'perch' | 'target';
  name: string;
  perchIndex?: number;
}

/** Base, every perch point that has a position, target (and the base again on a return flight), in flight order. */
export function routeStops(plan: Pick<FeasiblePlan, 'legs' | 'perches' | 'returnToBase'>, base: LatLon, target: LatLon, returnToBase = plan.returnToBase ?? false): RouteStop[] {
  const stops: RouteStop[] = [{ ...base, kind: 'base', name: 'Base' }];
  let targetAdded = false;
  let perchIdx = 0;
  // Legs that carry their own end points give the exact order, the target visit included.
  if (plan.legs.length > 0 && plan.legs.every((l) => l.to)) {
    for (const leg of plan.legs) {
      const to = leg.to!;
      if (leg.toSpanId != null || to.kind === 'perch') {
        perchIdx += 1;
        stops.push({ lat: to.lat, lon: to.lon, kind: 'perch', name: `Perch ${perchIdx}`, perchIndex: perchIdx - 1 });
      } else if (!targetAdded && (to.kind === 'target' || near(to, target))) {
        targetAdded = true;
        stops.push({ ...target, kind: 'target', name: 'Target' });
      } else {
        stops.push({ lat: to.lat, lon: to.lon, kind: 'base', name: 'Base' });
      }
    }
    return stops;
  }
  // Otherwise the perches' own positions: outbound perches, target, return perches.
  const ordered = plan.perches.map((p, i) => ({ p, i })).filter(({ p }) => Number.isFinite(p.lat) && Number.isFinite(p.lon));
  const targetAfter = returnToBase ? targetPositionInLegs(plan) : ordered.length;
  ordered.forEach(({ p, i }, k) => {
    if (k === targetAfter && !targetAdded) {
      targetAdded = true;
      stops.push({ ...target, kind: 'target', name: 'Target' });
    }
    stops.push({ lat: p.lat!, lon: p.lon!, kind: 'perch', name: `Perch ${i + 1}`, perchIndex: i });
  });
  if (!targetAdded) stops.push({ ...target, kind: 'target', name: 'Target' });
  if (returnToBase) stops.push({ ...base, kind: 'base', name: 'Base' });
  return stops;
}

/** On a return flight, the target is reached by the first leg that does not end on a perch. */
function targetPositionInLegs(plan: Pick<FeasiblePlan, 'legs'>): number {
  let perchesBefore = 0;
  for (const leg of plan.legs) {
    if (leg.toSpanId == null) return perchesBefore;
    perchesBefore += 1;
  }
  return perchesBefore;
}

const near = (a: LatLon, b: LatLon) => Math.abs(a.lat - b.lat) < 1e-6 && Math.abs(a.lon - b.lon) < 1e-6;

export type RouteFeature = Feature<LineString | Point, { kind: 'route' | RouteStop['kind']; name: string }>;

/** The route line and a point per stop, for the map's GeoJSON source. */
export function routeGeoJson(stops: readonly RouteStop[]): FeatureCollection<LineString | Point, { kind: 'route' | RouteStop['kind']; name: string }> {
  const features: RouteFeature[] = [];
  if (stops.length >= 2) {
    features.push({ type: 'Feature', properties: { kind: 'route', name: 'Route' }, geometry: { type: 'LineString', coordinates: stops.map((s) => [s.lon, s.lat]) } });
  }
  for (const s of stops) features.push({ type: 'Feature', properties: { kind: s.kind, name: s.name }, geometry: { type: 'Point', coordinates: [s.lon, s.lat] } });
  return { type: 'FeatureCollection', features };
}

/** [west, south, east, north] around the points, or null. */
export function bboxOf(points: readonly LatLon[]): [number, number, number, number] | null {
  if (points.length === 0) return null;
  let w = Infinity, s = Infinity, e = -Infinity, n = -Infinity;
  for (const p of points) {
    w = Math.min(w, p.lon); e = Math.max(e, p.lon);
    s = Math.min(s, p.lat); n = Math.max(n, p.lat);
  }
  return [w, s, e, n];
}

export interface SvgRoute {
  width: number;
  height: number;
  route: string;
  stops: (RouteStop & { x: number; y: number })[];
  zones: { name: string; severity: 'exclude' | 'caution'; d: string }[];
  /** Length of the scale bar in px and the metres it stands for. */
  scale: { px: number; m: number };
}

/**
 * The route drawn as SVG for the printed brief: a local equirectangular projection (x scaled by cos φ of the
 * centre, fine at mission scale), fitted into width × height with a margin; zones that touch the box come along.
 */
export function svgRoute(
  stops: readonly RouteStop[],
  zones: readonly Feature<Polygon, { name: string; severity: 'exclude' | 'caution' }>[],
  width = 640,
  height = 400,
  margin = 28,
): SvgRoute | null {
  const box = bboxOf(stops);
  if (!box) return null;
  const [w, s, e, n] = box;
  const cosPhi = Math.cos((((s + n) / 2) * Math.PI) / 180);
  const spanX = Math.max((e - w) * cosPhi, 1e-6);
  const spanY = Math.max(n - s, 1e-6);
  const k = Math.min((width - 2 * margin) / spanX, (height - 2 * margin) / spanY);
  const ox = (width - spanX * k) / 2;
  const oy = (height - spanY * k) / 2;
  const project = (lon: number, lat: number) => ({ x: round2(ox + (lon - w) * cosPhi * k), y: round2(height - (oy + (lat - s) * k)) });
  const projected = stops.map((st) => ({ ...st, ...project(st.lon, st.lat) }));
  const route = projected.map((p, i) => `${i === 0 ? 'M' : 'L'}${p.x} ${p.y}`).join(' ');
  const zonePaths = zones
    .filter((z) => z.geometry.coordinates[0]?.some(([lon, lat]) => lon >= w - (e - w) && lon <= e + (e - w) && lat >= s - (n - s) && lat <= n + (n - s)))
    .map((z) => ({
      name: z.properties.name,
      severity: z.properties.severity,
      d: z.geometry.coordinates.map((ring) => ring.map(([lon, lat], i) => { const p = project(lon, lat); return `${i === 0 ? 'M' : 'L'}${p.x} ${p.y}`; }).join(' ') + ' Z').join(' '),
    }));
  // A scale bar of a round length near a fifth of the drawing: metres per degree of latitude ≈ 111 195 m.
  const mPerPx = 111_195 / k;
  const target = (width / 5) * mPerPx;
  const pow = 10 ** Math.floor(Math.log10(target));
  const nice = [1, 2, 5, 10].map((f) => f * pow).filter((v) => v <= target).pop() ?? pow;
  return { width, height, route, stops: projected, zones: zonePaths, scale: { px: round2(nice / mPerPx), m: nice } };
}

// ——— words ———

/** Why no route exists, in words a planner can act on (the server's sentence first, its figures when it gives them). */
export function infeasibleText(plan: InfeasiblePlan, system: UnitSystem): string[] {
  const lines: string[] = [];
  const gapM = plan.gap?.distanceM ?? plan.longestGapM ?? plan.gapM;
  const reachM = plan.gap?.reachM ?? plan.reachM;
  // A gap given by its figures is written here in the user's units (the server's sentence is in SI units and lists
  // the bridging spans, which follow below one by one).
  const byFigures = plan.reason === 'gap' && gapM !== undefined;
  const sentence = byFigures ? undefined : (plan.message ?? (plan.reason && /\s/.test(plan.reason) ? plan.reason : undefined));
  if (sentence) lines.push(sentence);
  if (!sentence) {
    switch (plan.reason) {
      case 'gap':
      case 'out-of-reach':
      case 'no-perch-in-reach':
        lines.push(gapM !== undefined
          ? `No perch bridges a gap of ${formatDistance(gapM, system)}${reachM !== undefined ? `; the drone reaches ${formatDistance(reachM, system)} on one charge` : ''}.`
          : 'No chain of approved, perchable spans bridges the distance within the drone’s reach.');
        break;
      case 'zone':
      case 'zone-cut':
        lines.push(`An active exclude zone${plan.zone?.name ?? plan.zoneName ? ` (${plan.zone?.name ?? plan.zoneName})` : ''} cuts the only leg.`);
        break;
      case 'wind':
        lines.push(`The wind${plan.windSpeedMps !== undefined ? ` of ${plan.windSpeedMps} m/s` : ''} makes a leg unflyable: the crosswind exceeds the airspeed or the wind exceeds the drone’s limit.`);
        break;
      default:
        lines.push('No route satisfies the drone’s reach, the zones and the wind.');
    }
  } else if (gapM !== undefined && reachM !== undefined && !sentence.includes('reach')) {
    lines.push(`Longest gap ${formatDistance(gapM, system)} against a reach of ${formatDistance(reachM, system)}.`);
  }
  if (plan.detail && plan.detail !== sentence) lines.push(plan.detail);
  for (const b of plan.blockedSpans ?? []) {
    const name = [b.lineName, b.label].filter(Boolean).join(' ') || 'A span';
    const why = b.reason ?? (b.failingGates?.length ? `fails ${b.failingGates.join(', ')}` : b.status ? `is ${b.status}` : 'is not perchable');
    lines.push(`${name} would bridge it but ${why}.`);
  }
  return lines;
}

/** One stale reason in words. */
export function staleReasonText(r: StaleReason): string {
  if (typeof r === 'string') return r;
  return r.message ?? (r.code ? r.code.replace(/[-_]/g, ' ') : 'The plan no longer holds');
}
