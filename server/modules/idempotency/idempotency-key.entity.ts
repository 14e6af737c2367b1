import { EntitySchema } from '@mikro-orm/core';

/**
 * One Idempotency-Key a user sent with a creating POST: claimed (state `pending`) before the
 * work starts, then holding the first answer (`done`) for 24 h so a retry gets it back.
 */
export class IdempotencyKey {
  id!: string;
  userId!: string;
  key!: string;
  /** SHA-256 of method, path and the request body (multipart with its boundary normalised). */
  requestHash!: string;
  state: 'pending' | 'done' = 'pending';
  responseStatus: number | null = null;
  /** The first answer's JSON body as sent; null for an empty body. */
  responseBody: string | null = null;
  createdAt: Date = new Date();
  expiresAt!: Date;
}

export const IdempotencyKeySchema = new EntitySchema<IdempotencyKey>({
  class: IdempotencyKey,
  tableName: 'idempotency_keys',
  uniques: [{ properties: ['userId', 'key'] }],
  properties: {
    id: { type: 'string', primary: true },
    userId: { type: 'string' },
    key: { type: 'string', length: 200 },
    requestHash: { type: 'string', length: 64 },
    state: { type: 'string', length: 16, default: 'pending' },
    responseStatus: { type: 'integer', nullable: true },
    responseBody: { type: 'text', nullable: true },
    createdAt: { type: 'Date' },
    expiresAt: { type: 'Date', index: true },
  },
});
