// express-rate-limit's Store over the `rate_limit_hits` table: every limiter (sign-in, password reset, photo uploads)
// counts in the database, so several server processes on one PostgreSQL count a client's attempts together, and a
// restart does not hand a client a fresh allowance. Same store and SQL on SQLite.
import type { Store, Options, ClientRateLimitInfo } from 'express-rate-limit';
import type { EntityManager } from '@mikro-orm/core';
import type { AppContext } from '../context.ts';
import { sql } from '../sql/query.ts';

class DatabaseStore implements Store {
  windowMs = 60_000;
  localKeys = false;
  constructor(
    private ctx: AppContext,
    public prefix: string,
  ) {}

  init(options: Options) {
    this.windowMs = options.windowMs;
  }

  private em() {
    return this.ctx.orm.em.fork();
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const now = Date.now();
    const until = now + this.windowMs;
    // One statement: a new key starts at 1, a key whose window ended starts again, any other counts one more.
    const row = await sql.get<{ hits: number; reset_at: string | number }>(
      this.em(),
      'insert into rate_limit_hits (key, hits, reset_at) values (?, 1, ?) on conflict (key) do update set ' +
        'hits = case when rate_limit_hits.reset_at <= ? then 1 else rate_limit_hits.hits + 1 end, ' +
        'reset_at = case when rate_limit_hits.reset_at <= ? then ? else rate_limit_hits.reset_at end ' +
        'returning hits, reset_at',
      [this.prefix + key, until, now, now, until],
    );
    return { totalHits: Number(row!.hits), resetTime: new Date(Number(row!.reset_at)) };
  }

  async decrement(key: string): Promise<void> {
    await sql.run(this.em(), 'update rate_limit_hits set hits = hits - 1 where key = ? and hits > 0', [this.prefix + key]);
  }

  async resetKey(key: string): Promise<void> {
    await sql.run(this.em(), 'delete from rate_limit_hits where key = ?', [this.prefix + key]);
  }
}

/** Rows whose window has ended (a client that never came back) are removed this often. */
const SWEEP_EVERY_MS = 60 * 60 * 1000;
const sweeping = new WeakSet<AppContext>();

/** Removes the counts whose window ended before `now`; answers how many. */
export async function sweepRateLimitHits(em: EntityManager, now = Date.now()): Promise<number> {
  return (await sql.run(em, 'delete from rate_limit_hits where reset_at <= ?', [now])).affectedRows;
}

/** The limiter `name`'s counts in the database (keys are prefixed with the name, so limiters never mix). */
export function sharedRateLimitStore(ctx: AppContext, name: string): Store {
  if (!sweeping.has(ctx)) {
    sweeping.add(ctx);
    const timer = setInterval(() => void sweepRateLimitHits(ctx.orm.em.fork()).catch(() => undefined), SWEEP_EVERY_MS);
    timer.unref();
    ctx.onClose(() => clearInterval(timer));
  }
  return new DatabaseStore(ctx, `${name}:`);
}
