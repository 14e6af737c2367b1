import { EntitySchema } from '@mikro-orm/core';

/**
 * One background job (a rescore, an import, the daily pass), kept in the database so every process reads its
 * progress and a restart finds the work it still owes. On SQLite this row is also the queue: a process claims a
 * queued job (or one whose lease ran out) with one conditional update. On PostgreSQL pg-boss queues and leases the
 * work; this row carries what the API shows (state, done/total, error, result).
 */
export class Job {
  id!: string;
  kind!: string;
  reason!: string;
  /** JSON arguments of the work (span ids, line id, the stored upload of an import). */
  payload!: string;
  /** queued | running | done | failed */
  state!: string;
  done!: number;
  total!: number;
  error?: string | null;
  /** JSON result (an import's report), once done. */
  result?: string | null;
  /** A queued job of the same key is reused instead of queueing another (rescore of the same scope). */
  coalesceKey?: string | null;
  /** At most one job ever carries this key (the daily pass of one day, across every process). */
  onceKey?: string | null;
  /** How many times a worker took it (a worker that died and a restart add one). */
  attempts!: number;
  /** The worker (host:pid:tag) that holds it while running, and that ran it once finished. */
  owner?: string | null;
  /** Epoch ms until which the owner's claim holds; the owner renews it while it works. */
  leaseUntil?: number | null;
  createdAt!: number;
  startedAt?: number | null;
  finishedAt?: number | null;
}

export const JobSchema = new EntitySchema<Job>({
  class: Job,
  tableName: 'jobs',
  indexes: [{ name: 'jobs_state_created_idx', properties: ['state', 'createdAt'] }, { name: 'jobs_created_idx', properties: ['createdAt'] }],
  properties: {
    id: { type: 'string', primary: true },
    kind: { type: 'string' },
    reason: { type: 'text' },
    payload: { type: 'text' },
    state: { type: 'string' },
    done: { type: 'integer', default: 0 },
    total: { type: 'integer', default: 0 },
    error: { type: 'text', nullable: true },
    result: { type: 'text', nullable: true },
    coalesceKey: { type: 'string', nullable: true },
    onceKey: { type: 'string', nullable: true, unique: 'jobs_once_key_unique' },
    attempts: { type: 'integer', default: 0 },
    owner: { type: 'string', nullable: true },
    leaseUntil: { type: 'bigint', nullable: true },
    createdAt: { type: 'bigint' },
    startedAt: { type: 'bigint', nullable: true },
    finishedAt: { type: 'bigint', nullable: true },
  },
});
