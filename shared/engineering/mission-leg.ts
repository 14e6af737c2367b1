// One straight mission leg: geodesic course and distance on WGS84 (GeographicLib), ground speed from the wind
// triangle, time and energy at cruise power. SI units.
import { geodesicInverse } from './geodesic.ts';
import { windTriangle } from './wind-triangle.ts';
import { legEnergy, usableWh, type MissionDrone } from './mission-energy.ts';

export interface Wind {
  speedMps: number;
  /** Direction the wind blows from, degrees true. */
  fromDeg: number;
}

export const CALM: Wind = { speedMps: 0, fromDeg: 0 };

export interface LegFigures {
  /** True when the leg can be flown in this wind with the energy available. */
  ok: boolean;
  /** 'wind' (unflyable in this wind) or 'energy' (beyond reach) when not ok. */
  failure: 'wind' | 'energy' | null;
  /** Why not, in words. */
  failureText: string | null;
  distanceM: number;
  courseDeg: number;
  headingDeg: number;
  windCorrectionDeg: number;
  groundSpeedMps: number;
  durationS: number;
  energyWh: number;
  socStartPct: number;
  socEndPct: number;
}

// Karney geodesic (GeographicLib) + wind triangle (FAA PHAK) + E = P_cruise·d/GS (+ perch manoeuvre), engineering.md §7 and §10.
export function evaluateLeg(
  from: { lat: number; lon: number },
  to: { lat: number; lon: number },
  socStartPct: number,
  endsOnPerch: boolean,
  drone: MissionDrone,
  wind: Wind,
): LegFigures {
  const g = geodesicInverse({ latDeg: from.lat, lonDeg: from.lon }, { latDeg: to.lat, lonDeg: to.lon });
  const w = windTriangle({ airspeedMps: drone.cruiseSpeedMps, windSpeedMps: wind.speedMps, windFromDeg: wind.fromDeg, courseDeg: g.azimuthDeg, windLimitMps: drone.windLimitMps });
  const base = { distanceM: g.lengthM, courseDeg: g.azimuthDeg, headingDeg: w.headingDeg, windCorrectionDeg: w.windCorrectionDeg, groundSpeedMps: w.groundSpeedMps, socStartPct };
  if (!w.flyable) {
    return { ...base, ok: false, failure: 'wind', failureText: w.reason, durationS: Number.POSITIVE_INFINITY, energyWh: Number.POSITIVE_INFINITY, socEndPct: Number.NEGATIVE_INFINITY };
  }
  const e = legEnergy({ distanceM: g.lengthM, groundSpeedMps: w.groundSpeedMps, cruisePowerW: drone.cruisePowerW, perchManoeuvreWh: endsOnPerch ? drone.perchManoeuvreWh : 0 });
  const socEndPct = socStartPct - (100 * e.energyWh) / drone.batteryWh;
  const available = usableWh(drone, socStartPct);
  const ok = e.energyWh <= available + 1e-9;
  return {
    ...base,
    ok,
    failure: ok ? null : 'energy',
    failureText: ok ? null : `needs ${e.energyWh.toFixed(1)} Wh; ${available.toFixed(1)} Wh are above the reserve`,
    durationS: e.durationS,
    energyWh: e.energyWh,
    socEndPct,
  };
}
