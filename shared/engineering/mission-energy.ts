// Mission energy of a battery drone: leg energy, usable energy above the reserve, recharge dwell on a perch
// following the line's hourly load, and the conductor's height at the perch point. SI units (energy in Wh).

export interface MissionDrone {
  batteryWh: number;
  /** State of charge kept in reserve, percent. */
  reservePercent: number;
  /** True airspeed at cruise, m/s. */
  cruiseSpeedMps: number;
  windLimitMps: number;
  /** Electrical power drawn at cruise airspeed, W. */
  cruisePowerW: number;
  /** Energy to approach, dock on and leave a perch, Wh (counted on the leg that lands there). */
  perchManoeuvreWh: number;
  /** Battery charge efficiency, 0..1. */
  chargeEfficiency: number;
  /** Charge-to policy: every perch charges the battery to this state of charge, percent. */
  chargeToPercent: number;
}

/** Default battery charge efficiency at moderate C-rate (common practice). */
export const DEFAULT_CHARGE_EFFICIENCY = 0.95;
export const DEFAULT_CHARGE_TO_PERCENT = 100;

// Energy balance: the energy above the reserve at a state of charge, Wh = E_batt·(SOC − reserve)/100.
export function usableWh(drone: Pick<MissionDrone, 'batteryWh' | 'reservePercent'>, socPercent: number): number {
  return Math.max(0, (drone.batteryWh * (socPercent - drone.reservePercent)) / 100);
}

export interface LegEnergy {
  durationS: number;
  energyWh: number;
}

// Leg energy (engineering.md §10): t = d/GS; E = P_cruise·t (+ the perch manoeuvre when the leg ends on a perch).
export function legEnergy(params: { distanceM: number; groundSpeedMps: number; cruisePowerW: number; perchManoeuvreWh?: number }): LegEnergy {
  if (!(params.groundSpeedMps > 0)) return { durationS: Number.POSITIVE_INFINITY, energyWh: Number.POSITIVE_INFINITY };
  const durationS = params.distanceM / params.groundSpeedMps;
  return { durationS, energyWh: (params.cruisePowerW * durationS) / 3600 + (params.perchManoeuvreWh ?? 0) };
}

// Still-air reach from a state of charge: usable energy / P_cruise × airspeed, m.
export function calmReachM(drone: MissionDrone, socPercent: number, perchAtEnd = false): number {
  const wh = usableWh(drone, socPercent) - (perchAtEnd ? drone.perchManoeuvreWh : 0);
  return Math.max(0, (wh * 3600 * drone.cruiseSpeedMps) / drone.cruisePowerW);
}

const HOUR_MS = 3_600_000;
const DAY_MS = 24 * HOUR_MS;

export interface DwellResult {
  /** Seconds on the perch; Infinity when the perch never harvests. */
  dwellS: number;
  /** Harvest after the converter in the hour of arrival, W. */
  harvestAtArrivalW: number;
  /** Energy put into the battery, Wh. */
  storedWh: number;
}

/** Local hour of day (0..23) of an instant for a fixed UTC offset in minutes. */
export function localHour(atMs: number, utcOffsetMin: number): number {
  const local = atMs + utcOffsetMin * 60_000;
  return Math.floor((((local % DAY_MS) + DAY_MS) % DAY_MS) / HOUR_MS);
}

// Recharge dwell (engineering.md §8 and §10): the battery gains harvestW(hour)·η_batt; the time to store
// `energyWh` integrates the hourly harvest (00:00 … 23:00 local, constant within each hour) from the arrival
// instant across hour boundaries (and whole days when needed).
export function dwellS(params: {
  arriveAtMs: number;
  utcOffsetMin: number;
  /** Harvest after the converter for each local hour 0..23, W. */
  hourlyHarvestW: readonly number[];
  chargeEfficiency: number;
  /** Energy to put into the battery, Wh. */
  energyWh: number;
}): DwellResult {
  const { hourlyHarvestW: hw, chargeEfficiency: eta } = params;
  const startHour = localHour(params.arriveAtMs, params.utcOffsetMin);
  const harvestAtArrivalW = hw[startHour] ?? 0;
  let need = Math.max(0, params.energyWh);
  if (need === 0) return { dwellS: 0, harvestAtArrivalW, storedWh: 0 };
  const dayWh = hw.reduce((s, w) => s + Math.max(0, w) * eta, 0); // Wh stored over 24 h (each hour 1 h long)
  if (!(dayWh > 0)) return { dwellS: Number.POSITIVE_INFINITY, harvestAtArrivalW, storedWh: 0 };
  const stored = need;
  let t = 0;
  // Whole days first: each stores dayWh whatever the starting hour.
  let days = Math.floor(need / dayWh);
  if (days > 0 && need - days * dayWh <= 1e-9) days -= 1; // exactly whole days: finish within the last day
  need -= days * dayWh;
  t += days * 86_400;
  const local = params.arriveAtMs + params.utcOffsetMin * 60_000 + t * 1000;
  let hour = localHour(local, 0);
  let leftInHourS = (HOUR_MS - ((((local % HOUR_MS) + HOUR_MS) % HOUR_MS))) / 1000;
  for (let guard = 0; guard < 24 * 3; guard++) {
    const p = Math.max(0, hw[hour] ?? 0) * eta;
    const canStore = (p * leftInHourS) / 3600;
    if (p > 0 && canStore >= need) {
      t += (need * 3600) / p;
      return { dwellS: t, harvestAtArrivalW, storedWh: stored };
    }
    need -= canStore;
    t += leftInHourS;
    hour = (hour + 1) % 24;
    leftInHourS = 3600;
  }
  return { dwellS: t, harvestAtArrivalW, storedWh: stored };
}

// Conductor height at a point x along the span: the straight chord between the attachment heights less the
// parabolic sag there, sag(x) = 4·D·x·(S − x)/S² with D the mid-span sag (engineering.md §6 and §10).
export function conductorHeightAtM(params: { fromHeightM: number; toHeightM: number; spanLengthM: number; xM: number; midSpanSagM: number }): number {
  const S = params.spanLengthM;
  if (!(S > 0)) return Math.min(params.fromHeightM, params.toHeightM);
  const x = Math.min(S, Math.max(0, params.xM));
  const chord = params.fromHeightM + ((params.toHeightM - params.fromHeightM) * x) / S;
  return chord - (4 * params.midSpanSagM * x * (S - x)) / (S * S);
}
