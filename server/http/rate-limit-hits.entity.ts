import { EntitySchema } from '@mikro-orm/core';

/**
 * Rate-limit counters kept in the database, so several server processes on one PostgreSQL count one client's
 * attempts together (server/http/rate-limit-store.ts). One row per limiter and client key.
 */
export class RateLimitHit {
  key!: string;
  hits!: number;
  /** Epoch ms when this window ends and the count starts again. */
  resetAt!: number;
}

export const RateLimitHitSchema = new EntitySchema<RateLimitHit>({
  class: RateLimitHit,
  tableName: 'rate_limit_hits',
  properties: {
    key: { type: 'string', primary: true },
    hits: { type: 'integer' },
    resetAt: { type: 'bigint' },
  },
});
