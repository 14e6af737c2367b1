// Calculator inputs, shared by the calculator page (live preview) and the server (authority). SI units.
import { z } from 'zod';

const positive = (what: string, max: number) =>
  z.number({ message: `Enter ${what} as a number` }).gt(0, `${what} must be above 0`).max(max, `${what} must be at most ${max}`);
const nonNegative = (what: string, max: number) =>
  z.number({ message: `Enter ${what} as a number` }).min(0, `${what} must be 0 or more`).max(max, `${what} must be at most ${max}`);
const between = (what: string, min: number, max: number) =>
  z.number({ message: `Enter ${what} as a number` }).min(min, `${what} must be at least ${min}`).max(max, `${what} must be at most ${max}`);

/** Core and winding of a split-core harvester. */
export const harvesterCoreSchema = z.object({
  turns: z.number({ message: 'Enter the turns as a number' }).int('Turns must be a whole number').min(1, 'Turns must be at least 1').max(100_000, 'Turns must be at most 100000'),
  coreAreaMm2: positive('Core area', 1_000_000),
  pathLengthMm: positive('Magnetic path length', 100_000),
  relativePermeability: between('Relative permeability', 1, 10_000_000),
  airGapMm: nonNegative('Air gap', 10_000),
  saturationT: positive('Saturation flux density', 10),
  windingResistanceOhm: nonNegative('Winding resistance', 1_000_000).optional(),
});
export type HarvesterCoreInput = z.infer<typeof harvesterCoreSchema>;

export const harvestCalcSchema = z.object({
  currentA: nonNegative('Line current', 1_000_000),
  frequencyHz: positive('Frequency', 100_000),
  harvester: harvesterCoreSchema,
  loadOhm: positive('Load resistance', 1e9).optional(),
});
export type HarvestCalcInput = z.infer<typeof harvestCalcSchema>;

export interface HarvestCalcResult {
  powerW: number;
  optimalLoadOhm: number;
  loadVoltageRmsV: number;
  peakFluxDensityT: number;
  saturated: boolean;
}

export const thermalConductorSchema = z
  .object({
    diameterMm: positive('Conductor diameter', 1000),
    resistanceLowOhmPerM: positive('Resistance at the low temperature', 10),
    tempLowC: between('Low tabulated temperature', -50, 300),
    resistanceHighOhmPerM: positive('Resistance at the high temperature', 10),
    tempHighC: between('High tabulated temperature', -50, 300),
    emissivity: between('Emissivity', 0, 1),
    absorptivity: between('Absorptivity', 0, 1),
  })
  .refine((c) => c.tempHighC > c.tempLowC, { path: ['tempHighC'], message: 'The high temperature must be above the low one' });

export const thermalWeatherSchema = z.object({
  ambientC: between('Ambient temperature', -60, 60),
  windSpeedMps: nonNegative('Wind speed', 60),
  windAngleDeg: between('Wind angle', 0, 180),
  elevationM: between('Elevation', -500, 9000),
  latitudeDeg: between('Latitude', -90, 90),
  lineAzimuthDeg: between('Line azimuth', 0, 360),
  dayOfYear: z.number({ message: 'Enter the day of year as a number' }).int('Day of year must be a whole number').min(1, 'Day of year must be 1–366').max(366, 'Day of year must be 1–366'),
  solarHour: between('Solar hour', 0, 24),
  atmosphere: z.enum(['clear', 'industrial'], { message: 'Atmosphere must be "clear" or "industrial"' }),
});

export const conductorThermalCalcSchema = z
  .object({
    conductor: thermalConductorSchema,
    weather: thermalWeatherSchema,
    currentA: nonNegative('Current', 100_000).optional(),
    maxConductorC: between('Maximum conductor temperature', -50, 400).optional(),
  })
  .refine((v) => v.currentA !== undefined || v.maxConductorC !== undefined, {
    path: ['currentA'],
    message: 'Give currentA (for the conductor temperature), maxConductorC (for the ampacity) or both',
  })
  .refine((v) => v.maxConductorC === undefined || v.maxConductorC > v.weather.ambientC, {
    path: ['maxConductorC'],
    message: 'The maximum conductor temperature must be above the ambient temperature',
  });
export type ConductorThermalCalcInput = z.infer<typeof conductorThermalCalcSchema>;

export interface ConductorThermalCalcResult {
  ampacityA?: number;
  conductorTempC?: number;
  heat: { convectionWPerM: number; radiationWPerM: number; solarWPerM: number };
}

export const benchTestCalcSchema = z.object({
  fixtureTurns: z.number({ message: 'Enter the fixture turns as a number' }).int('Fixture turns must be a whole number').min(1, 'Fixture turns must be at least 1').max(100_000, 'Fixture turns must be at most 100000'),
  fixtureCurrentA: nonNegative('Fixture current', 100_000),
  loadVoltageRmsV: nonNegative('Load voltage', 100_000),
  loadOhm: positive('Load resistance', 1e9),
});
export type BenchTestCalcInput = z.infer<typeof benchTestCalcSchema>;

export interface BenchTestCalcResult {
  equivalentLineCurrentA: number;
  powerW: number;
}
