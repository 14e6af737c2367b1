import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { lonFor, makeLine, spansAlong } from './missions-fixtures.ts';
import { geodesicInverse } from '../../shared/engineering/geodesic.ts';
import { LIGHT_QUAD, CLAMP_S } from '../../shared/engineering/demo-profiles.ts';
import { conductorHeightAtM } from '../../shared/engineering/mission-energy.ts';

// POST /api/missions/plan (api.md "Missions"). Each scenario sits on its own latitude band so they never share perches.
let t: TestApp;
let planner: Client;
let safety: Client;
let surveyor: Client;

const LON0 = -130.5;
const base = (lat: number) => ({ lat, lon: LON0 });
const east = (lat: number, m: number) => ({ lat, lon: LON0 + lonFor(m, lat) });
const request = (lat: number, targetEastM: number, over: Record<string, unknown> = {}) => ({
  droneProfileId: LIGHT_QUAD.id,
  harvesterProfileId: CLAMP_S.id,
  base: base(lat),
  target: east(lat, targetEastM),
  departAt: '2026-06-01T09:00:00+02:00',
  ...over,
});
const dist = (a: { lat: number; lon: number }, b: { lat: number; lon: number }) => geodesicInverse({ latDeg: a.lat, lonDeg: a.lon }, { latDeg: b.lat, lonDeg: b.lon }).lengthM;

// Light quad (demo profile): 100 Wh, 20 % reserve, 12 m/s, 300 W → 80 Wh usable, 11.52 km calm reach (engineering.md §10 worked example).
const CALM_REACH_M = 11_520;

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  [planner, safety, surveyor] = await Promise.all([t.as('planner'), t.as('safety'), t.as('surveyor')]);
  const line = await makeLine(t.orm);
  // Band A (lat −30.2): perches at 8 and 16 km, job site at 24 km — beyond one battery, two perches needed.
  await spansAlong(t.orm, line, -30.2, LON0, [8_000, 16_000]);
  // Band B (lat −31.2): one perch at 8 km, job site at 28 km; a submitted span at 18 km would bridge the gap.
  await spansAlong(t.orm, line, -31.2, LON0, [8_000]);
  await spansAlong(t.orm, line, -31.2, LON0, [18_000], 'submitted');
});
afterAll(() => t.close());

describe('a feasible plan', () => {
  it('when the job site lies beyond one battery and approved perches bridge it, then the plan perches on them in order with the §10 figures', async () => {
    const res = await planner.post('/api/missions/plan', request(-30.2, 24_000));
    expect(res.status).toBe(200);
    const plan = res.body;
    expect(plan.feasible).toBe(true);
    expect(plan.legs).toHaveLength(3);
    expect(plan.perches).toHaveLength(2);
    expect(plan.perches[0].lon).toBeLessThan(plan.perches[1].lon);
    expect(plan.legs[0].toSpanId).toBe(plan.perches[0].spanId);
    expect(plan.legs[2].toSpanId).toBeUndefined();
    // The drone leaves at 100 % (api.md); E = P_cruise·d/GS (+ the perch manoeuvre on a perch leg), GS = airspeed in calm air (engineering.md §10).
    expect(plan.legs[0].socStartPct).toBe(100);
    for (const leg of plan.legs) {
      expect(leg.groundSpeedMps).toBeCloseTo(LIGHT_QUAD.cruiseSpeedMps, 9);
      expect(leg.durationS).toBeCloseTo(leg.distanceM / LIGHT_QUAD.cruiseSpeedMps, 6);
      const manoeuvre = leg.toSpanId ? LIGHT_QUAD.perchManoeuvreWh : 0;
      expect(leg.energyWh).toBeCloseTo((LIGHT_QUAD.cruisePowerW * leg.durationS) / 3600 + manoeuvre, 6);
      expect(leg.socEndPct).toBeCloseTo(leg.socStartPct - (100 * leg.energyWh) / LIGHT_QUAD.batteryWh, 6);
      // A leg may use at most the energy above the reserve (api.md).
      expect(leg.socEndPct).toBeGreaterThanOrEqual(LIGHT_QUAD.reservePercent - 1e-9);
    }
    const legSum = plan.legs.reduce((s: number, l: { distanceM: number }) => s + l.distanceM, 0);
    expect(plan.totalDistanceM).toBeCloseTo(legSum, 6);
    // Dwell: the battery gains harvestW × η_batt over the hours it sits there, up to the charge-to level (engineering.md §10).
    for (const p of plan.perches) {
      expect(p.socDepartPct).toBe(LIGHT_QUAD.chargeToPercent);
      expect(p.harvestW).toBeGreaterThan(0);
      const stored = p.harvestByHour.reduce((s: number, h: { harvestW: number; seconds: number }) => s + (h.harvestW * LIGHT_QUAD.chargeEfficiency * h.seconds) / 3600, 0);
      expect(stored).toBeCloseTo(((p.socDepartPct - p.socArrivePct) / 100) * LIGHT_QUAD.batteryWh, 3);
      expect(Date.parse(p.departAt) - Date.parse(p.arriveAt)).toBeCloseTo(p.dwellS * 1000, -3);
      expect(p.arriveAt.endsWith('+02:00')).toBe(true);
      expect(p.harvestSource).toBe('estimate');
      // Height at mid-span: the chord between 24 m attachments less the sag there; the sag from the 15 m surveyed clearance (flat ground).
      expect(p.conductorHeightM).toBeCloseTo(15, 6);
      expect(p.lineBearingDeg).toBeGreaterThan(80);
      expect(p.lineBearingDeg).toBeLessThan(100);
    }
    const dwell = plan.perches.reduce((s: number, p: { dwellS: number }) => s + p.dwellS, 0);
    const flight = plan.legs.reduce((s: number, l: { durationS: number }) => s + l.durationS, 0);
    expect(plan.totalDurationS).toBeCloseTo(dwell + flight, 3);
  });

  it('when the job site is within one battery, then the plan is one direct leg with no perch', async () => {
    const res = await planner.post('/api/missions/plan', request(-30.2, 5_000));
    expect(res.status).toBe(200);
    expect(res.body.feasible).toBe(true);
    expect(res.body.perches).toEqual([]);
    expect(res.body.legs).toHaveLength(1);
    expect(res.body.legs[0].distanceM).toBeCloseTo(dist(base(-30.2), east(-30.2, 5_000)), 6);
  });

  it('when the route returns to base, then the plan comes back through perches and ends at the base', async () => {
    // Job site at 18 km: the drone cannot charge there, so it needs the 16 km perch on the way back too.
    const res = await planner.post('/api/missions/plan', request(-30.2, 18_000, { returnToBase: true }));
    expect(res.status).toBe(200);
    expect(res.body.feasible).toBe(true);
    const legs = res.body.legs;
    expect(legs[legs.length - 1].to.kind).toBe('base');
    expect(legs.some((l: { to: { kind: string } }) => l.to.kind === 'target')).toBe(true);
    expect(res.body.perches.length).toBeGreaterThanOrEqual(3);
    for (const l of legs) expect(l.socEndPct).toBeGreaterThanOrEqual(LIGHT_QUAD.reservePercent - 1e-9);
  });
});

describe('a perch point the planner moves', () => {
  it('when the planner moves a perch 40 m from its from-structure, then the plan perches there with the conductor height at that point; saved and reopened it keeps the point', async () => {
    const first = (await planner.post('/api/missions/plan', request(-30.2, 24_000))).body;
    const p0 = first.perches[0];
    expect(p0.perchPoint).toBe('mid-span');
    const s = (await planner.get(`/api/spans/${p0.spanId}`)).body;
    const [fromS, toS] = [(await planner.get(`/api/structures/${s.fromStructureId}`)).body, (await planner.get(`/api/structures/${s.toStructureId}`)).body];
    const span = { ...s, fromStructure: fromS, toStructure: toS };
    expect(p0.alongM).toBeCloseTo(span.lengthM / 2, 6);
    const moved = await planner.post('/api/missions/plan', request(-30.2, 24_000, { perchPoints: [{ spanId: p0.spanId, alongM: 40 }] }));
    expect(moved.status).toBe(200);
    const q0 = moved.body.perches.find((p: { spanId: string }) => p.spanId === p0.spanId);
    expect(q0.perchPoint).toBe('planner');
    expect(q0.alongM).toBe(40);
    // The point lies 40 m along the span from its from-structure (geodesic distance, GeographicLib; tolerance 1 cm).
    const from = { lat: span.fromStructure.lat, lon: span.fromStructure.lon };
    expect(dist(from, q0)).toBeCloseTo(40, 2);
    // Parabolic sag: h(x) = hA + (hB − hA)·x/L − 4·s·x(L − x)/L² (engineering.md §10, conductor height at the perch point);
    // nearer the structure the conductor sits higher than at mid-span.
    const sagM = (span.fromStructure.attachmentHeightM + span.toStructure.attachmentHeightM) / 2 - span.clearanceM;
    expect(q0.conductorHeightM).toBeCloseTo(
      conductorHeightAtM({ fromHeightM: span.fromStructure.attachmentHeightM, toHeightM: span.toStructure.attachmentHeightM, spanLengthM: span.lengthM, xM: 40, midSpanSagM: sagM }),
      6,
    );
    expect(q0.conductorHeightM).toBeGreaterThan(p0.conductorHeightM);
    const saved = await planner.post('/api/missions', { name: 'Moved perch point', ...request(-30.2, 24_000, { perchPoints: [{ spanId: p0.spanId, alongM: 40 }] }) });
    expect(saved.status).toBe(201);
    const reopened = (await planner.get(`/api/missions/${saved.body.id}`)).body;
    expect(reopened.input.perchPoints).toEqual([{ spanId: p0.spanId, alongM: 40 }]);
    expect(reopened.plan.perches.find((p: { spanId: string }) => p.spanId === p0.spanId).alongM).toBe(40);
  });

  it('when a moved point lies within 5 m of a structure, past the span, or on an unknown span, then 400 names that entry', async () => {
    const first = (await planner.post('/api/missions/plan', request(-30.2, 24_000))).body;
    const id = first.perches[0].spanId;
    for (const alongM of [2, 10_000]) {
      const res = await planner.post('/api/missions/plan', request(-30.2, 24_000, { perchPoints: [{ spanId: id, alongM }] }));
      expect(res.status).toBe(400);
      expect(res.body.error.issues.map((i: { path: string }) => i.path)).toEqual(['perchPoints.0.alongM']);
      expect(res.body.error.issues[0].message).toMatch(/clear of both structures/);
    }
    const unknown = await planner.post('/api/missions/plan', request(-30.2, 24_000, { perchPoints: [{ spanId: id, alongM: 40 }, { spanId: 'no-such-span', alongM: 40 }] }));
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.issues.map((i: { path: string }) => i.path)).toEqual(['perchPoints.1.spanId']);
    const nan = await planner.post('/api/missions/plan', request(-30.2, 24_000, { perchPoints: [{ spanId: id, alongM: 'x' }] }));
    expect(nan.status).toBe(400);
    expect(nan.body.error.issues.map((i: { path: string }) => i.path)).toEqual(['perchPoints.0.alongM']);
  });
});

describe('no route, and why', () => {
  it('when no approved perch bridges a gap, then the reason names the gap against the reach and the unapproved span that would bridge it', async () => {
    const res = await planner.post('/api/missions/plan', request(-31.2, 28_000));
    expect(res.status).toBe(200);
    expect(res.body.feasible).toBe(false);
    expect(res.body.reason).toBe('gap');
    expect(res.body.longestGapM).toBeGreaterThan(res.body.reachM);
    // From the perch at 8 km to the job site at 28 km: 20 km; the job-site hop needs no manoeuvre, 11.52 km calm reach (§10).
    expect(Math.abs(res.body.longestGapM - 20_000)).toBeLessThan(100);
    expect(res.body.reachM).toBeCloseTo(CALM_REACH_M, -1);
    expect(res.body.message).toMatch(/gap/);
    expect(res.body.blockedSpans).toHaveLength(1);
    expect(res.body.blockedSpans[0].status).toBe('submitted');
    expect(res.body.blockedSpans[0].reason).toMatch(/not approved/);
  });

  it('when the wind is above the drone limit, then the reason is the wind in words', async () => {
    const res = await planner.post('/api/missions/plan', request(-30.2, 5_000, { wind: { speedMps: LIGHT_QUAD.windLimitMps + 1, fromDeg: 90 } }));
    expect(res.status).toBe(200);
    expect(res.body.feasible).toBe(false);
    expect(res.body.reason).toBe('wind');
    expect(res.body.message).toMatch(/wind limit/);
  });

  it('when a strong headwind shortens every leg beyond the battery, then the reason is the wind, not a gap', async () => {
    // 10 m/s from the east on an eastbound course: GS = 12 − 10 = 2 m/s → reach 80 Wh / 300 W × 2 m/s = 1.92 km (§10 wind triangle).
    const res = await planner.post('/api/missions/plan', request(-30.2, 5_000, { wind: { speedMps: 10, fromDeg: 90 } }));
    expect(res.body.feasible).toBe(false);
    expect(res.body.reason).toBe('wind');
  });

  it('when an active exclude zone cuts the only leg, then the reason names the zone; a caution zone on a leg is allowed and listed', async () => {
    const lat = -32.2;
    const mid = east(lat, 3_000).lon;
    const band = (lon0: number, lon1: number) => ({ type: 'Polygon', coordinates: [[[lon0, lat - 0.5], [lon1, lat - 0.5], [lon1, lat + 0.5], [lon0, lat + 0.5], [lon0, lat - 0.5]]] });
    const caution = await safety.post('/api/zones', { name: 'Orchard spraying', reason: 'crop spraying days', severity: 'caution', geometry: band(mid - 0.005, mid + 0.005) });
    expect(caution.status).toBe(201);
    const ok = await planner.post('/api/missions/plan', request(lat, 6_000));
    expect(ok.body.feasible).toBe(true);
    expect(ok.body.legs[0].cautionZones.map((z: { name: string }) => z.name)).toEqual(['Orchard spraying']);

    const far = east(lat, 4_500).lon;
    const ex = await safety.post('/api/zones', { name: 'Quarry blasting', reason: 'blasting area', severity: 'exclude', geometry: band(far - 0.005, far + 0.005) });
    expect(ex.status).toBe(201);
    const cut = await planner.post('/api/missions/plan', request(lat, 6_000));
    expect(cut.body.feasible).toBe(false);
    expect(cut.body.reason).toBe('zone');
    expect(cut.body.zone.name).toBe('Quarry blasting');
    expect(cut.body.message).toMatch(/Quarry blasting.*only leg/);
  });
});

describe('roles and bad input', () => {
  it('when a surveyor or a safety officer asks for a plan, then 403', async () => {
    expect((await surveyor.post('/api/missions/plan', request(-30.2, 5_000))).status).toBe(403);
    expect((await safety.post('/api/missions/plan', request(-30.2, 5_000))).status).toBe(403);
  });

  it.each([
    ['an out-of-range latitude', { base: { lat: 91, lon: 0 } }, 'base.lat'],
    ['an out-of-range longitude', { target: { lat: 0, lon: -181 } }, 'target.lon'],
    ['NaN written as text', { base: { lat: 'NaN', lon: 0 } }, 'base.lat'],
    ['a null coordinate (what JSON makes of NaN)', { target: { lat: null, lon: 0 } }, 'target.lat'],
    ['a departure past midnight (24:30)', { departAt: '2026-06-01T24:30:00+02:00' }, 'departAt'],
    ['a departure without an offset', { departAt: '2026-06-01T09:00:00' }, 'departAt'],
    ['a day the month does not have', { departAt: '2026-02-30T09:00:00Z' }, 'departAt'],
    ['a negative wind', { wind: { speedMps: -1, fromDeg: 0 } }, 'wind.speedMps'],
    ['an unknown objective', { objective: 'cheapest' }, 'objective'],
  ])('when the request has %s, then 400 naming the field', async (_what, over, path) => {
    const res = await planner.post('/api/missions/plan', request(-30.2, 5_000, over));
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain(path);
  });

  it('when the drone or harvester profile is unknown, then 400 naming the field', async () => {
    const res = await planner.post('/api/missions/plan', request(-30.2, 5_000, { droneProfileId: 'no-such-drone', harvesterProfileId: 'no-such-core' }));
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(['droneProfileId', 'harvesterProfileId']);
  });
});
