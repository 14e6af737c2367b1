import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { makeTestApp, type TestApp } from './helpers.ts';
import { sql } from '../../server/sql/query.ts';
import { sweepRateLimitHits } from '../../server/http/rate-limit-store.ts';

// The sign-in, password-reset and upload limits count in the database (one table, a row per limiter and client),
// on SQLite as on PostgreSQL, so several processes share one count; ended windows are swept.
let t: TestApp;
const WINDOW_MS = 60_000;
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 2, signInWindowMs: WINDOW_MS, uploadBurst: 1, uploadWindowMs: WINDOW_MS });
});
afterAll(() => t.close());

const rows = () => sql.all<{ key: string; hits: number }>(t.orm.em.fork(), 'select key, hits from rate_limit_hits order by key');

describe('rate limits in the database', () => {
  it('when each limit is reached, then its count is a row of its own; once the window has ended the sweep removes them and each limit starts again', async () => {
    const surveyor = await t.as('surveyor');
    const wrong = () => t.client().post('/api/auth/sign-in', { email: 'planner@roostline.test', password: 'not the password at all' });
    const reset = () => t.client().post('/api/auth/request-password-reset', { email: 'planner@roostline.test' });
    expect([(await wrong()).status, (await wrong()).status, (await wrong()).status]).toEqual([401, 401, 429]);
    expect([(await reset()).status, (await reset()).status, (await reset()).status]).toEqual([202, 202, 429]);
    const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } }).png().toBuffer();
    expect((await surveyor.upload('/api/photos').attach('photo', png, 'a.png')).status).toBe(201);
    expect((await surveyor.upload('/api/photos').attach('photo', png, 'b.png')).status).toBe(429);

    const kept = await rows();
    expect(kept.map((r) => r.key.split(':')[0]).sort()).toEqual(['password-reset', 'photo-upload', 'sign-in']);
    expect(kept.find((r) => r.key.startsWith('photo-upload:'))!.hits).toBe(2);
    // Before the window ends nothing is swept; after it, every row is.
    expect(await sweepRateLimitHits(t.orm.em.fork(), Date.now())).toBe(0);
    expect(await sweepRateLimitHits(t.orm.em.fork(), Date.now() + WINDOW_MS + 1000)).toBe(3);
    expect(await rows()).toEqual([]);
    expect((await wrong()).status).toBe(401);
    expect((await reset()).status).toBe(202);
    expect((await surveyor.upload('/api/photos').attach('photo', png, 'c.png')).status).toBe(201);
  });
});
