// Wind triangle of air navigation: heading and ground speed for a desired course in a steady wind.

export interface WindTriangleInput {
  /** True airspeed, m/s. */
  airspeedMps: number;
  /** Wind speed, m/s. */
  windSpeedMps: number;
  /** Direction the wind blows FROM, degrees true (0 = from the north). */
  windFromDeg: number;
  /** Desired course over the ground, degrees true. */
  courseDeg: number;
  /** The airframe's wind limit, m/s; a stronger wind makes every leg unflyable. */
  windLimitMps?: number;
}

export interface WindTriangleResult {
  flyable: boolean;
  /** Why the leg cannot be flown, in words; null when flyable. */
  reason: string | null;
  /** Wind correction angle, degrees (positive = heading to the right of the course). */
  windCorrectionDeg: number;
  headingDeg: number;
  groundSpeedMps: number;
  /** Wind component across the course, m/s (positive from the right). */
  crosswindMps: number;
  /** Wind component along the course, m/s (positive = headwind). */
  headwindMps: number;
}

const RAD = Math.PI / 180;
const to360 = (deg: number) => ((deg % 360) + 360) % 360;

// Wind triangle (FAA Pilot's Handbook of Aeronautical Knowledge, navigation chapter):
// WCA = asin(W·sin(θw − θc)/V), GS = V·cos(WCA) − W·cos(θw − θc); not flyable when |W·sin(θw − θc)| ≥ V.
export function windTriangle(input: WindTriangleInput): WindTriangleResult {
  const V = input.airspeedMps;
  const W = Math.max(0, input.windSpeedMps);
  const rel = (input.windFromDeg - input.courseDeg) * RAD;
  const crosswind = W * Math.sin(rel);
  const headwind = W * Math.cos(rel);
  const base = { crosswindMps: crosswind, headwindMps: headwind };
  if (input.windLimitMps !== undefined && W > input.windLimitMps) {
    return { ...base, flyable: false, reason: `wind ${W.toFixed(1)} m/s is above the drone's wind limit of ${input.windLimitMps.toFixed(1)} m/s`, windCorrectionDeg: 0, headingDeg: to360(input.courseDeg), groundSpeedMps: 0 };
  }
  if (!(V > 0) || Math.abs(crosswind) >= V) {
    return { ...base, flyable: false, reason: `crosswind ${Math.abs(crosswind).toFixed(1)} m/s is not less than the airspeed of ${V.toFixed(1)} m/s`, windCorrectionDeg: 0, headingDeg: to360(input.courseDeg), groundSpeedMps: 0 };
  }
  const wca = Math.asin(crosswind / V);
  const gs = V * Math.cos(wca) - headwind;
  if (!(gs > 0)) {
    return { ...base, flyable: false, reason: `headwind ${headwind.toFixed(1)} m/s leaves no ground speed at an airspeed of ${V.toFixed(1)} m/s`, windCorrectionDeg: wca / RAD, headingDeg: to360(input.courseDeg + wca / RAD), groundSpeedMps: 0 };
  }
  return { ...base, flyable: true, reason: null, windCorrectionDeg: wca / RAD, headingDeg: to360(input.courseDeg + wca / RAD), groundSpeedMps: gs };
}

/** The highest ground speed any course can have in this wind (a straight tailwind), m/s. */
export function maxGroundSpeedMps(airspeedMps: number, windSpeedMps: number): number {
  return airspeedMps + Math.max(0, windSpeedMps);
}
