import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { makeLine, makeSpan, waitForJob } from './assessment-helpers.ts';
import { Assessment } from '../../server/modules/assessment/assessment.entity.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';
import { harvest } from '../../shared/engineering/ct-harvester.ts';
import { CLAMP_S, CLAMP_R } from '../../shared/engineering/demo-profiles.ts';

let t: TestApp;
let admin: Client;
let surveyor: Client;
let planner: Client;
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  [admin, surveyor, planner] = await Promise.all([t.as('admin'), t.as('surveyor'), t.as('planner')]);
});
afterAll(() => t.close());

const newHarvester = {
  name: 'Osprey core',
  coreMaterial: 'nanocrystalline',
  turns: 400,
  coreAreaMm2: 480,
  pathLengthMm: 200,
  relativePermeability: 25000,
  airGapMm: 0.04,
  saturationT: 1.2,
  windingResistanceOhm: 0.9,
  converterEfficiency: 0.9,
  massKg: 1.4,
  gripperMinDiameterMm: 14,
  gripperMaxDiameterMm: 38,
  contactTempLimitC: 95,
  usefulMinHarvestW: 12,
};
const newDrone = { name: 'Plover quad', batteryWh: 90, reservePercent: 20, cruiseSpeedMps: 11, windLimitMps: 10, payloadKg: 2, approachClearanceM: 3 };

describe('harvester and drone profiles', () => {
  it('when a non-admin creates, edits or deletes a profile, then 403; every role reads them', async () => {
    expect((await surveyor.post('/api/profiles/harvesters', newHarvester)).status).toBe(403);
    expect((await planner.post('/api/profiles/drones', newDrone)).status).toBe(403);
    expect((await planner.patch('/api/profiles/harvesters/clamp-s', { version: 1, turns: 10 })).status).toBe(403);
    expect((await surveyor.delete('/api/profiles/drones/light-quad')).status).toBe(403);
    expect((await t.client().get('/api/profiles/harvesters')).status).toBe(401);
    for (const c of [surveyor, planner, admin]) {
      expect((await c.get('/api/profiles/harvesters/clamp-s')).status).toBe(200);
      expect((await c.get('/api/profiles/drones')).body.items.length).toBeGreaterThanOrEqual(2);
    }
  });

  it('when an admin creates, edits and deletes a harvester, then versions go up, stale edits get 409 and the audit log keeps each version', async () => {
    const created = await admin.post('/api/profiles/harvesters', newHarvester);
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ ...newHarvester, version: 1, active: true });
    const id = created.body.id;
    expect((await admin.post('/api/profiles/harvesters', newHarvester)).status).toBe(409); // name taken

    const edited = await admin.patch(`/api/profiles/harvesters/${id}`, { version: 1, turns: 450 });
    expect(edited.status).toBe(200);
    expect(edited.body).toMatchObject({ turns: 450, version: 2 });
    expect(edited.body.rescoreJobId).toEqual(expect.any(String));
    const stale = await admin.patch(`/api/profiles/harvesters/${id}`, { version: 1, turns: 500 });
    expect(stale.status).toBe(409);
    expect((await admin.get(`/api/profiles/harvesters/${id}`)).body.turns).toBe(450);

    const entries = await t.orm.em.fork().find(AuditEntry, { recordType: 'harvester-profile', recordId: id }, { orderBy: { id: 'asc' } });
    expect(entries.map((e) => e.action)).toEqual(['harvester-profile.create', 'harvester-profile.update']);
    expect(entries[1].before).toMatchObject({ turns: 400, version: 1 });
    expect(entries[1].after).toMatchObject({ turns: 450, version: 2 });

    const history = await planner.get(`/api/profiles/harvesters/${id}/history`);
    expect(history.status).toBe(200);
    expect(history.body.items.map((h: { version: number }) => h.version)).toEqual([2, 1]);

    expect((await admin.delete(`/api/profiles/harvesters/${id}`)).status).toBe(204);
    expect((await admin.get(`/api/profiles/harvesters/${id}`)).status).toBe(404);
  });

  it('when the input is nonsense, then 400 names the fields', async () => {
    const res = await admin.post('/api/profiles/harvesters', { ...newHarvester, name: '', turns: 0, converterEfficiency: 1.5, gripperMinDiameterMm: 40, gripperMaxDiameterMm: 20 });
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['name', 'turns', 'converterEfficiency']));
    const gripper = await admin.post('/api/profiles/harvesters', { ...newHarvester, name: 'Wrong way round', gripperMinDiameterMm: 40, gripperMaxDiameterMm: 20 });
    expect(gripper.status).toBe(400);
    expect(gripper.body.error.issues.map((i: { path: string }) => i.path)).toEqual(['gripperMaxDiameterMm']);
    const drone = await admin.post('/api/profiles/drones', { ...newDrone, batteryWh: -1, reservePercent: 120 });
    expect(drone.status).toBe(400);
    expect(drone.body.error.issues.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['batteryWh', 'reservePercent']));
  });

  it('when a new active drone is added, then a rescore job assesses every span for the new pairs too', async () => {
    const line = await makeLine(t.orm);
    const span = await makeSpan(t.orm, line);
    expect(await t.orm.em.fork().count(Assessment, { spanId: span.id })).toBe(4);
    const res = await admin.post('/api/profiles/drones', newDrone);
    expect(res.status).toBe(201);
    const { job } = await waitForJob(admin, res.body.rescoreJobId);
    expect(job.state).toBe('done');
    expect(await t.orm.em.fork().count(Assessment, { spanId: span.id })).toBe(6);
    expect((await admin.delete(`/api/profiles/drones/${res.body.id}`)).status).toBe(204);
    expect(await t.orm.em.fork().count(Assessment, { spanId: span.id })).toBe(4);
  });
});

describe('bench tests', () => {
  it('when an admin records a bench test, then it shows ≈702 A, ≈84 W and its deviation from the model', async () => {
    const res = await admin.post('/api/profiles/harvesters/clamp-s/bench-tests', { fixtureTurns: 60, fixtureCurrentA: 11.7, loadVoltageRmsV: 58, loadOhm: 40, frequencyHz: 60, note: 'first fixture run' });
    expect(res.status).toBe(201);
    expect(res.body.equivalentLineCurrentA).toBeCloseTo(702, 9); // Ampère's law: 60 turns × 11.7 A (common practice)
    expect(res.body.powerW).toBeCloseTo(84.1, 9); // Joule's law: 58² / 40 (common practice)
    const model = harvest({ currentA: 702, frequencyHz: 60, loadOhm: 40, harvester: CLAMP_S }).powerW;
    expect(res.body.modelPowerW).toBeCloseTo(model, 9);
    expect(res.body.deviationW).toBeCloseTo(84.1 - model, 9);
    const list = await planner.get('/api/profiles/harvesters/clamp-s/bench-tests');
    expect(list.body.items).toHaveLength(1);
    expect((await surveyor.post('/api/profiles/harvesters/clamp-s/bench-tests', { fixtureTurns: 60, fixtureCurrentA: 11.7, loadVoltageRmsV: 58, loadOhm: 40 })).status).toBe(403);
    const bad = await admin.post('/api/profiles/harvesters/clamp-s/bench-tests', { fixtureTurns: 0.5, fixtureCurrentA: 1, loadVoltageRmsV: 1, loadOhm: 0 });
    expect(bad.status).toBe(400);
    expect((await admin.delete(`/api/profiles/harvesters/clamp-s/bench-tests/${res.body.id}`)).status).toBe(204);
    expect((await planner.get('/api/profiles/harvesters/clamp-s/bench-tests')).body.items).toHaveLength(0);
  });

  it('when bench points come from a core with a wider gap, then fit-gap recovers that gap and applying it makes a new version', async () => {
    const trueGapMm = 0.12;
    const trueCore = { ...CLAMP_R, airGapMm: trueGapMm };
    for (const [turns, amps, loadOhm] of [[50, 4, 30], [50, 8, 30], [60, 11.7, 40], [40, 5, 60]] as const) {
      const current = turns * amps;
      const v = harvest({ currentA: current, frequencyHz: 60, loadOhm, harvester: trueCore }).loadVoltageRmsV;
      const r = await admin.post('/api/profiles/harvesters/clamp-r/bench-tests', { fixtureTurns: turns, fixtureCurrentA: amps, loadVoltageRmsV: v, loadOhm, frequencyHz: 60 });
      expect(r.status).toBe(201);
    }
    const dry = await admin.post('/api/profiles/harvesters/clamp-r/fit-gap', {});
    expect(dry.status).toBe(200);
    // Least squares on the CT model: synthetic points from the model itself are fitted back to their gap.
    expect(Math.abs(dry.body.airGapMm - trueGapMm) / trueGapMm).toBeLessThan(0.01);
    expect(dry.body.rmsErrorW).toBeLessThan(dry.body.previousRmsErrorW);
    expect(dry.body).toMatchObject({ applied: false, previousAirGapMm: CLAMP_R.airGapMm, points: 4 });
    expect(dry.body.profile.version).toBe(1);

    const applied = await admin.post('/api/profiles/harvesters/clamp-r/fit-gap', { apply: true, version: 1 });
    expect(applied.status).toBe(200);
    expect(applied.body.profile.version).toBe(2);
    expect(applied.body.profile.airGapMm).toBeCloseTo(dry.body.airGapMm, 9);
    expect(applied.body.rescoreJobId).toEqual(expect.any(String));
    await waitForJob(admin, applied.body.rescoreJobId);
    const again = await admin.post('/api/profiles/harvesters/clamp-r/fit-gap', { apply: true, version: 1 });
    expect(again.status).toBe(409);
  });

  it('when a harvester has no bench tests, then fitting its gap is a 400', async () => {
    const res = await admin.post('/api/profiles/harvesters/clamp-s-open/fit-gap', { apply: true });
    expect(res.status).toBe(400);
  });
});
