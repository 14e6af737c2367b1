// Mission records as the API carries them (api.md "Missions"); SI units and ISO 8601 times on the wire.
// Written from the contract; fields the contract leaves open are optional here and the screens cope without them.

export interface LatLon {
  lat: number;
  lon: number;
}

export type MissionObjective = 'time' | 'fewest-perches';

export interface PlanRequest {
  droneProfileId: string;
  harvesterProfileId: string;
  base: LatLon;
  target: LatLon;
  /** ISO 8601 with the offset, e.g. 2026-06-01T09:00:00+02:00. */
  departAt: string;
  wind?: { speedMps: number; fromDeg: number };
  returnToBase?: boolean;
  objective?: MissionObjective;
  /** Perch points moved off mid-span: metres along the span from its from-structure. */
  perchPoints?: { spanId: string; alongM: number }[];
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
  from?: LatLon & { kind?: string; name?: string };
  to?: LatLon & { kind?: string; name?: string };
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

export type StaleReason = string | { code?: string; message?: string; spanId?: string; zoneId?: string; [k: string]: unknown };

export interface Mission {
  id: string;
  name: string;
  stale: boolean;
  staleReasons: StaleReason[];
  plan: PlanResult;
  /** The inputs the plan was made from (the plan request). */
  input?: PlanRequest;
  request?: PlanRequest;
  droneProfileId?: string;
  harvesterProfileId?: string;
  base?: LatLon;
  target?: LatLon;
  departAt?: string;
  wind?: { speedMps: number; fromDeg: number } | null;
  returnToBase?: boolean;
  objective?: MissionObjective;
  plannerId?: string;
  plannerName?: string | null;
  status?: string;
  authorisedAt?: string | null;
  authorisedById?: string | null;
  authorisedByName?: string | null;
  version?: number;
  createdAt?: string;
  updatedAt?: string;
}

export type { LinePermissionView as LinePermission } from '#shared/schemas/line-permissions.ts';
