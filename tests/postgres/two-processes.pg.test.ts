// Two server processes (the entry `npm start` runs) on one PostgreSQL database and one uploads folder, as behind
// a load balancer: what one writes, the other shows; a guard that needs the whole picture holds across both.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { VectorTile } from '@mapbox/vector-tile';
import { PbfReader } from 'pbf';
import { newDataDir, startServer, type ChildServer } from '../server/child-server.ts';
import { freshPostgresDatabase } from './databases.ts';
import { DEMO_PASSWORD } from '../../server/seeders/demo-users.ts';

let dbUrl: string;
let dataDir: string;
let a: ChildServer;
let b: ChildServer;

/** A cookie-keeping client of one child server, sending its own Origin. */
function clientOf(server: ChildServer) {
  let cookie = '';
  const call = async (method: string, url: string, body?: unknown) => {
    const res = await fetch(server.baseUrl + url, {
      method,
      headers: { Origin: server.baseUrl, ...(cookie ? { Cookie: cookie } : {}), ...(body ? { 'Content-Type': 'application/json' } : {}) },
      body: body ? JSON.stringify(body) : undefined,
    });
    const set = res.headers.getSetCookie?.() ?? [];
    if (set.length) cookie = set.map((c) => c.split(';')[0]).join('; ');
    return res;
  };
  return {
    get: (url: string) => call('GET', url),
    post: (url: string, body?: unknown) => call('POST', url, body ?? {}),
    signIn: async (email: string) => {
      const res = await call('POST', '/api/auth/sign-in', { email, password: DEMO_PASSWORD });
      expect(res.status).toBe(200);
    },
  };
}

const lonToTileX = (lon: number, z: number) => Math.floor(((lon + 180) / 360) * 2 ** z);
const latToTileY = (lat: number, z: number) => {
  const r = (lat * Math.PI) / 180;
  return Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z);
};
const AT = { lon: -131.615, lat: -31.4 };
/** Failed sign-ins allowed per client address in the window, on both processes together. */
const BURST = 4;

async function spansInTile(c: ReturnType<typeof clientOf>) {
  const res = await c.get(`/api/tiles/spans/14/${lonToTileX(AT.lon + 0.001, 14)}/${latToTileY(AT.lat, 14)}.mvt`);
  expect(res.status).toBe(200);
  const tile = new VectorTile(new PbfReader(new Uint8Array(await res.arrayBuffer())));
  const layer = tile.layers.spans;
  return layer ? Array.from({ length: layer.length }, (_, i) => String(layer.feature(i).properties.id)) : [];
}

beforeAll(async () => {
  dbUrl = (await freshPostgresDatabase())!;
  dataDir = newDataDir();
  const env = { DATABASE_URL: dbUrl, UPLOADS_DIR: path.join(dataDir, 'uploads'), SEED_DEMO: 'true', SIGN_IN_BURST: String(BURST) };
  // Both start at once: one applies the migrations and seeds, the other waits for its lock and finds it done.
  [a, b] = await Promise.all([startServer(dataDir, env), startServer(dataDir, env)]);
}, 240_000);

afterAll(async () => {
  for (const s of [a, b]) {
    if (s && s.proc.exitCode === null) {
      s.proc.kill('SIGTERM');
      await s.exited;
    }
  }
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe('two server processes on one PostgreSQL', () => {
  it('when both start at once, then the demo is seeded once', async () => {
    const client = new pg.Client({ connectionString: dbUrl });
    await client.connect();
    try {
      const { rows } = await client.query("select count(*)::int as n from users where email = 'admin@roostline.test'");
      expect(rows[0].n).toBe(1);
    } finally {
      await client.end();
    }
  });

  it('when a span is added through process A, then process B’s span tile shows it without a restart', async () => {
    const onA = clientOf(a);
    const onB = clientOf(b);
    await onA.signIn('surveyor@roostline.test');
    await onB.signIn('planner@roostline.test');
    expect(await spansInTile(onB)).toEqual([]);
    const line = await (await onA.post('/api/lines', { name: 'Two-process line', owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, loadTypicalA: 300, loadMinA: 120, loadPeakA: 520 })).json();
    const ids: string[] = [];
    for (let i = 0; i < 2; i++) {
      const s = await onA.post('/api/structures', { lineId: line.id, lat: AT.lat, lon: AT.lon + i * 0.002, kind: 'pole', attachmentHeightM: 14 });
      expect(s.status).toBe(201);
      ids.push((await s.json()).id);
    }
    const span = await onA.post('/api/spans', { lineId: line.id, fromStructureId: ids[0], toStructureId: ids[1], conductor: { codeWord: 'Linnet' }, clearanceM: 9.5, terrain: 'open-field', surveyDate: '2026-11-20' });
    expect(span.status).toBe(201);
    const spanId = (await span.json()).id;
    // Process B notices through the database's data version (its background check runs every 2 s).
    const started = Date.now();
    let seen: string[] = [];
    while (Date.now() - started < 15_000) {
      seen = await spansInTile(onB);
      if (seen.includes(spanId)) break;
      await new Promise((r) => setTimeout(r, 200));
    }
    expect(seen).toContain(spanId);
  });

  it('when the last two admins remove each other through A and B at the same moment, then one admin is left', async () => {
    const client = new pg.Client({ connectionString: dbUrl });
    await client.connect();
    try {
      // The safety officer is made a second admin.
      await client.query(`update users set roles = '["safety","admin"]'::jsonb where email = 'safety@roostline.test'`);
      const { rows } = await client.query("select id, email from users where email in ('admin@roostline.test', 'safety@roostline.test')");
      const idOf = (email: string) => rows.find((r) => r.email === email)!.id as string;
      const onA = clientOf(a);
      const onB = clientOf(b);
      await onA.signIn('admin@roostline.test');
      await onB.signIn('safety@roostline.test');
      const answers = await Promise.all([onA.post(`/api/admin/users/${idOf('safety@roostline.test')}/deactivate`), onB.post(`/api/admin/users/${idOf('admin@roostline.test')}/deactivate`)]);
      // One removal goes through; the other is refused as the last admin (409), or finds its own session already
      // ended by the first (401), depending on which request reached the database first.
      const statuses = answers.map((r) => r.status).sort();
      expect(statuses[0]).toBe(200);
      expect([401, 409]).toContain(statuses[1]);
      const left = await client.query("select count(*)::int as n from users where active and roles @> '[\"admin\"]'::jsonb");
      expect(left.rows[0].n).toBe(1);
    } finally {
      await client.end();
    }
  });

  // Last: it leaves this client address limited on both processes.
  it('when a client fails sign-in through A and B in turn, then the limit counts the attempts of both together', async () => {
    const wrong = (server: ChildServer) => clientOf(server).post('/api/auth/sign-in', { email: 'planner@roostline.test', password: 'not the password at all' });
    const statuses: number[] = [];
    for (let i = 0; i < BURST; i++) statuses.push((await wrong(i % 2 === 0 ? a : b)).status);
    expect(statuses).toEqual(Array(BURST).fill(401));
    // Each process saw only half of them; the count is shared, so the next attempt on either is refused.
    expect((await wrong(a)).status).toBe(429);
    expect((await wrong(b)).status).toBe(429);
  });
});
