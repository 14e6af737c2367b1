// The demo scenario's mission side: a newcomer finds the owner's permissions on the demo lines (one expired, for
// show) and a base and job site that need at least two perches with the demo drone.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { seedDemoScenario } from '../../server/seeders/index.ts';
import { DEMO_MISSION, demoDepartAt } from '../../server/seeders/demo-missions.ts';
import { DEMO_LINES } from '../../server/seeders/demo-inventory.ts';
import { linesLackingPermission } from '../../server/modules/line-permissions/line-permissions.service.ts';
import { geodesicInverse } from '../../shared/engineering/geodesic.ts';
import { LIGHT_QUAD } from '../../shared/engineering/demo-profiles.ts';

let t: TestApp;
let planner: Client;
const now = new Date();

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 }, { seed: (orm) => seedDemoScenario(orm.em.fork(), now) });
  planner = await t.as('planner');
}, 180_000);
afterAll(() => t?.close());

describe('demo missions', () => {
  it('when the demo departs 09:00 local the next day, then its time is written with the region’s own offset', () => {
    expect(demoDepartAt(new Date('2026-12-03T12:00:00Z'))).toBe('2026-12-04T09:00:00-09:00');
    // 05:00 UTC on 3 Dec is still 2 Dec in UTC−09:00: the next local day is 3 Dec.
    expect(demoDepartAt(new Date('2026-12-03T05:00:00Z'))).toBe('2026-12-03T09:00:00-09:00');
  });

  it('when a planner plans the demo base to the demo job site with the demo drone, then the route needs at least two perches, all on lines with a permission valid that day', async () => {
    const departAt = demoDepartAt(now);
    // The job site lies beyond one battery: the calm reach of the demo quad is 11.52 km (engineering.md §10 worked example).
    const directM = geodesicInverse({ latDeg: DEMO_MISSION.base.lat, lonDeg: DEMO_MISSION.base.lon }, { latDeg: DEMO_MISSION.target.lat, lonDeg: DEMO_MISSION.target.lon }).lengthM;
    expect(directM).toBeGreaterThan(2 * 11_520 * 0.9);
    const res = await planner.post('/api/missions/plan', { ...DEMO_MISSION, departAt });
    expect(res.status).toBe(200);
    expect(res.body.feasible, JSON.stringify(res.body).slice(0, 400)).toBe(true);
    expect(res.body.perches.length).toBeGreaterThanOrEqual(2);
    expect(res.body.legs[0].socStartPct).toBe(100);
    for (const leg of res.body.legs) expect(leg.socEndPct).toBeGreaterThanOrEqual(LIGHT_QUAD.reservePercent - 1e-9);
    const lineIds = res.body.perches.map((p: { lineId: string }) => p.lineId);
    expect(await linesLackingPermission(t.orm.em.fork(), lineIds, departAt.slice(0, 10))).toEqual([]);
  });

  it('when the lines are read, then the perch line has a permission in force and another line shows one expired', async () => {
    const lines = (await planner.get('/api/lines')).body.items as { id: string; name: string }[];
    const perms = async (name: string) => (await planner.get(`/api/lines/${lines.find((l) => l.name === name)!.id}/permissions`)).body.items;
    const ridge = await perms(DEMO_LINES[0]!.name);
    expect(ridge.some((p: { expired: boolean; notYetValid: boolean }) => !p.expired && !p.notYetValid)).toBe(true);
    const feeder = await perms(DEMO_LINES[2]!.name);
    expect(feeder).toHaveLength(1);
    expect(feeder[0].expired).toBe(true);
    expect(feeder[0].conditions).not.toBe('');
  });

  it('when a newcomer opens the missions, then the demo mission is saved, authorised by safety, holds, and perches at least twice', async () => {
    const list = (await planner.get('/api/missions')).body.items as { id: string; name: string }[];
    const demo = list.find((m) => m.name === DEMO_MISSION.name);
    expect(demo).toBeDefined();
    const m = (await planner.get(`/api/missions/${demo!.id}`)).body;
    expect(m.stale).toBe(false);
    expect(m.status).toBe('authorised');
    expect(m.authorisedByName).toBe('Bram Okonkwo-Reyes');
    expect(m.plannerName).toBe('Sunniva Marsh');
    expect(m.plan.feasible).toBe(true);
    expect(m.plan.perches.length).toBeGreaterThanOrEqual(2);
    expect(m.departAt).toBe(demoDepartAt(now));
    // Its exports open: one route point per base, perch and job site.
    const gpx = await planner.get(`/api/missions/${demo!.id}/export.gpx`);
    expect(gpx.status).toBe(200);
    expect(gpx.text.match(/<rtept /g)).toHaveLength(m.plan.perches.length + 2);
  });
});

