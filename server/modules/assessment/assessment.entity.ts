import { EntitySchema } from '@mikro-orm/core';
import { AssessmentResultType } from './result-codec.ts';

/** The stored assessment of one span for one harvester × drone pair, with the inputs and method version used. */
export class Assessment {
  id!: number;
  spanId!: string;
  harvesterProfileId!: string;
  droneProfileId!: string;
  perchable!: boolean;
  score!: number;
  harvestW!: number;
  /** Null when nothing is harvested (the battery never recharges). */
  chargeTimeMin!: number | null;
  conductorTempC!: number;
  ampacityA!: number;
  result!: unknown;
  inputs!: unknown;
  methodVersion!: string;
  settingsVersion!: number;
  harvesterVersion!: number;
  droneVersion!: number;
  computedAt: Date = new Date();
}

export const AssessmentSchema = new EntitySchema<Assessment>({
  class: Assessment,
  tableName: 'assessments',
  uniques: [{ properties: ['spanId', 'harvesterProfileId', 'droneProfileId'] }],
  indexes: [{ properties: ['harvesterProfileId', 'droneProfileId', 'harvestW'] }],
  properties: {
    id: { type: 'number', primary: true, autoincrement: true },
    // No index of its own: the unique (span, harvester, drone) index serves every lookup by span.
    spanId: { type: 'string' },
    harvesterProfileId: { type: 'string' },
    droneProfileId: { type: 'string' },
    perchable: { type: 'boolean' },
    score: { type: 'double' },
    harvestW: { type: 'double' },
    chargeTimeMin: { type: 'double', nullable: true },
    conductorTempC: { type: 'double' },
    ampacityA: { type: 'double' },
    // Stored in its compact form (result-codec.ts); the entity holds the full result.
    result: { type: AssessmentResultType },
    inputs: { type: 'json' },
    methodVersion: { type: 'string' },
    settingsVersion: { type: 'integer' },
    harvesterVersion: { type: 'integer' },
    droneVersion: { type: 'integer' },
    computedAt: { type: 'Date', index: true }, // read by the map's change watcher
  },
});
