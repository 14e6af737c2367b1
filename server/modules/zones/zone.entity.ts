import { EntitySchema } from '@mikro-orm/core';
import type { Polygon } from 'geojson';

export type ZoneSeverity = 'exclude' | 'caution';

/** A no-perch zone drawn by a safety officer: perching inside is refused (exclude) or flagged (caution). */
export class Zone {
  id!: string;
  name!: string;
  reason!: string;
  severity!: ZoneSeverity;
  geometry!: Polygon;
  /** ISO date (YYYY-MM-DD) the zone starts to apply; null = always. */
  validFrom: string | null = null;
  /** ISO date (YYYY-MM-DD, inclusive) the zone stops applying; null = open-ended. */
  validTo: string | null = null;
  createdById!: string;
  version = 1;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const ZoneSchema = new EntitySchema<Zone>({
  class: Zone,
  tableName: 'zones',
  properties: {
    id: { type: 'string', primary: true },
    name: { type: 'string' },
    reason: { type: 'text' },
    severity: { type: 'string' },
    geometry: { type: 'json' },
    validFrom: { type: 'string', nullable: true },
    validTo: { type: 'string', nullable: true },
    createdById: { type: 'string' },
    version: { type: 'number', default: 1 },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date' },
  },
});
