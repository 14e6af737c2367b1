import { EntitySchema } from '@mikro-orm/core';

/** One change to one record: who, when, what, before → after. */
export class AuditEntry {
  id!: number;
  at: Date = new Date();
  actorId!: string | null;
  action!: string;
  recordType!: string;
  recordId!: string;
  before: unknown = null;
  after: unknown = null;
}

export const AuditEntrySchema = new EntitySchema<AuditEntry>({
  class: AuditEntry,
  tableName: 'audit_entries',
  indexes: [{ properties: ['recordType', 'recordId'] }, { properties: ['at'] }],
  properties: {
    id: { type: 'number', primary: true, autoincrement: true },
    at: { type: 'Date' },
    actorId: { type: 'string', nullable: true, index: true },
    action: { type: 'string' },
    recordType: { type: 'string' },
    recordId: { type: 'string' },
    before: { type: 'json', nullable: true },
    after: { type: 'json', nullable: true },
  },
});
