import { EntitySchema } from '@mikro-orm/core';
import type { ConductorMaterial, SpanStatus, Terrain } from '#shared/schemas/inventory.ts';

/** The conductor between two structures of one line, as surveyed, with its review status. */
export class Span {
  id!: string;
  lineId!: string;
  fromStructureId!: string;
  toStructureId!: string;
  status: SpanStatus = 'draft';
  /** Starts at 1 and goes up by one on every write (optimistic lock: a stale write gets 409). */
  version = 1;
  /** WGS84 geodesic between the two structures, m (server-computed). */
  lengthM!: number;
  conductorCodeWord: string | null = null;
  conductorSize: string | null = null;
  conductorMaterial: ConductorMaterial | null = null;
  conductorDiameterMm: number | null = null;
  conductorResistanceLowOhmPerM: number | null = null;
  conductorTempLowC: number | null = null;
  conductorResistanceHighOhmPerM: number | null = null;
  conductorTempHighC: number | null = null;
  phasePosition: string | null = null;
  /** Ground clearance at the intended perch point, m. */
  clearanceM: number | null = null;
  lowestClearanceM: number | null = null;
  /** Where the lowest clearance was measured: distance along the span from the from-structure, m. */
  lowestClearanceAlongM: number | null = null;
  terrain: Terrain | null = null;
  /** Estimated load current, A; null = inherited from the line. */
  loadCurrentA: number | null = null;
  /** ISO date (YYYY-MM-DD). */
  surveyDate: string | null = null;
  surveyorId: string | null = null;
  returnReason: string | null = null;
  suspendReason: string | null = null;
  submittedAt: Date | null = null;
  approvedAt: Date | null = null;
  approvedById: string | null = null;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const SpanSchema = new EntitySchema<Span>({
  class: Span,
  tableName: 'spans',
  // (status, updatedAt) and (status, createdAt) serve the table's status filter with its date sorts (and page by index order).
  indexes: [{ properties: ['status'] }, { properties: ['updatedAt'] }, { properties: ['status', 'updatedAt'] }, { properties: ['status', 'createdAt'] }, { properties: ['status', 'lengthM'] }, { properties: ['fromStructureId'] }, { properties: ['toStructureId'] }],
  uniques: [{ properties: ['lineId', 'fromStructureId', 'toStructureId'] }],
  properties: {
    id: { type: 'string', primary: true },
    lineId: { type: 'string', index: true },
    fromStructureId: { type: 'string' },
    toStructureId: { type: 'string' },
    status: { type: 'string', default: 'draft' },
    version: { type: 'integer', version: true },
    lengthM: { type: 'double' },
    conductorCodeWord: { type: 'string', nullable: true },
    conductorSize: { type: 'string', nullable: true },
    conductorMaterial: { type: 'string', nullable: true },
    conductorDiameterMm: { type: 'double', nullable: true },
    conductorResistanceLowOhmPerM: { type: 'double', nullable: true },
    conductorTempLowC: { type: 'double', nullable: true },
    conductorResistanceHighOhmPerM: { type: 'double', nullable: true },
    conductorTempHighC: { type: 'double', nullable: true },
    phasePosition: { type: 'string', nullable: true },
    clearanceM: { type: 'double', nullable: true },
    lowestClearanceM: { type: 'double', nullable: true },
    lowestClearanceAlongM: { type: 'double', nullable: true },
    terrain: { type: 'string', nullable: true },
    loadCurrentA: { type: 'double', nullable: true },
    surveyDate: { type: 'string', nullable: true },
    surveyorId: { type: 'string', nullable: true, index: true },
    returnReason: { type: 'text', nullable: true },
    suspendReason: { type: 'text', nullable: true },
    submittedAt: { type: 'Date', nullable: true },
    approvedAt: { type: 'Date', nullable: true },
    approvedById: { type: 'string', nullable: true },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date' },
  },
});
