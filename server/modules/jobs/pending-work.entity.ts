import { EntitySchema } from '@mikro-orm/core';

/**
 * Background work the database still owes (a rescore after a zone save, an import, a settings change …). A row is
 * written when the work is queued and removed when it has finished, so a crash or a shutdown mid-way leaves it
 * here and the next start runs it again.
 */
export class PendingWork {
  /** The work's scope ("rescore:all", "rescore:line:<id>", "rescore:spans:<job id>"): one row per scope. */
  key!: string;
  kind!: string;
  /** JSON arguments of the work (span ids, line id). */
  payload!: string;
  reason!: string;
  /** Epoch ms of the latest request for this scope; finishing work only clears requests older than its start. */
  requestedAt!: number;
}

export const PendingWorkSchema = new EntitySchema<PendingWork>({
  class: PendingWork,
  tableName: 'pending_work',
  properties: {
    key: { type: 'string', primary: true },
    kind: { type: 'string' },
    payload: { type: 'text' },
    reason: { type: 'string' },
    requestedAt: { type: 'bigint' },
  },
});
