import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { ROLES, type Role } from '../../shared/roles.ts';
import { routeTable, type RouteRecord } from '../../server/http/access.ts';
import { SESSION_COOKIE } from '../../server/modules/auth/lucia.ts';

// Walks every route any feature registered (read after createApp, so routes added later are covered too)
// with every role and without a session, and checks the access each route declares.
let t: TestApp;
const clients = new Map<Role, Client>();
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 100_000 });
  for (const role of ROLES) clients.set(role, await t.as(role));
});
afterAll(() => t?.close());

/** A concrete URL for a route pattern: every parameter becomes "x" (no such record). */
function urlFor(route: RouteRecord) {
  return route.path
    .replace(/\{\/?\*(\w+)\}/g, '/x')
    .replace(/\*(\w+)/g, 'x')
    .replace(/:(\w+)/g, 'x')
    .replace(/[{}]/g, '');
}

function allowed(route: RouteRecord, role: Role | null) {
  if (route.access === 'public') return true;
  if (role === null) return false;
  if (route.access === 'signed-in') return true;
  return route.access.includes(role);
}

async function call(c: Client, route: RouteRecord) {
  const url = urlFor(route);
  return route.method === 'get' || route.method === 'delete' ? c[route.method](url) : c[route.method](url, {});
}

/** A call that ended the session (sign-out, password change …) gets the role a fresh one. */
async function ensureSignedIn(role: Role, res: { headers: Record<string, unknown> }) {
  const cookies = String(res.headers['set-cookie'] ?? '');
  if (cookies.includes(`${SESSION_COOKIE}=;`) || cookies.includes(`${SESSION_COOKIE}=""`)) clients.set(role, await t.as(role));
}

describe('role × route table', () => {
  it('when the app is built, then the table holds the routes of every feature, each with a declared access', () => {
    expect(routeTable.length).toBeGreaterThan(20);
    const keys = routeTable.map((r) => `${r.method} ${r.path}`);
    expect(keys).toEqual(expect.arrayContaining(['get /api/me', 'post /api/admin/invitations', 'get /api/admin/outbox', 'post /api/admin/users/:id/deactivate', 'get /api/audit']));
    for (const r of routeTable) expect(r.access === 'public' || r.access === 'signed-in' || (Array.isArray(r.access) && r.access.length > 0), r.path).toBe(true);
  });

  it('when anonymous, then every non-public route answers 401', async () => {
    const failures: string[] = [];
    for (const route of routeTable) {
      if (route.access === 'public') continue;
      const res = await call(t.client(), route);
      if (res.status !== 401) failures.push(`${route.method.toUpperCase()} ${route.path} → ${res.status}`);
    }
    expect(failures).toEqual([]);
  });

  it.each(ROLES)('when signed in as %s, then routes outside the role answer 403 and routes inside it neither 401 nor 403', async (role) => {
    const failures: string[] = [];
    let checked = 0;
    for (const route of routeTable) {
      const res = await call(clients.get(role)!, route);
      checked++;
      if (allowed(route, role)) {
        if (res.status === 401 || res.status === 403) failures.push(`${route.method.toUpperCase()} ${route.path} → ${res.status}, expected access`);
      } else if (res.status !== 403) {
        failures.push(`${route.method.toUpperCase()} ${route.path} → ${res.status}, expected 403`);
      }
      await ensureSignedIn(role, res);
    }
    expect(checked).toBe(routeTable.length);
    expect(failures).toEqual([]);
  });

  it('when the table says a route is for some roles only, then at least one role holds it', () => {
    for (const route of routeTable.filter((r) => Array.isArray(r.access))) {
      const roles = ROLES.filter((role) => allowed(route, role));
      expect(roles.length, route.path).toBeGreaterThan(0);
    }
  });
});
