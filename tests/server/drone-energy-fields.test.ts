import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';

let t: TestApp;
let admin: Client;
let planner: Client;
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  [admin, planner] = await Promise.all([t.as('admin'), t.as('planner')]);
});
afterAll(() => t.close());

const drone = { name: 'Wren quad', batteryWh: 120, reservePercent: 20, cruiseSpeedMps: 13, windLimitMps: 11, payloadKg: 2, approachClearanceM: 3 };

describe('drone profile energy fields', () => {
  it('when the demo drones are listed, then each carries cruise power, perch manoeuvre energy, charge efficiency and charge-to level', async () => {
    const items = (await planner.get('/api/profiles/drones')).body.items as Record<string, number>[];
    expect(items.length).toBeGreaterThanOrEqual(2);
    for (const d of items) {
      expect(d.cruisePowerW).toBeGreaterThan(0);
      expect(d.perchManoeuvreWh).toBeGreaterThanOrEqual(0);
      expect(d.chargeEfficiency).toBeGreaterThan(0);
      expect(d.chargeEfficiency).toBeLessThanOrEqual(1);
      expect(d.chargeToPercent).toBeGreaterThan(d.reservePercent);
    }
  });

  it('when created without them, then charge efficiency is 0.95 and charge-to 100 %; an edit of one field keeps the others and bumps the version', async () => {
    const res = await admin.post('/api/profiles/drones', drone);
    expect(res.status).toBe(201);
    expect(res.body.chargeEfficiency).toBe(0.95);
    expect(res.body.chargeToPercent).toBe(100);
    const edit = await admin.patch(`/api/profiles/drones/${res.body.id}`, { version: res.body.version, cruisePowerW: 350, chargeToPercent: 90 });
    expect(edit.status).toBe(200);
    expect(edit.body).toMatchObject({ cruisePowerW: 350, chargeToPercent: 90, chargeEfficiency: 0.95, batteryWh: 120, version: res.body.version + 1 });
    const again = await admin.patch(`/api/profiles/drones/${res.body.id}`, { version: edit.body.version, perchManoeuvreWh: 4 });
    expect(again.body).toMatchObject({ cruisePowerW: 350, chargeToPercent: 90, perchManoeuvreWh: 4 });
  });

  it('when out of range or not a number, then 400 naming the field', async () => {
    const bad = await admin.post('/api/profiles/drones', { ...drone, name: 'Wren 2', chargeEfficiency: 1.2, chargeToPercent: 0, cruisePowerW: 'fast' });
    expect(bad.status).toBe(400);
    const paths = (bad.body.error.issues as { path: string }[]).map((i) => i.path);
    expect(paths).toEqual(expect.arrayContaining(['chargeEfficiency', 'chargeToPercent', 'cruisePowerW']));
    expect((await planner.post('/api/profiles/drones', { ...drone, name: 'Wren 3' })).status).toBe(403);
  });
});
