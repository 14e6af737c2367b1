import type { EntityManager } from '@mikro-orm/core';
import { AuditEntry } from './audit.entity.ts';

export interface AuditInput {
  actorId: string | null;
  action: string;
  recordType: string;
  recordId: string;
  before?: unknown;
  after?: unknown;
}

/** Records an audit entry in the same unit of work as the change it describes (flushed with it). */
export function audit(em: EntityManager, input: AuditInput): AuditEntry {
  const entry = em.create(AuditEntry, {
    at: new Date(),
    actorId: input.actorId,
    action: input.action,
    recordType: input.recordType,
    recordId: input.recordId,
    before: input.before ?? null,
    after: input.after ?? null,
  });
  em.persist(entry);
  return entry;
}

/** Record types the safety role may read in the audit log: the span records and what hangs off them. */
export const SPAN_RELATED_RECORD_TYPES = ['span', 'hazard', 'hazard-kind', 'hazard_kind', 'zone', 'photo', 'structure', 'line', 'assessment', 'line-permission'];
