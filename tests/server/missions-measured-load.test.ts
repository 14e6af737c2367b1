// The mission planner on measured load: a line with a metered series for the departure's month gives each perch
// the harvest of that month's hourly medians and says so; another month keeps the typed estimate.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { lonFor, makeLine, spansAlong } from './missions-fixtures.ts';
import { LIGHT_QUAD, CLAMP_S } from '../../shared/engineering/demo-profiles.ts';
import { harvestPowerW } from '../../shared/engineering/ct-harvester.ts';
import { DAILY_PROFILE_A } from './assessment-helpers.ts';

let t: TestApp;
let planner: Client;
const LON0 = -130.5;
const LAT = -32.4;
const METERED_A = 520;

const plan = (departAt: string) =>
  planner.post('/api/missions/plan', {
    droneProfileId: LIGHT_QUAD.id,
    harvesterProfileId: CLAMP_S.id,
    base: { lat: LAT, lon: LON0 },
    target: { lat: LAT, lon: LON0 + lonFor(16_000, LAT) },
    departAt,
  });

/** June 2026 at a flat METERED_A, 15-minute readings written at +02:00 (the departures' offset). */
function juneSeries() {
  const rows = ['timestamp,current_a'];
  const start = Date.parse('2026-06-01T00:00:00+02:00');
  const end = Date.parse('2026-07-01T00:00:00+02:00');
  for (let ms = start; ms < end; ms += 900_000) rows.push(`${new Date(ms + 2 * 3_600_000).toISOString().slice(0, 19)}+02:00,${METERED_A}`);
  return rows.join('\n') + '\n';
}

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  planner = await t.as('planner');
  const admin = await t.as('admin');
  const line = await makeLine(t.orm);
  await spansAlong(t.orm, line, LAT, LON0, [8_000]);
  const res = await admin.agent
    .post(`/api/lines/${line.id}/load-series?mode=commit`)
    .set('Host', 'roostline.test:3000')
    .set('Origin', 'http://roostline.test:3000')
    .set('Content-Type', 'text/csv')
    .send(juneSeries());
  expect(res.status).toBe(200);
});
afterAll(() => t.close());

describe('the planner on measured load', () => {
  it("when the line has a series for the departure's month, then each perch harvests the metered median at its hour and names the month", async () => {
    const res = await plan('2026-06-10T09:00:00+02:00');
    expect(res.status).toBe(200);
    expect(res.body.feasible).toBe(true);
    expect(res.body.perches.length).toBeGreaterThan(0);
    // harvestW is the power after the converter at that hour (api.md "Missions"), here at the flat metered current.
    const expected = harvestPowerW(CLAMP_S, METERED_A, 60);
    for (const p of res.body.perches) {
      expect(p.harvestSource).toBe('series');
      expect(p.loadMonth).toBe('2026-06');
      expect(p.harvestW).toBeCloseTo(expected, 6);
    }
  });

  it('when the departure falls in a month without readings, then the perches use the typed estimate and say so', async () => {
    const res = await plan('2026-08-10T09:00:00+02:00');
    expect(res.status).toBe(200);
    expect(res.body.perches.length).toBeGreaterThan(0);
    for (const p of res.body.perches) {
      expect(p.harvestSource).toBe('estimate');
      expect(p.loadMonth).toBeNull();
      // The line's typed 24-hour profile at the arrival's local hour.
      const hour = Number(p.arriveAt.slice(11, 13));
      expect(p.harvestW).toBeCloseTo(harvestPowerW(CLAMP_S, DAILY_PROFILE_A[hour], 60), 6);
    }
  });

  it("when the departure is early on the 1st in local time (still the last day of the month before at UTC), then the local month's evidence is used", async () => {
    // 2026-07-01 00:30 at +02:00 is 2026-06-30 22:30 UTC: the departure's month, as written, is July (no readings).
    const july = await plan('2026-07-01T00:30:00+02:00');
    expect(july.status).toBe(200);
    expect(july.body.perches.length).toBeGreaterThan(0);
    for (const p of july.body.perches) expect(p.harvestSource).toBe('estimate');
    // 2026-06-01 01:30 at +02:00 is 2026-05-31 23:30 UTC: June as written, which has readings.
    const june = await plan('2026-06-01T01:30:00+02:00');
    expect(june.status).toBe(200);
    expect(june.body.perches.length).toBeGreaterThan(0);
    for (const p of june.body.perches) {
      expect(p.harvestSource).toBe('series');
      expect(p.loadMonth).toBe('2026-06');
    }
  });
});
