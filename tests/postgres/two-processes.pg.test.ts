// Two server processes (the entry `npm start` runs) on one PostgreSQL database and one uploads folder, as behind
// a load balancer: what one writes, the other shows; a guard that needs the whole picture holds across both.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import sharp from 'sharp';
import { VectorTile } from '@mapbox/vector-tile';
import { PbfReader } from 'pbf';
import { newDataDir, startServer, type ChildServer } from '../server/child-server.ts';
import { freshPostgresDatabase } from './databases.ts';
import { DEMO_PASSWORD } from '../../server/seeders/demo-users.ts';

let dbUrl: string;
let dataDir: string;
let a: ChildServer;
let b: ChildServer;

/** A session cookie; two clients holding the same jar are one browser whose requests reach either process. */
type Jar = { cookie: string };

/** A cookie-keeping client of one child server, sending its own Origin. */
function clientOf(server: ChildServer, jar: Jar = { cookie: '' }) {
  const call = async (method: string, url: string, body?: unknown, headers: Record<string, string> = {}) => {
    const form = body instanceof FormData;
    const res = await fetch(server.baseUrl + url, {
      method,
      headers: { Origin: server.baseUrl, ...(jar.cookie ? { Cookie: jar.cookie } : {}), ...(body && !form ? { 'Content-Type': 'application/json' } : {}), ...headers },
      body: form ? body : body ? JSON.stringify(body) : undefined,
    });
    const set = res.headers.getSetCookie?.() ?? [];
    if (set.length) jar.cookie = set.map((c) => c.split(';')[0]).join('; ');
    return res;
  };
  return {
    jar,
    get: (url: string) => call('GET', url),
    post: (url: string, body?: unknown, headers?: Record<string, string>) => call('POST', url, body ?? {}, headers),
    patch: (url: string, body: unknown) => call('PATCH', url, body),
    signIn: async (email: string) => {
      const res = await call('POST', '/api/auth/sign-in', { email, password: DEMO_PASSWORD });
      expect(res.status).toBe(200);
    },
  };
}

/** A small PNG as a multipart upload (no position: it links to nothing). */
async function photoForm(name: string) {
  const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } }).png().toBuffer();
  const form = new FormData();
  form.append('photo', new Blob([png], { type: 'image/png' }), name);
  return form;
}

async function queryDb<T = Record<string, unknown>>(text: string, params: unknown[] = []): Promise<T[]> {
  const client = new pg.Client({ connectionString: dbUrl });
  await client.connect();
  try {
    return (await client.query(text, params)).rows as T[];
  } finally {
    await client.end();
  }
}

const lonToTileX = (lon: number, z: number) => Math.floor(((lon + 180) / 360) * 2 ** z);
const latToTileY = (lat: number, z: number) => {
  const r = (lat * Math.PI) / 180;
  return Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z);
};
const AT = { lon: -131.615, lat: -31.4 };
/** Failed sign-ins (and password-reset requests) allowed per client address in the window, on both processes together. */
const BURST = 4;
/** Photo uploads allowed per user in the window, on both processes together. */
const UPLOADS = 3;

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
  const env = { DATABASE_URL: dbUrl, UPLOADS_DIR: path.join(dataDir, 'uploads'), SEED_DEMO: 'true', SIGN_IN_BURST: String(BURST), UPLOAD_BURST: String(UPLOADS) };
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

  it('when a browser signs in through A, then its session works on B; signing out through A ends it on B', async () => {
    const jar: Jar = { cookie: '' };
    const onA = clientOf(a, jar);
    const onB = clientOf(b, jar);
    await onA.signIn('surveyor@roostline.test');
    const me = await onB.get('/api/me');
    expect(me.status).toBe(200);
    expect((await me.json()).user.email).toBe('surveyor@roostline.test');
    const signedIn = jar.cookie;
    expect((await onA.post('/api/auth/sign-out')).status).toBe(204);
    // The old cookie, sent again to B (a tab that did not see the sign-out), finds no session there either.
    jar.cookie = signedIn;
    expect((await onB.get('/api/me')).status).toBe(401);
    expect((await onA.get('/api/me')).status).toBe(401);
  });

  it('when a create sent to A with an Idempotency-Key is retried on B, then there is one record and the same answer', async () => {
    const jar: Jar = { cookie: '' };
    const onA = clientOf(a, jar);
    const onB = clientOf(b, jar);
    await onA.signIn('surveyor@roostline.test');
    const body = { name: 'Retried line', owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, loadTypicalA: 300, loadMinA: 120, loadPeakA: 520 };
    const key = { 'Idempotency-Key': 'two-process-retry-1' };
    const first = await onA.post('/api/lines', body, key);
    expect(first.status).toBe(201);
    const retry = await onB.post('/api/lines', body, key);
    expect(retry.status).toBe(201);
    expect(retry.headers.get('Idempotent-Replayed')).toBe('true');
    expect(await retry.json()).toEqual(await first.json());
    expect((await queryDb<{ n: number }>('select count(*)::int as n from lines where name = $1', [body.name]))[0].n).toBe(1);
  });

  it('when the same keyed create reaches A and B at the same moment, then one record is made and both answers are the same', async () => {
    const jar: Jar = { cookie: '' };
    await clientOf(a, jar).signIn('surveyor@roostline.test');
    const body = { name: 'Raced line', owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, loadTypicalA: 300, loadMinA: 120, loadPeakA: 520 };
    for (let round = 0; round < 3; round++) {
      const key = { 'Idempotency-Key': `two-process-race-${round}` };
      const answers = await Promise.all([clientOf(a, jar).post('/api/lines', { ...body, name: `${body.name} ${round}` }, key), clientOf(b, jar).post('/api/lines', { ...body, name: `${body.name} ${round}` }, key)]);
      expect(answers.map((r) => r.status)).toEqual([201, 201]);
      const [x, y] = await Promise.all(answers.map((r) => r.json()));
      expect(y).toEqual(x);
      expect((await queryDb<{ n: number }>('select count(*)::int as n from lines where name = $1', [`${body.name} ${round}`]))[0].n).toBe(1);
    }
  });

  it('when a perch span of a saved mission is edited through A, then B reads the mission as needing a new plan and refuses to authorise it', async () => {
    const onA = clientOf(a);
    const onB = clientOf(b);
    await onA.signIn('surveyor@roostline.test');
    await onB.signIn('safety@roostline.test');
    const { items } = await (await onB.get('/api/missions')).json();
    const listed = items.find((m: { stale: boolean }) => !m.stale);
    expect(listed).toBeDefined();
    const mission = await (await onB.get(`/api/missions/${listed.id}`)).json();
    const spanId = mission.plan.perches[0].spanId as string;
    const span = await (await onA.get(`/api/spans/${spanId}`)).json();
    const edit = await onA.patch(`/api/spans/${spanId}`, { version: span.version, phasePosition: span.phasePosition === 'middle' ? 'outer' : 'middle' });
    expect(edit.status).toBe(200);
    const after = await (await onB.get(`/api/missions/${mission.id}`)).json();
    expect(after.stale).toBe(true);
    expect(after.staleReasons.map((r: { code: string }) => r.code)).toContain('span-edited');
    const refused = await onB.post(`/api/missions/${mission.id}/authorise`, {});
    expect(refused.status).toBe(409);
    expect((await refused.json()).error.message).toMatch(/new plan/);
  });

  it('when password resets are asked for through A and B in turn, then the limit counts both together', async () => {
    const ask = (server: ChildServer) => clientOf(server).post('/api/auth/request-password-reset', { email: 'planner@roostline.test' });
    const statuses: number[] = [];
    for (let i = 0; i < BURST; i++) statuses.push((await ask(i % 2 === 0 ? a : b)).status);
    expect(statuses).toEqual(Array(BURST).fill(202));
    expect((await ask(a)).status).toBe(429);
    expect((await ask(b)).status).toBe(429);
  });

  it('when a user uploads photos through A and B in turn, then the upload limit counts both together', async () => {
    const jar: Jar = { cookie: '' };
    await clientOf(a, jar).signIn('surveyor@roostline.test');
    const statuses: number[] = [];
    for (let i = 0; i < UPLOADS; i++) statuses.push((await clientOf(i % 2 === 0 ? a : b, jar).post('/api/photos', await photoForm(`p${i}.png`))).status);
    expect(statuses).toEqual(Array(UPLOADS).fill(201));
    const overB = await clientOf(b, jar).post('/api/photos', await photoForm('over-b.png'));
    expect(overB.status).toBe(429);
    expect((await overB.json()).error.message).toMatch(/Too many photo uploads/);
    expect((await clientOf(a, jar).post('/api/photos', await photoForm('over-a.png'))).status).toBe(429);
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
