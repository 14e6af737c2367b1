import { EntitySchema } from '@mikro-orm/core';
import type { HazardSeverityLevel } from '#shared/schemas/inventory.ts';

/** The hazard catalogue kept by the safety role; the id is a slug ("road-crossing"). */
export class HazardKind {
  id!: string;
  label!: string;
  defaultSeverity!: HazardSeverityLevel;
  /** Inactive kinds stay on old hazards but cannot be picked for new ones. */
  active = true;
}

export const HazardKindSchema = new EntitySchema<HazardKind>({
  class: HazardKind,
  tableName: 'hazard_kinds',
  properties: {
    id: { type: 'string', primary: true },
    label: { type: 'string' },
    defaultSeverity: { type: 'string' },
    active: { type: 'boolean', default: true },
  },
});
