// Invented demonstration harvester and drone profiles (fictional products), sized to the facts of the trade:
// a ~700 A transmission line, >60 W from a closed drone-portable core, ~1 h recharge, <0.5 W with the core open,
// harvester mass about half the drone's payload (common practice, no published source).
import type { HarvesterProfile } from './ct-harvester.ts';

export interface DroneProfile {
  id: string;
  name: string;
  batteryWh: number;
  /** State of charge kept in reserve, percent; a recharge restores (100 − reserve) %. */
  reservePercent: number;
  cruiseSpeedMps: number;
  windLimitMps: number;
  payloadKg: number;
  /** Clear height below the conductor the airframe needs to approach and perch, m. */
  approachClearanceM: number;
  /** Electrical power at cruise airspeed, W. */
  cruisePowerW: number;
  /** Energy to approach, dock on and leave a perch, Wh. */
  perchManoeuvreWh: number;
  /** Battery charge efficiency, 0..1. */
  chargeEfficiency: number;
  /** Charge-to policy on a perch, percent. */
  chargeToPercent: number;
}

/** Grain-oriented Si-steel split core: B_sat 1.8 T design limit (datasheet value), lapped faces ≈ 25 µm each. */
export const CLAMP_S: HarvesterProfile = {
  id: 'clamp-s',
  name: 'Roost clamp S',
  coreMaterial: 'si-steel',
  turns: 480,
  coreAreaMm2: 260,
  pathLengthMm: 190,
  relativePermeability: 8000,
  airGapMm: 0.05,
  saturationT: 1.8,
  windingResistanceOhm: 1.2,
  converterEfficiency: 0.9,
  massKg: 1.2,
  gripperMinDiameterMm: 12,
  gripperMaxDiameterMm: 36,
  contactTempLimitC: 90,
  usefulMinHarvestW: 10,
};

/** Nanocrystalline split core: B_sat 1.2 T (datasheet value), so a larger section for the same power. */
export const CLAMP_R: HarvesterProfile = {
  id: 'clamp-r',
  name: 'Roost clamp R',
  coreMaterial: 'nanocrystalline',
  turns: 420,
  coreAreaMm2: 520,
  pathLengthMm: 210,
  relativePermeability: 30000,
  airGapMm: 0.03,
  saturationT: 1.2,
  windingResistanceOhm: 1.0,
  converterEfficiency: 0.92,
  massKg: 1.6,
  gripperMinDiameterMm: 14,
  gripperMaxDiameterMm: 40,
  contactTempLimitC: 100,
  usefulMinHarvestW: 15,
};

/** Gap standing in for a core whose halves have not closed around the conductor, mm. */
export const OPEN_CORE_GAP_MM = 50;

// A core that does not close the magnetic loop behaves as one with a very large gap (magnetic-circuit model).
export function openCoreVariant(profile: HarvesterProfile, gapMm = OPEN_CORE_GAP_MM): HarvesterProfile {
  return { ...profile, id: `${profile.id}-open`, name: `${profile.name} (open)`, airGapMm: gapMm };
}

/** The Roost clamp S coil with its core left open: the demonstration of why the loop must close. */
export const CLAMP_S_OPEN: HarvesterProfile = openCoreVariant(CLAMP_S);

export const LIGHT_QUAD: DroneProfile = {
  id: 'light-quad',
  name: 'Light quad',
  batteryWh: 100,
  reservePercent: 20,
  cruiseSpeedMps: 12,
  windLimitMps: 12,
  payloadKg: 2.4,
  approachClearanceM: 3,
  // 300 W at 12 m/s: about 40 Wh per 10 km in still air (invented, sized like the worked example of engineering.md §10).
  cruisePowerW: 300,
  perchManoeuvreWh: 3,
  chargeEfficiency: 0.95,
  chargeToPercent: 100,
};

export const HEAVY_HEX: DroneProfile = {
  id: 'heavy-hex',
  name: 'Heavy hex',
  batteryWh: 160,
  reservePercent: 25,
  cruiseSpeedMps: 14,
  windLimitMps: 15,
  payloadKg: 3.2,
  approachClearanceM: 4,
  cruisePowerW: 420,
  perchManoeuvreWh: 4.5,
  chargeEfficiency: 0.95,
  chargeToPercent: 95,
};

export const DEMO_HARVESTERS: readonly HarvesterProfile[] = [CLAMP_S, CLAMP_R, CLAMP_S_OPEN];
export const DEMO_DRONES: readonly DroneProfile[] = [LIGHT_QUAD, HEAVY_HEX];
