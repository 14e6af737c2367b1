import { EntitySchema } from '@mikro-orm/core';

/** The line owner's permission to perch on and harvest from a line, valid over whole calendar days. */
export class LinePermission {
  id!: string;
  lineId!: string;
  /** The owner's own reference for the permission (their letter or contract number). */
  reference!: string;
  /** YYYY-MM-DD, inclusive. */
  validFrom!: string;
  /** YYYY-MM-DD, inclusive. */
  validTo!: string;
  conditions = '';
  /** Storage key of the attached document (PDF or image), null when none is attached. */
  documentKey: string | null = null;
  documentName: string | null = null;
  documentContentType: string | null = null;
  documentBytes: number | null = null;
  createdById!: string;
  version = 1;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const LinePermissionSchema = new EntitySchema<LinePermission>({
  class: LinePermission,
  tableName: 'line_permissions',
  indexes: [{ properties: ['lineId', 'validTo'] }],
  uniques: [{ properties: ['lineId', 'reference'] }],
  properties: {
    id: { type: 'string', primary: true },
    lineId: { type: 'string' },
    reference: { type: 'string' },
    validFrom: { type: 'string' },
    validTo: { type: 'string' },
    conditions: { type: 'text', default: '' },
    documentKey: { type: 'string', nullable: true },
    documentName: { type: 'string', nullable: true },
    documentContentType: { type: 'string', nullable: true },
    documentBytes: { type: 'integer', nullable: true },
    createdById: { type: 'string' },
    version: { type: 'integer', version: true },
    createdAt: { type: 'Date' },
    updatedAt: { type: 'Date' },
  },
});
