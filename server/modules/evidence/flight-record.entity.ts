import { EntitySchema } from '@mikro-orm/core';

/** An uploaded perch flight record (CSV or GPX track) and the harvester it flew with. */
export class FlightRecord {
  id!: string;
  fileName!: string;
  format!: 'csv' | 'gpx';
  missionId: string | null = null;
  spanId: string | null = null;
  harvesterProfileId!: string;
  uploadedById!: string;
  uploadedAt: Date = new Date();
  /** First and last point, ISO 8601 with the record's own offset. */
  startedAt!: string;
  endedAt!: string;
  offsetMin!: number;
  pointCount!: number;
  /** [lon, lat] of every point, for the map. */
  track!: [number, number][];
}

export const FlightRecordSchema = new EntitySchema<FlightRecord>({
  class: FlightRecord,
  tableName: 'flight_records',
  properties: {
    id: { type: 'string', primary: true },
    fileName: { type: 'string' },
    format: { type: 'string' },
    missionId: { type: 'string', nullable: true, index: true },
    spanId: { type: 'string', nullable: true },
    harvesterProfileId: { type: 'string' },
    uploadedById: { type: 'string' },
    uploadedAt: { type: 'Date' },
    startedAt: { type: 'string' },
    endedAt: { type: 'string' },
    offsetMin: { type: 'integer' },
    pointCount: { type: 'integer' },
    track: { type: 'json' },
  },
});

/** A stop found in a flight record: a perch on a span (with predicted and measured harvest) or a hover. */
export class PerchEvent {
  id!: string;
  flightRecordId!: string;
  kind!: 'perch' | 'hover';
  spanId: string | null = null;
  lineId: string | null = null;
  startAt!: string;
  endAt!: string;
  durationS!: number;
  lat!: number;
  lon!: number;
  spanDistanceM: number | null = null;
  measuredW: number | null = null;
  predictedW: number | null = null;
  /** Where the predicted figure's line current came from: the metered series for that month, or the estimate. */
  predictedSource: 'series' | 'estimate' | null = null;
  lineCurrentA: number | null = null;
  impliedCurrentA: number | null = null;
  meteredCurrentA: number | null = null;
  batteryStartPct: number | null = null;
  batteryEndPct: number | null = null;
  note: string | null = null;
}

export const PerchEventSchema = new EntitySchema<PerchEvent>({
  class: PerchEvent,
  tableName: 'perch_events',
  properties: {
    id: { type: 'string', primary: true },
    flightRecordId: { type: 'string', index: true },
    kind: { type: 'string' },
    spanId: { type: 'string', nullable: true, index: true },
    lineId: { type: 'string', nullable: true },
    startAt: { type: 'string' },
    endAt: { type: 'string' },
    durationS: { type: 'double' },
    lat: { type: 'double' },
    lon: { type: 'double' },
    spanDistanceM: { type: 'double', nullable: true },
    measuredW: { type: 'double', nullable: true },
    predictedW: { type: 'double', nullable: true },
    predictedSource: { type: 'string', nullable: true },
    lineCurrentA: { type: 'double', nullable: true },
    impliedCurrentA: { type: 'double', nullable: true },
    meteredCurrentA: { type: 'double', nullable: true },
    batteryStartPct: { type: 'double', nullable: true },
    batteryEndPct: { type: 'double', nullable: true },
    note: { type: 'text', nullable: true },
  },
});
