import { EntitySchema } from '@mikro-orm/core';

export type MissionStatus = 'planned' | 'authorised';

export interface MissionStaleReason {
  code: 'span-missing' | 'span-not-approved' | 'span-edited' | 'span-moved' | 'span-not-perchable' | 'zone-cuts-leg';
  message: string;
  spanId?: string;
  zoneId?: string;
}

/** A saved plan: its inputs, the server's result, who planned it, who authorised it, and whether it still holds. */
export class Mission {
  id!: string;
  name!: string;
  status: MissionStatus = 'planned';
  plannerId!: string;
  droneProfileId!: string;
  harvesterProfileId!: string;
  /** The plan request as sent (api.md "Missions"). */
  input!: Record<string, unknown>;
  /** The plan result (legs, perches, totals). */
  plan!: Record<string, unknown>;
  feasible = true;
  /** Departure as sent (ISO 8601 with offset) and its local calendar date (permissions are checked on it). */
  departAt!: string;
  departDate!: string;
  stale = false;
  staleReasons: MissionStaleReason[] = [];
  staleSince: Date | null = null;
  authorisedAt: Date | null = null;
  authorisedById: string | null = null;
  version = 1;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const MissionSchema = new EntitySchema<Mission>({
  class: Mission,
  tableName: 'missions',
  indexes: [{ properties: ['stale'] }, { properties: ['createdAt'] }],
  properties: {
    id: { type: 'string', primary: true },
    name: { type: 'string' },
    status: { type: 'string', default: 'planned' },
    plannerId: { type: 'string', index: true },
    droneProfileId: { type: 'string' },
    harvesterProfileId: { type: 'string' },
    input: { type: 'json' },
    plan: { type: 'json' },
    feasible: { type: 'boolean', default: true },
    departAt: { type: 'string' },
    departDate: { type: 'string' },
    stale: { type: 'boolean', default: false },
    staleReasons: { type: 'json' },
    staleSince: { type: 'Date', nullable: true },
    authorisedAt: { type: 'Date', nullable: true },
    authorisedById: { type: 'string', nullable: true },
    version: { type: 'integer', version: true },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date' },
  },
});

/** One perch of a mission's current plan, in flight order: what staleness checks are made against. */
export class MissionPerch {
  id!: string;
  missionId!: string;
  seq!: number;
  spanId!: string;
  lineId!: string;
  /** The span's version when planned; an edit bumps it. */
  spanVersion!: number;
  lat!: number;
  lon!: number;
}

export const MissionPerchSchema = new EntitySchema<MissionPerch>({
  class: MissionPerch,
  tableName: 'mission_perches',
  indexes: [{ properties: ['spanId'] }],
  uniques: [{ properties: ['missionId', 'seq'] }],
  properties: {
    id: { type: 'string', primary: true },
    missionId: { type: 'string', index: true },
    seq: { type: 'integer' },
    spanId: { type: 'string' },
    lineId: { type: 'string' },
    spanVersion: { type: 'integer' },
    lat: { type: 'double' },
    lon: { type: 'double' },
  },
});
