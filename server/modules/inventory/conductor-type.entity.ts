import { EntitySchema } from '@mikro-orm/core';

/** A catalogue conductor (seeded from shared/engineering/conductors.ts), SI units. */
export class ConductorType {
  codeWord!: string;
  size!: string;
  stranding!: string;
  material!: string;
  diameterMm!: number;
  resistanceDc20OhmPerM!: number;
  resistanceAc25OhmPerM!: number;
  resistanceAc75OhmPerM!: number;
  weightKgPerM: number | null = null;
}

export const ConductorTypeSchema = new EntitySchema<ConductorType>({
  class: ConductorType,
  tableName: 'conductor_types',
  properties: {
    codeWord: { type: 'string', primary: true },
    size: { type: 'string' },
    stranding: { type: 'string' },
    material: { type: 'string' },
    diameterMm: { type: 'double' },
    resistanceDc20OhmPerM: { type: 'double' },
    resistanceAc25OhmPerM: { type: 'double' },
    resistanceAc75OhmPerM: { type: 'double' },
    weightKgPerM: { type: 'double', nullable: true },
  },
});
