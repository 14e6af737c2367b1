// Mission records as the API carries them (api.md "Missions"); SI units and ISO 8601 times on the wire.
// Written from the contract; fields the contract leaves open are optional here and the screens cope without them.

export type { LatLon, MissionStop, PlanLeg, PlanPerch, FeasiblePlan, InfeasiblePlan, PlanResult, MissionObjective, PlanRequest } from '#shared/schemas/missions.ts';
import type { LatLon, MissionObjective, PlanRequest, PlanResult } from '#shared/schemas/missions.ts';

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
