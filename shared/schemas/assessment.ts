// Equipment profiles, bench tests, scoring settings and the assessment as the API carries them. SI units.
import { z } from 'zod';
import { harvesterCoreSchema } from './calc.ts';
import type { DetailPart } from '../engineering/assessment.ts';

const num = (what: string) => z.number({ message: `Enter ${what} as a number` });
const name = z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters');

export const CORE_MATERIALS = ['si-steel', 'nanocrystalline', 'ferrite'] as const;

const harvesterProfileFields = harvesterCoreSchema.extend({
  name,
  coreMaterial: z.enum(CORE_MATERIALS, { message: 'Pick a core material' }),
  windingResistanceOhm: num('Winding resistance').min(0, 'Winding resistance must be 0 or more').max(1_000_000),
  converterEfficiency: num('Converter efficiency').gt(0, 'Converter efficiency must be above 0').max(1, 'Converter efficiency is at most 1'),
  massKg: num('Mass').gt(0, 'Mass must be above 0').max(100),
  gripperMinDiameterMm: num('Smallest gripper diameter').gt(0, 'Must be above 0').max(500),
  gripperMaxDiameterMm: num('Largest gripper diameter').gt(0, 'Must be above 0').max(500),
  contactTempLimitC: num('Contact temperature limit').min(0).max(400),
  usefulMinHarvestW: num('Useful minimum harvest').gt(0, 'Must be above 0').max(100_000),
  active: z.boolean().default(true),
  sortOrder: z.number().int().min(0).max(10_000).default(0),
});

const gripperOrdered = (p: { gripperMinDiameterMm?: number; gripperMaxDiameterMm?: number }) =>
  p.gripperMinDiameterMm === undefined || p.gripperMaxDiameterMm === undefined || p.gripperMaxDiameterMm >= p.gripperMinDiameterMm;
const gripperIssue = { path: ['gripperMaxDiameterMm'], message: 'The largest gripper diameter must be at least the smallest' };

export const harvesterProfileCreateSchema = harvesterProfileFields.refine(gripperOrdered, gripperIssue);
export type HarvesterProfileCreateInput = z.infer<typeof harvesterProfileCreateSchema>;
/** An edit carries the version it was made from; a stale one gets 409. */
export const harvesterProfileUpdateSchema = harvesterProfileFields
  .partial()
  .extend({ version: z.number().int().min(1) })
  .refine(gripperOrdered, gripperIssue);
export type HarvesterProfileUpdateInput = z.infer<typeof harvesterProfileUpdateSchema>;

const droneCruisePower = num('Cruise power').gt(0, 'Cruise power must be above 0').max(100_000);
const dronePerchManoeuvre = num('Perch manoeuvre energy').min(0, 'Perch manoeuvre energy must be 0 or more').max(100_000);
const droneChargeEfficiency = num('Charge efficiency').gt(0, 'Charge efficiency is above 0 and at most 1').max(1, 'Charge efficiency is above 0 and at most 1');
const droneChargeTo = num('Charge-to level').gt(0, 'Charge-to level is above 0 and at most 100 %').max(100, 'Charge-to level is above 0 and at most 100 %');
const droneProfileBase = z.object({
  name,
  batteryWh: num('Battery energy').gt(0, 'Battery energy must be above 0').max(100_000),
  reservePercent: num('Reserve').min(0, 'Reserve is 0–99 %').max(99, 'Reserve is 0–99 %'),
  cruiseSpeedMps: num('Cruise speed').gt(0, 'Cruise speed must be above 0').max(200),
  windLimitMps: num('Wind limit').gt(0, 'Wind limit must be above 0').max(100),
  payloadKg: num('Payload').gt(0, 'Payload must be above 0').max(1000),
  approachClearanceM: num('Approach clearance').min(0).max(100),
  cruisePowerW: droneCruisePower,
  perchManoeuvreWh: dronePerchManoeuvre,
  chargeEfficiency: droneChargeEfficiency,
  chargeToPercent: droneChargeTo,
  active: z.boolean(),
  sortOrder: z.number().int().min(0).max(10_000),
});
const droneProfileFields = droneProfileBase.extend({
  cruisePowerW: droneCruisePower.default(300),
  perchManoeuvreWh: dronePerchManoeuvre.default(3),
  chargeEfficiency: droneChargeEfficiency.default(0.95),
  chargeToPercent: droneChargeTo.default(100),
  active: z.boolean().default(true),
  sortOrder: z.number().int().min(0).max(10_000).default(0),
});
export const droneProfileCreateSchema = droneProfileFields;
export type DroneProfileCreateInput = z.infer<typeof droneProfileCreateSchema>;
/** An edit changes only the fields it carries (no defaults fill the others in). */
export const droneProfileUpdateSchema = droneProfileBase.partial().extend({ version: z.number().int().min(1) });
export type DroneProfileUpdateInput = z.infer<typeof droneProfileUpdateSchema>;

export const benchTestCreateSchema = z.object({
  fixtureTurns: num('Fixture turns').int('Fixture turns must be a whole number').min(1, 'Fixture turns must be at least 1').max(100_000),
  fixtureCurrentA: num('Fixture current').min(0, 'Fixture current must be 0 or more').max(100_000),
  loadVoltageRmsV: num('Load voltage').min(0, 'Load voltage must be 0 or more').max(100_000),
  loadOhm: num('Load resistance').gt(0, 'Load resistance must be above 0').max(1e9),
  frequencyHz: num('Frequency').gt(0, 'Frequency must be above 0').max(100_000).default(60),
  note: z.string().trim().max(2000).nullable().optional(),
});
export type BenchTestCreateInput = z.infer<typeof benchTestCreateSchema>;

export const fitGapSchema = z.object({
  /** Apply the fitted gap to the profile (a new profile version); otherwise only report it. */
  apply: z.boolean().default(false),
  version: z.number().int().min(1).optional(),
});

const fraction = (what: string) => num(what).min(0, `${what} is 0–1`).max(1, `${what} is 0–1`);
const weight = num('Weight').min(0, 'Weights are 0 or more').max(1000);

/** Scoring weights and limits (see shared/engineering/assessment.ts ScoringSettings). */
export const scoringSettingsSchema = z
  .object({
    weights: z.object({
      'power-margin': weight,
      'clearance-margin': weight,
      hazards: weight,
      'span-exposure': weight,
      'data-quality': weight,
    }),
    ampacityMaxConductorC: num('Ampacity temperature').gt(0).max(400),
    powerMarginFullRatio: num('Power margin ratio').gt(1, 'The full-margin ratio must be above 1').max(1000),
    clearanceMarginFullM: num('Clearance margin').gt(0, 'Must be above 0').max(100),
    hazardPenalty: z.object({ low: fraction('Low hazard penalty'), medium: fraction('Medium hazard penalty'), high: fraction('High hazard penalty') }),
    cautionZonePenalty: fraction('Caution zone penalty'),
    spanLengthIdealM: z.object({ min: num('Ideal span length (min)').gt(0).max(10_000), max: num('Ideal span length (max)').gt(0).max(10_000) }),
    spanLengthMaxM: num('Longest span').gt(0).max(20_000),
    surveyFreshDays: num('Fresh survey age').min(0).max(36_500),
    surveyStaleDays: num('Stale survey age').gt(0).max(36_500),
    ampacityFlagFactor: fraction('Ampacity flag factor'),
    batteryEfficiency: num('Battery efficiency').gt(0, 'Must be above 0').max(1, 'At most 1'),
  })
  .refine((s) => Object.values(s.weights).some((w) => w > 0), { path: ['weights'], message: 'At least one weight must be above 0' })
  .refine((s) => s.spanLengthIdealM.max >= s.spanLengthIdealM.min, { path: ['spanLengthIdealM', 'max'], message: 'The ideal maximum must be at least the minimum' })
  .refine((s) => s.spanLengthMaxM > s.spanLengthIdealM.max, { path: ['spanLengthMaxM'], message: 'The longest span must exceed the ideal maximum' })
  .refine((s) => s.surveyStaleDays > s.surveyFreshDays, { path: ['surveyStaleDays'], message: 'The stale age must exceed the fresh age' });
export type ScoringSettingsInput = z.infer<typeof scoringSettingsSchema>;

export const scoringSettingsUpdateSchema = z.object({
  /** The version the edit was made from; a stale one gets 409. */
  version: z.number().int().min(1),
  settings: scoringSettingsSchema,
});

// ——— API shapes ———

export interface HarvesterProfileView extends Omit<HarvesterProfileCreateInput, 'windingResistanceOhm'> {
  id: string;
  windingResistanceOhm: number;
  version: number;
  createdAt: string;
  updatedAt: string;
}

export interface DroneProfileView extends DroneProfileCreateInput {
  id: string;
  version: number;
  createdAt: string;
  updatedAt: string;
}

export interface BenchTestView {
  id: string;
  harvesterProfileId: string;
  fixtureTurns: number;
  fixtureCurrentA: number;
  loadVoltageRmsV: number;
  loadOhm: number;
  frequencyHz: number;
  note: string | null;
  createdAt: string;
  /** Fixture ampere-turns and V²/R. */
  equivalentLineCurrentA: number;
  powerW: number;
  /** The profile's model power at this current, frequency and load, and measured − model. */
  modelPowerW: number;
  deviationW: number;
  deviationPercent: number | null;
}

export interface FitGapResult {
  airGapMm: number;
  previousAirGapMm: number;
  rmsErrorW: number;
  previousRmsErrorW: number;
  points: number;
  applied: boolean;
  profile: HarvesterProfileView;
}

export interface ScoringSettingsView {
  version: number;
  settings: ScoringSettingsInput;
  createdAt: string;
  createdById: string | null;
}

export interface JobView {
  id: string;
  kind: string;
  state: 'queued' | 'running' | 'done' | 'failed';
  done: number;
  total: number;
  reason: string;
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
}

export interface GateView {
  id: string;
  passed: boolean;
  blocking: boolean;
  detail: string;
  /** The detail as text and SI quantities (absent on assessments stored before it existed: show `detail`). */
  parts?: DetailPart[];
}
export interface FactorView {
  id: string;
  value: number;
  weight: number;
  contribution: number;
}

/** The `assessment` field of a span (api.md) plus the extra figures the span page shows. */
export interface SpanAssessmentView {
  perchable: boolean;
  score: number;
  gates: GateView[];
  factors: FactorView[];
  harvestW: number;
  harvestMinW: number;
  harvestPeakW: number;
  /** Null when nothing is harvested (never recharges). */
  chargeTimeMin: number | null;
  conductorTempC: number;
  ampacityA: number;
  codeClearanceM: number;
  approachDistanceM: number;
  methodVersion: string;
  settingsVersion: number;
  harvesterProfileId: string;
  harvesterVersion: number;
  droneProfileId: string;
  droneVersion: number;
  computedAt: string;
  /** Which load current the harvest figures rest on: a typed estimate (the span's or the line's) or a metered month. */
  loadSource: LoadSourceView;
}

export interface LoadSourceView {
  kind: 'span-estimate' | 'line-estimate' | 'measured';
  /** YYYY-MM of the metered month when `kind` is `measured`. */
  month: string | null;
}

const MONTH_NAMES = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/** How a harvest figure names its load source: "measured, December 2026" or "typed estimate (the line's)". */
export function loadSourceLabel(s: LoadSourceView): string {
  if (s.kind === 'measured' && s.month) return `measured, ${MONTH_NAMES[Number(s.month.slice(5, 7)) - 1]} ${s.month.slice(0, 4)}`;
  return s.kind === 'span-estimate' ? "typed estimate (this span's)" : "typed estimate (the line's)";
}

/** The stored inputs' load source (`span`, `line` or `series YYYY-MM`) as the view says it. */
export function loadSourceOf(stored: unknown): LoadSourceView {
  const m = typeof stored === 'string' ? /^series (\d{4}-\d{2})$/.exec(stored) : null;
  if (m) return { kind: 'measured', month: m[1] };
  return { kind: stored === 'span' ? 'span-estimate' : 'line-estimate', month: null };
}

export interface HarvestCurveView {
  spanId: string;
  harvesterProfileId: string;
  frequencyHz: number;
  saturationOnsetA: number;
  points: { currentA: number; powerW: number; saturated: boolean }[];
  loadCurrentA: { min: number; typical: number; peak: number };
  harvestW: { min: number; typical: number; peak: number };
  /** Power over the day from the line's 24-hour load profile; null when the line has none. */
  daily: { hour: number; currentA: number; powerW: number }[] | null;
  /** Where the currents of the day come from: the line's metered series for this month, or its estimate. */
  loadSource?: 'series' | 'estimate';
  /** YYYY-MM of the metered month when `loadSource` is `series`. */
  loadMonth?: string | null;
}
