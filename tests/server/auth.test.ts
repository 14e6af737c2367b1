import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, ORIGIN, HOST, type TestApp } from './helpers.ts';
import { ROLES } from '../../shared/roles.ts';
import { DEMO_PASSWORD } from '../../server/seeders/demo-users.ts';
import { routeTable } from '../../server/http/access.ts';
import { Session } from '../../server/modules/auth/session.entity.ts';
import { SESSION_COOKIE } from '../../server/modules/auth/lucia.ts';
import { sql } from '../../server/sql/query.ts';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
});
afterAll(() => t.close());

describe('health', () => {
  it('when migrations have run, then GET /api/health answers ok', async () => {
    const res = await t.client().get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok' });
  });
});

describe('sign-in', () => {
  it.each(ROLES)('when the %s demo account signs in, then /api/me names its role', async (role) => {
    const c = t.client();
    const res = await c.post('/api/auth/sign-in', { email: `${role}@roostline.test`, password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    const cookie = String(res.headers['set-cookie']);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/);
    const me = await c.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.user).toMatchObject({ email: `${role}@roostline.test`, roles: [role] });
    expect(me.body.user.id).toEqual(expect.any(String));
  });

  it('when the e-mail is unknown or the password wrong, then both get 401 with the same message', async () => {
    const a = await t.client().post('/api/auth/sign-in', { email: 'nobody@roostline.test', password: 'whatever-it-is' });
    const b = await t.client().post('/api/auth/sign-in', { email: 'admin@roostline.test', password: 'not-the-password' });
    expect(a.status).toBe(401);
    expect(b.status).toBe(401);
    expect(a.body.error.message).toBe(b.body.error.message);
    expect(a.body.error.code).toBe('unauthenticated');
  });

  it('when the body is not valid, then 400 names the field', async () => {
    const res = await t.client().post('/api/auth/sign-in', { email: 'not-an-email', password: '' });
    expect(res.status).toBe(400);
    const paths = res.body.error.issues.map((i: { path: string }) => i.path);
    expect(paths).toEqual(expect.arrayContaining(['email', 'password']));
  });

  it('when the JSON is malformed, then 400 not 500', async () => {
    const res = await t.client().agent.post('/api/auth/sign-in').set('Host', HOST).set('Origin', ORIGIN).set('Content-Type', 'application/json').send('{"email":');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_request');
  });

  it('when the body is over 1 MB, then 413', async () => {
    const res = await t.client().post('/api/auth/sign-in', { email: 'a@b.test', password: 'x'.repeat(1_100_000) });
    expect(res.status).toBe(413);
  });
});

describe('origin check', () => {
  it('when a POST carries no Origin, then 403', async () => {
    const res = await t.client().agent.post('/api/auth/sign-in').set('Host', HOST).send({ email: 'admin@roostline.test', password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
  });
  it('when a POST carries a foreign Origin, then 403', async () => {
    const res = await t.client().agent.post('/api/auth/sign-in').set('Host', HOST).set('Origin', 'http://evil.test').send({ email: 'admin@roostline.test', password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
  });
});

describe('sessions', () => {
  it('when a user signs out, then the session ends server-side and the cookie no longer works', async () => {
    const c = await t.as('planner');
    expect((await c.get('/api/me')).status).toBe(200);
    const before = await t.orm.em.fork().count(Session, {});
    expect((await c.post('/api/auth/sign-out')).status).toBe(204);
    expect(await t.orm.em.fork().count(Session, {})).toBe(before - 1);
    expect((await c.get('/api/me')).status).toBe(401);
  });

  it('when the app asks who is signed in, then the probe answers 200 with the user or with null, and /api/me keeps its 401', async () => {
    const anon = t.client();
    const none = await anon.get('/api/auth/session');
    expect(none.status).toBe(200);
    expect(none.body).toEqual({ user: null });
    expect((await anon.get('/api/me')).status).toBe(401);
    const c = await t.as('safety');
    const signedIn = await c.get('/api/auth/session');
    expect(signedIn.status).toBe(200);
    expect(signedIn.body.user).toMatchObject({ email: 'safety@roostline.test', roles: ['safety'] });
    expect(signedIn.body.user).toEqual((await c.get('/api/me')).body.user);
    // An ended session is "nobody" to the probe, and 401 everywhere else.
    expect((await c.post('/api/auth/sign-out')).status).toBe(204);
    expect((await c.get('/api/auth/session')).body).toEqual({ user: null });
    expect((await c.get('/api/spans')).status).toBe(401);
  });

  it('when a user changes the password, then the old one stops working and the new one works', async () => {
    const c = await t.as('surveyor');
    const bad = await c.post('/api/me/password', { currentPassword: 'wrong-one-here', newPassword: 'a-new-long-secret' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues[0].path).toBe('currentPassword');
    const common = await c.post('/api/me/password', { currentPassword: DEMO_PASSWORD, newPassword: 'password123' });
    expect(common.status).toBe(400);
    const ok = await c.post('/api/me/password', { currentPassword: DEMO_PASSWORD, newPassword: 'a-new-long-secret' });
    expect(ok.status).toBe(204);
    expect((await t.client().post('/api/auth/sign-in', { email: 'surveyor@roostline.test', password: DEMO_PASSWORD })).status).toBe(401);
    expect((await t.client().post('/api/auth/sign-in', { email: 'surveyor@roostline.test', password: 'a-new-long-secret' })).status).toBe(200);
    // The session that changed the password stays signed in.
    expect((await c.get('/api/me')).status).toBe(200);
  });

  it('when a user updates name and unit system, then /api/me returns them', async () => {
    const c = await t.as('admin');
    const res = await c.patch('/api/me', { name: 'Imogen T.', unitSystem: 'us' });
    expect(res.status).toBe(200);
    expect((await c.get('/api/me')).body.user).toMatchObject({ name: 'Imogen T.', unitSystem: 'us' });
    expect((await c.patch('/api/me', { unitSystem: 'imperial' })).body.error.issues[0].path).toBe('unitSystem');
  });
});

describe('session checks', () => {
  /** A fresh session of the role's demo account: the client that holds it and its id. */
  async function session(role: string) {
    const c = t.client();
    const res = await c.post('/api/auth/sign-in', { email: `${role}@roostline.test`, password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    const id = new RegExp(`${SESSION_COOKIE}=([^;]+)`).exec(String(res.headers['set-cookie']))![1];
    return { c, id };
  }
  const stored = (id: string) => t.orm.em.fork().findOne(Session, { id });

  it('when a session has expired, then it is refused, its cookie is blanked and its row is deleted', async () => {
    const { c, id } = await session('planner');
    expect((await c.get('/api/spans')).status).toBe(200);
    await t.orm.em.fork().nativeUpdate(Session, { id }, { expiresAt: new Date(Date.now() - 60_000) });
    const res = await c.get('/api/me');
    expect(res.status).toBe(401);
    expect(String(res.headers['set-cookie'])).toMatch(new RegExp(`${SESSION_COOKIE}=;`));
    expect(await stored(id)).toBeNull();
    expect((await c.get('/api/spans')).status).toBe(401);
  });

  it('when a session is past half its life, then it is renewed: 12 hours from now, stored, and the cookie is sent again', async () => {
    const { c, id } = await session('planner');
    await t.orm.em.fork().nativeUpdate(Session, { id }, { expiresAt: new Date(Date.now() + 60 * 60_000) });
    const before = Date.now();
    const res = await c.get('/api/me');
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe('planner@roostline.test');
    expect(String(res.headers['set-cookie'])).toContain(`${SESSION_COOKIE}=${id}`);
    const renewed = (await stored(id))!.expiresAt.getTime();
    expect(renewed).toBeGreaterThanOrEqual(before + 12 * 3600_000 - 1000);
    expect(renewed).toBeLessThanOrEqual(Date.now() + 12 * 3600_000 + 1000);
    // A session well inside its life is not renewed: no cookie, the stored expiry stays.
    const again = await c.get('/api/me');
    expect(again.status).toBe(200);
    expect(again.headers['set-cookie']).toBeUndefined();
    expect((await stored(id))!.expiresAt.getTime()).toBe(renewed);
  });

  it('when a session is well inside its life, then the request is answered as its user and the stored expiry stays', async () => {
    const { c, id } = await session('safety');
    const expiresAt = (await stored(id))!.expiresAt.getTime();
    const res = await c.get('/api/me');
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: 'safety@roostline.test', roles: ['safety'], unitSystem: 'metric' });
    expect(res.headers['set-cookie']).toBeUndefined();
    expect((await stored(id))!.expiresAt.getTime()).toBe(expiresAt);
  });

  it("when a user is deactivated while a session is open, then that session is refused and deleted, and the others' still work", async () => {
    const { c, id } = await session('admin');
    const other = await t.as('planner');
    // Straight in the database, so only the request's own session check stands between the session and the data.
    await sql.run(t.orm.em.fork(), 'update users set active = ? where email = ?', [false, 'admin@roostline.test']);
    try {
      const res = await c.get('/api/me');
      expect(res.status).toBe(401);
      expect(String(res.headers['set-cookie'])).toMatch(new RegExp(`${SESSION_COOKIE}=;`));
      expect(await stored(id)).toBeNull();
      expect((await c.get('/api/spans')).status).toBe(401);
      expect((await other.get('/api/spans')).status).toBe(200);
    } finally {
      await sql.run(t.orm.em.fork(), 'update users set active = ? where email = ?', [true, 'admin@roostline.test']);
    }
  });

  it('when the signed-in user changes their own name, then the user the session check gave the request is saved', async () => {
    const { c } = await session('planner');
    const name = (await c.get('/api/me')).body.user.name as string;
    expect((await c.patch('/api/me', { name: 'Renamed Planner' })).status).toBe(200);
    const row = await sql.get<{ name: string }>(t.orm.em.fork(), 'select name from users where email = ?', ['planner@roostline.test']);
    expect(row!.name).toBe('Renamed Planner');
    expect((await c.patch('/api/me', { name })).status).toBe(200);
  });
});

describe('route guards', () => {
  it('when a route is called without a session, then every non-public route answers 401', async () => {
    const guarded = routeTable.filter((r) => r.access !== 'public');
    expect(guarded.length).toBeGreaterThan(2);
    for (const route of guarded) {
      const url = route.path.replace(/:(\w+)/g, 'x');
      const res = await t.client()[route.method](url);
      expect(res.status, `${route.method} ${route.path}`).toBe(401);
    }
  });

  it('when an unknown API path is called, then a JSON 404', async () => {
    const res = await t.client().get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('rate limit', () => {
  it('when sign-in fails a burst of times, then 429', async () => {
    const own = await makeTestApp({ signInBurst: 5 });
    const c = own.client();
    const statuses: number[] = [];
    for (let i = 0; i < 7; i++) {
      statuses.push((await c.post('/api/auth/sign-in', { email: 'admin@roostline.test', password: `wrong-${i}` })).status);
    }
    expect(statuses.slice(0, 5).every((s) => s === 401)).toBe(true);
    expect(statuses.at(-1)).toBe(429);
    // The right password is refused too while the limit holds.
    expect((await c.post('/api/auth/sign-in', { email: 'admin@roostline.test', password: DEMO_PASSWORD })).status).toBe(429);
    await own.close();
  });
});
