// Perch missions: the plan request (api.md "Missions"). SI units on the wire; times ISO 8601 with their offset.
import { z } from 'zod';

// zod 4 numbers refuse NaN and ±Infinity.
const finite = (what: string) => z.number({ error: `${what} must be a finite number` });

export const latLonSchema = z.object(
  {
    lat: finite('latitude').min(-90, { error: 'latitude is between −90 and 90 degrees' }).max(90, { error: 'latitude is between −90 and 90 degrees' }),
    lon: finite('longitude').min(-180, { error: 'longitude is between −180 and 180 degrees' }).max(180, { error: 'longitude is between −180 and 180 degrees' }),
  },
  { error: 'a position {lat, lon} in degrees' },
);

const ISO_WITH_OFFSET = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(\.\d{1,9})?)?(Z|[+-]\d{2}:\d{2})$/;

export interface ParsedDeparture {
  atMs: number;
  /** The offset written in the departure, minutes east of UTC (the load profile's hours are read in it). */
  offsetMin: number;
  /** The local calendar date of the departure, YYYY-MM-DD. */
  localDate: string;
}

/** Reads "2026-06-01T09:00:00+02:00"; null with the reason when it is not a real local time with an offset. */
export function parseDeparture(text: string): { ok: true; value: ParsedDeparture } | { ok: false; message: string } {
  const m = ISO_WITH_OFFSET.exec(text);
  if (!m) return { ok: false, message: 'an ISO 8601 date and time with its offset, e.g. 2026-06-01T09:00:00+02:00' };
  const [, y, mo, d, h, mi, s = '00', , off] = m;
  if (+h > 23) return { ok: false, message: `hour ${h} is past midnight; write 00–23 (the next day's 00:00 for midnight)` };
  if (+mi > 59 || +s > 59) return { ok: false, message: 'minutes and seconds are 00–59' };
  if (+mo < 1 || +mo > 12) return { ok: false, message: `month ${mo} does not exist` };
  const dim = new Date(Date.UTC(+y, +mo, 0)).getUTCDate();
  if (+d < 1 || +d > dim) return { ok: false, message: `${y}-${mo} has no day ${d}` };
  let offsetMin = 0;
  if (off !== 'Z') {
    const [oh, om] = off!.slice(1).split(':').map(Number);
    if (oh! > 14 || om! > 59) return { ok: false, message: `offset ${off} is not a time zone offset (−14:00 to +14:00)` };
    offsetMin = (off![0] === '-' ? -1 : 1) * (oh! * 60 + om!);
  }
  const atMs = Date.parse(text);
  if (!Number.isFinite(atMs)) return { ok: false, message: 'not a date and time' };
  return { ok: true, value: { atMs, offsetMin, localDate: `${y}-${mo}-${d}` } };
}

export const MISSION_OBJECTIVES = ['time', 'fewest-perches'] as const;
export type MissionObjective = (typeof MISSION_OBJECTIVES)[number];

export const planRequestSchema = z.object({
  droneProfileId: z.string({ error: 'the drone profile id' }).min(1, { error: 'choose a drone profile' }).max(200),
  harvesterProfileId: z.string({ error: 'the harvester profile id' }).min(1, { error: 'choose a harvester profile' }).max(200),
  base: latLonSchema,
  target: latLonSchema,
  departAt: z.string({ error: 'an ISO 8601 date and time with its offset' }).superRefine((v, ctx) => {
    const p = parseDeparture(v);
    if (!p.ok) ctx.addIssue({ code: 'custom', message: p.message });
  }),
  wind: z
    .object({
      speedMps: finite('wind speed').min(0, { error: 'wind speed is 0 or more m/s' }).max(100, { error: 'wind speed is at most 100 m/s' }),
      fromDeg: finite('wind direction').min(0, { error: 'wind direction is 0–360 degrees' }).max(360, { error: 'wind direction is 0–360 degrees' }),
    })
    .nullish(),
  returnToBase: z.boolean({ error: 'returnToBase is true or false' }).optional(),
  objective: z.enum(MISSION_OBJECTIVES, { error: 'objective is "time" or "fewest-perches"' }).optional(),
  /** Perch points the planner moved off mid-span: distance along the span from its from-structure. */
  perchPoints: z
    .array(
      z.object({
        spanId: z.string({ error: 'the span id' }).min(1, { error: 'the span id' }).max(200),
        alongM: finite('the distance along the span').min(0, { error: 'the distance along the span is 0 m or more' }),
      }),
      { error: 'perchPoints is a list of {spanId, alongM}' },
    )
    .max(50, { error: 'at most 50 moved perch points' })
    .optional(),
});
export type PlanRequest = z.infer<typeof planRequestSchema>;

export const missionCreateSchema = planRequestSchema.extend({
  name: z.string({ error: 'a name for the mission' }).trim().min(1, { error: 'name the mission' }).max(200, { error: 'at most 200 characters' }),
});

export const missionReplanSchema = planRequestSchema.partial().extend({
  name: z.string().trim().min(1, { error: 'name the mission' }).max(200, { error: 'at most 200 characters' }).optional(),
  version: z.number({ error: 'the version you saw' }).int().positive().optional(),
});

export const missionAuthoriseSchema = z.object({
  version: z.number({ error: 'the version you saw' }).int().positive().optional(),
});

// ---- The plan as the API answers it (POST /api/missions/plan, a saved mission's `plan`): one shape for the
// server's exports and the client's screens. SI units and ISO 8601 times; fields the contract leaves open are optional.

export interface LatLon {
  lat: number;
  lon: number;
}

/** A leg's end: the base, a perch or the job site. */
export interface MissionStop extends LatLon {
  kind?: string;
  name?: string;
  spanId?: string;
}

export interface PlanLeg {
  distanceM: number;
  courseDeg: number;
  groundSpeedMps: number;
  durationS: number;
  energyWh: number;
  socStartPct: number;
  socEndPct: number;
  /** Set when the leg ends at a perch. */
  toSpanId?: string | null;
  from?: MissionStop;
  to?: MissionStop;
  /** Caution zones the leg crosses (allowed, listed). */
  cautionZones?: { id: string; name: string }[];
  departAt?: string;
  arriveAt?: string;
  windCorrectionDeg?: number;
}

export interface PlanPerch {
  spanId: string;
  lineId: string;
  arriveAt: string;
  departAt: string;
  dwellS: number;
  harvestW: number;
  socArrivePct: number;
  socDepartPct: number;
  lineBearingDeg: number;
  conductorHeightM: number;
  /** Where on the span: metres from the from-structure, mid-span unless the planner moved it. */
  alongM?: number;
  perchPoint?: 'mid-span' | 'planner';
  /** The perch point; the contract lets the server add it. */
  lat?: number;
  lon?: number;
  lineName?: string;
  voltageKv?: number;
  spanLabel?: string;
  fromStructureLabel?: string;
  toStructureLabel?: string;
  approachDistanceM?: number;
  /** Which load the harvest rests on: the line's metered month (`loadMonth`) or the typed estimate. */
  harvestSource?: 'series' | 'estimate';
  loadMonth?: string | null;
  /** Harvest at each hour the drone dwells, when the server lists it. */
  harvestByHour?: { hour: number; harvestW: number }[];
}

export interface FeasiblePlan {
  feasible: true;
  totalDistanceM: number;
  totalDurationS: number;
  legs: PlanLeg[];
  perches: PlanPerch[];
  base?: LatLon;
  target?: LatLon;
  departAt?: string;
  arriveAt?: string;
  totalDwellS?: number;
  totalEnergyWh?: number;
  totalHarvestWh?: number;
  returnToBase?: boolean;
}

export interface InfeasiblePlan {
  feasible: false;
  /** A sentence a planner can act on, or a short code the server explains in `message`/`detail`. */
  reason: string;
  message?: string;
  detail?: string;
  /** Extra figures by reason (gap length, reach, zone, wind, spans that would bridge), each optional. */
  gapM?: number;
  reachM?: number;
  longestGapM?: number;
  zone?: { id: string; name: string } | null;
  zoneName?: string;
  windSpeedMps?: number;
  gap?: { from?: LatLon; to?: LatLon; distanceM?: number; reachM?: number };
  blockedSpans?: { spanId: string; status?: string; lineName?: string; label?: string; failingGates?: string[]; reason?: string }[];
  [extra: string]: unknown;
}

export type PlanResult = FeasiblePlan | InfeasiblePlan;
