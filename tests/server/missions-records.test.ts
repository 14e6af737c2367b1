import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { lonFor, makeLine, spansAlong } from './missions-fixtures.ts';
import { waitForAllJobs } from './assessment-helpers.ts';
import { LIGHT_QUAD, CLAMP_S } from '../../shared/engineering/demo-profiles.ts';
import { User } from '../../server/modules/auth/user.entity.ts';
import { MissionPerch } from '../../server/modules/missions/mission.entity.ts';
import type { Line } from '../../server/modules/inventory/line.entity.ts';
import type { Span } from '../../server/modules/inventory/span.entity.ts';

// Mission records (api.md "Missions"): save, list, read, replan, history, authorise, staleness.
let t: TestApp;
let planner: Client;
let safety: Client;
let surveyor: Client;
let admin: Client;
let line: Line;

const LON0 = -130.5;
const DEPART = '2026-06-01T09:00:00+02:00';
const request = (lat: number, over: Record<string, unknown> = {}) => ({
  name: `Mission at ${lat}`,
  droneProfileId: LIGHT_QUAD.id,
  harvesterProfileId: CLAMP_S.id,
  base: { lat, lon: LON0 },
  // 24 km east: beyond one battery (11.5 km calm reach, engineering.md §10), two perches at 8 and 16 km.
  target: { lat, lon: LON0 + lonFor(24_000, lat) },
  departAt: DEPART,
  ...over,
});

/** Two approved perches at 8 and 16 km on the band's own line. */
async function network(lat: number, ofLine = line): Promise<Span[]> {
  return spansAlong(t.orm, ofLine, lat, LON0, [8_000, 16_000]);
}

async function save(lat: number, over: Record<string, unknown> = {}) {
  const res = await planner.post('/api/missions', request(lat, over));
  expect(res.status).toBe(201);
  return res.body;
}

async function permit(lineId: string, validFrom: string, validTo: string, reference = `HV-${validFrom}-${Math.random().toString(36).slice(2, 6)}`) {
  const res = await safety.post(`/api/lines/${lineId}/permissions`, { reference, validFrom, validTo, conditions: 'Daylight only' });
  expect(res.status).toBe(201);
}

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  [planner, safety, surveyor, admin] = await Promise.all([t.as('planner'), t.as('safety'), t.as('surveyor'), t.as('admin')]);
  line = await makeLine(t.orm);
  await network(-30.2);
});
afterAll(() => t.close());

describe('saving and reading', () => {
  it('when a planner saves a plan, then it is a mission with the server’s plan, the planner and version 1, listed and readable by every role', async () => {
    const m = await save(-30.2);
    expect(m.id).toBeTruthy();
    expect(m.stale).toBe(false);
    expect(m.staleReasons).toEqual([]);
    expect(m.status).toBe('planned');
    expect(m.version).toBe(1);
    expect(m.plan.feasible).toBe(true);
    expect(m.plan.perches).toHaveLength(2);
    expect(m.input.departAt).toBe(DEPART);
    expect(m.plannerName).toBeTruthy();
    for (const c of [surveyor, safety, admin]) {
      const got = await c.get(`/api/missions/${m.id}`);
      expect(got.status).toBe(200);
      expect(got.body.plan).toEqual(m.plan);
    }
    const list = await surveyor.get('/api/missions');
    expect(list.body.items.map((x: { id: string }) => x.id)).toContain(m.id);
  });

  it('when a surveyor or a safety officer tries to save, then 403; a plan with no route is not saved (409)', async () => {
    expect((await surveyor.post('/api/missions', request(-30.2))).status).toBe(403);
    expect((await safety.post('/api/missions', request(-30.2))).status).toBe(403);
    const before = (await planner.get('/api/missions')).body.items.length;
    const none = await planner.post('/api/missions', request(-30.2, { target: { lat: -30.2, lon: LON0 + lonFor(60_000, -30.2) } }));
    expect(none.status).toBe(409);
    expect(none.body.error.message).toMatch(/no route/i);
    expect((await planner.get('/api/missions')).body.items.length).toBe(before);
  });

  it('when the name is missing or the input is bad, then 400 naming the field and nothing is saved', async () => {
    const res = await planner.post('/api/missions', { ...request(-30.2), name: '' });
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain('name');
    const bad = await planner.post('/api/missions', request(-30.2, { departAt: '2026-06-01T25:00:00Z' }));
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path)).toContain('departAt');
  });

  it('when six saves arrive at once, then six missions with distinct ids; the same Idempotency-Key sent three times at once makes one', async () => {
    const before = (await planner.get('/api/missions')).body.items.length;
    const results = await Promise.all(Array.from({ length: 6 }, (_, i) => planner.post('/api/missions', request(-30.2, { name: `Parallel ${i}` }))));
    expect(results.map((r) => r.status)).toEqual(Array(6).fill(201));
    expect(new Set(results.map((r) => r.body.id)).size).toBe(6);
    const keyed = await Promise.all(Array.from({ length: 3 }, () => planner.post('/api/missions', request(-30.2, { name: 'Keyed' })).set('Idempotency-Key', 'mission-keyed-1')));
    expect(keyed.map((r) => r.status)).toEqual([201, 201, 201]);
    expect(new Set(keyed.map((r) => r.body.id)).size).toBe(1);
    expect((await planner.get('/api/missions')).body.items.length).toBe(before + 7);
  });
});

describe('replanning', () => {
  it('when a planner replans with a new departure, then the same mission has the new plan, version + 1 and both steps in its history', async () => {
    const m = await save(-30.2, { name: 'Replanned' });
    const res = await planner.post(`/api/missions/${m.id}/replan`, { version: m.version, departAt: '2026-06-01T21:00:00+02:00' });
    expect(res.status).toBe(200);
    expect(res.body.id).toBe(m.id);
    expect(res.body.version).toBe(m.version + 1);
    expect(res.body.input.departAt).toBe('2026-06-01T21:00:00+02:00');
    expect(res.body.plan.perches[0].arriveAt.startsWith('2026-06-01T21')).toBe(true);
    expect(res.body.input.base).toEqual(m.input.base);
    const history = await surveyor.get(`/api/missions/${m.id}/history`);
    expect(history.status).toBe(200);
    expect(history.body.items.map((e: { action: string }) => e.action)).toEqual(['mission.create', 'mission.replan']);
    expect(history.body.items[1].actorName).toBe(m.plannerName);
  });

  it('when four replans of the same version race, then one is saved, the others answer 409, and the saved plan keeps all its perches', async () => {
    const m = await save(-30.2, { name: 'Raced' });
    const results = await Promise.all([10, 11, 12, 13].map((h) => planner.post(`/api/missions/${m.id}/replan`, { version: m.version, departAt: `2026-06-01T${h}:00:00+02:00` })));
    expect(results.map((r) => r.status).sort()).toEqual([200, 409, 409, 409]);
    const saved = (await planner.get(`/api/missions/${m.id}`)).body;
    expect(saved.version).toBe(m.version + 1);
    const rows = await t.orm.em.fork().find(MissionPerch, { missionId: m.id }, { orderBy: { seq: 'asc' } });
    expect(rows.map((r) => r.spanId)).toEqual(saved.plan.perches.map((p: { spanId: string }) => p.spanId));
  });

  it('when a surveyor tries to replan, then 403', async () => {
    const m = await save(-30.2, { name: 'Not theirs' });
    expect((await surveyor.post(`/api/missions/${m.id}/replan`, {})).status).toBe(403);
  });
});

describe('authorising', () => {
  it('when a perch line has no permission valid on the departure date, then 409 naming the line; with one, safety authorises', async () => {
    const m = await save(-30.2, { name: 'Needs permission' });
    const refused = await safety.post(`/api/missions/${m.id}/authorise`, { version: m.version });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain(line.name);
    // A permission that ended the day before the departure does not count.
    await permit(line.id, '2026-01-01', '2026-05-31');
    expect((await safety.post(`/api/missions/${m.id}/authorise`, {})).status).toBe(409);
    await permit(line.id, '2026-06-01', '2026-06-30');
    const ok = await safety.post(`/api/missions/${m.id}/authorise`, { version: m.version });
    expect(ok.status).toBe(200);
    expect(ok.body.status).toBe('authorised');
    expect(ok.body.authorisedByName).toBeTruthy();
    expect(ok.body.authorisedAt).toBeTruthy();
    expect((await safety.post(`/api/missions/${m.id}/authorise`, {})).status).toBe(409);
  });

  it('when a planner or a surveyor tries to authorise, then 403', async () => {
    const m = await save(-30.2, { name: 'Role check' });
    expect((await planner.post(`/api/missions/${m.id}/authorise`, {})).status).toBe(403);
    expect((await surveyor.post(`/api/missions/${m.id}/authorise`, {})).status).toBe(403);
  });

  it('when the safety officer planned the mission themselves, then authorising it is refused (403)', async () => {
    const em = t.orm.em.fork();
    const both = await em.findOneOrFail(User, { email: 'safety@roostline.test' });
    both.roles = ['safety', 'planner'];
    await em.flush();
    const res = await safety.post('/api/missions', request(-30.2, { name: 'Own mission' }));
    expect(res.status).toBe(201);
    const self = await safety.post(`/api/missions/${res.body.id}/authorise`, {});
    expect(self.status).toBe(403);
    expect(self.body.error.message).toMatch(/another safety officer/);
    both.roles = ['safety'];
    await em.flush();
  });
});

describe('needs a new plan', () => {
  it('when a perch span is suspended, then the mission is marked with the reason, loses its authorisation, and authorising answers 409', async () => {
    const spans = await network(-31.2);
    const m = await save(-31.2, { name: 'Suspended perch' });
    await permit(line.id, '2026-06-01', '2026-06-01');
    expect((await safety.post(`/api/missions/${m.id}/authorise`, {})).status).toBe(200);
    const sus = await safety.post(`/api/spans/${spans[0]!.id}/suspend`, { reason: 'bird nest on the crossarm' });
    expect(sus.status).toBe(200);
    const got = (await planner.get(`/api/missions/${m.id}`)).body;
    expect(got.stale).toBe(true);
    expect(got.status).toBe('planned');
    expect(got.authorisedAt).toBeNull();
    expect(got.staleReasons.map((r: { message: string }) => r.message).join(' ')).toMatch(/suspended \(bird nest on the crossarm\)/);
    const refused = await safety.post(`/api/missions/${m.id}/authorise`, {});
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/new plan/);
    const history = (await planner.get(`/api/missions/${m.id}/history`)).body.items.map((e: { action: string }) => e.action);
    expect(history).toContain('mission.needs-new-plan.authorisation-withdrawn');
  });

  it('when a perch span is edited, then the mission is marked; replanning clears the mark', async () => {
    const spans = await network(-32.2);
    const m = await save(-32.2, { name: 'Edited perch' });
    const span = (await surveyor.get(`/api/spans/${spans[1]!.id}`)).body;
    const edit = await surveyor.patch(`/api/spans/${span.id}`, { version: span.version, phasePosition: 'middle' });
    expect(edit.status).toBe(200);
    const got = (await planner.get(`/api/missions/${m.id}`)).body;
    expect(got.stale).toBe(true);
    expect(got.staleReasons[0].code).toBe('span-edited');
    const again = await planner.post(`/api/missions/${m.id}/replan`, {});
    expect(again.status).toBe(200);
    expect(again.body.stale).toBe(false);
    expect(again.body.staleReasons).toEqual([]);
  });

  it('when a new exclude zone cuts a leg, then the mission is marked naming the zone', async () => {
    const lat = -33.2;
    await network(lat);
    const m = await save(lat, { name: 'Zone after plan' });
    const lon = LON0 + lonFor(4_000, lat);
    const zone = await safety.post('/api/zones', {
      name: 'Hay harvest',
      reason: 'machinery in the field',
      severity: 'exclude',
      geometry: { type: 'Polygon', coordinates: [[[lon - 0.002, lat - 0.01], [lon + 0.002, lat - 0.01], [lon + 0.002, lat + 0.01], [lon - 0.002, lat + 0.01], [lon - 0.002, lat - 0.01]]] },
    });
    expect(zone.status).toBe(201);
    const got = (await planner.get(`/api/missions/${m.id}`)).body;
    expect(got.stale).toBe(true);
    expect(got.staleReasons.find((r: { code: string }) => r.code === 'zone-cuts-leg').message).toMatch(/Hay harvest.*leg 1/);
  });

  it('when a profile change rescores a perch span below its gates, then the mission is marked naming the gate', async () => {
    const lat = -34.2;
    const own = await makeLine(t.orm);
    await network(lat, own);
    const m = await save(lat, { name: 'Rescored perch' });
    // A 20 °C contact limit is below any loaded conductor's temperature in the design weather (IEEE Std 738 heat balance).
    const profile = (await admin.get('/api/profiles/harvesters')).body.items.find((h: { id: string }) => h.id === CLAMP_S.id);
    const res = await admin.patch(`/api/profiles/harvesters/${CLAMP_S.id}`, { version: profile.version, contactTempLimitC: 20 });
    expect(res.status).toBe(200);
    await waitForAllJobs(admin);
    const got = (await planner.get(`/api/missions/${m.id}`)).body;
    expect(got.stale).toBe(true);
    expect(got.staleReasons.map((r: { code: string }) => r.code)).toContain('span-not-perchable');
    expect(got.staleReasons.map((r: { message: string }) => r.message).join(' ')).toMatch(/contact temperature/);
  });
});
