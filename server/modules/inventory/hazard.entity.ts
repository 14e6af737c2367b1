import { EntitySchema } from '@mikro-orm/core';
import type { HazardSeverityLevel } from '#shared/schemas/inventory.ts';

/** A hazard on a span, of a kind from the safety role's catalogue. */
export class Hazard {
  id!: string;
  spanId!: string;
  kindId!: string;
  severity!: HazardSeverityLevel;
  /** Distance from the span's from-structure, m; null when not located. */
  positionAlongM: number | null = null;
  note = '';
  createdAt: Date = new Date();
}

export const HazardSchema = new EntitySchema<Hazard>({
  class: Hazard,
  tableName: 'hazards',
  properties: {
    id: { type: 'string', primary: true },
    spanId: { type: 'string', index: true },
    kindId: { type: 'string', index: true },
    severity: { type: 'string' },
    positionAlongM: { type: 'double', nullable: true },
    note: { type: 'text', default: '' },
    createdAt: { type: 'Date' },
  },
});
