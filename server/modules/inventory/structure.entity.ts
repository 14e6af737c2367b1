import { EntitySchema } from '@mikro-orm/core';

/** A pole or tower of a line, positioned in WGS84 degrees. */
export class Structure {
  id!: string;
  lineId!: string;
  lat!: number;
  lon!: number;
  kind!: 'pole' | 'tower' | 'h-frame' | 'other';
  /** Unique within its line, e.g. "HV69-N-014"; the stable key of import and export. */
  label!: string;
  attachmentHeightM!: number;
  version = 1;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const StructureSchema = new EntitySchema<Structure>({
  class: Structure,
  tableName: 'structures',
  uniques: [{ properties: ['lineId', 'label'] }],
  // Structures in a box (the map's first tiles after a start, before its in-memory index is read): covering, with the id.
  indexes: [{ properties: ['lat', 'lon', 'id'] }],
  properties: {
    id: { type: 'string', primary: true },
    lineId: { type: 'string', index: true },
    lat: { type: 'double' },
    lon: { type: 'double' },
    kind: { type: 'string' },
    label: { type: 'string' },
    attachmentHeightM: { type: 'double' },
    version: { type: 'integer', version: true },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date', index: true }, // read by the map's change watcher
  },
});
