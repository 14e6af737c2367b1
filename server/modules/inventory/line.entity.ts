import { EntitySchema } from '@mikro-orm/core';

/** A circuit of the owner utility, with its load estimate (A) used when a span has none of its own. */
export class Line {
  id!: string;
  name!: string;
  owner!: string;
  /** Nominal line-to-line voltage, kV. */
  voltageKv!: number;
  frequencyHz!: number;
  phases = 3;
  loadTypicalA!: number;
  loadMinA!: number;
  loadPeakA!: number;
  /** 24 hourly currents (00:00 … 23:00 local), A; null when not estimated. */
  loadProfileA: number[] | null = null;
  version = 1;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const LineSchema = new EntitySchema<Line>({
  class: Line,
  tableName: 'lines',
  properties: {
    id: { type: 'string', primary: true },
    name: { type: 'string', unique: true },
    owner: { type: 'string' },
    voltageKv: { type: 'double' },
    frequencyHz: { type: 'integer' },
    phases: { type: 'integer', default: 3 },
    loadTypicalA: { type: 'double' },
    loadMinA: { type: 'double' },
    loadPeakA: { type: 'double' },
    loadProfileA: { type: 'json', nullable: true },
    version: { type: 'integer', version: true },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date' },
  },
});
