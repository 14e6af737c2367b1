// Flight records: upload → perch events matched to approved spans → predicted vs measured harvest and implied current.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp, type Client } from './helpers.ts';
import { makeLine, makeSpan } from './assessment-helpers.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { FlightRecord, PerchEvent } from '../../server/modules/evidence/flight-record.entity.ts';
import { harvest } from '../../shared/engineering/ct-harvester.ts';
import { LIGHT_QUAD, CLAMP_S } from '../../shared/engineering/demo-profiles.ts';

let t: TestApp;
let planner: Client;

beforeAll(async () => {
  t = await makeTestApp();
  planner = await t.as('planner');
});
afterAll(() => t.close());

async function approvedSpan(lat: number) {
  const line = await makeLine(t.orm);
  const span = await makeSpan(t.orm, line, { lat, lon: -130.3 });
  const em = t.orm.em.fork();
  await em.nativeUpdate(Span, { id: span.id }, { status: 'approved' });
  return { line, span };
}

/** Approach from the west, perch 3 min at the span's middle (≈ 150 m east of its start), leave; at 10:00 −09:00. */
function flightCsv(lat: number, harvestW: number, startIso = '2026-06-01T10:00:00-09:00') {
  const rows = ['time,lat,lon,altitude_m,battery_pct,harvest_w'];
  const t0 = Date.parse(startIso);
  const at = (s: number) => new Date(t0 + s * 1000 - 9 * 3_600_000).toISOString().slice(0, 19) + '-09:00';
  let s = 0;
  for (let x = -600; x < 0; x += 60, s += 5) rows.push(`${at(s)},${lat},${(-130.3 + 0.0015 + x * 1.04e-5).toFixed(6)},30,80,`);
  for (let k = 0; k < 36; k++, s += 5) rows.push(`${at(s)},${lat},${(-130.3 + 0.0015).toFixed(6)},24,${(80 + k * 0.1).toFixed(1)},${harvestW}`);
  for (let x = 60; x <= 600; x += 60, s += 5) rows.push(`${at(s)},${lat},${(-130.3 + 0.0015 + x * 1.04e-5).toFixed(6)},30,83,`);
  return rows.join('\n');
}

const upload = (c: Client, text: string, name = 'flight.csv', fields: Record<string, string> = {}) => {
  let r = c.upload('/api/flight-records').attach('file', Buffer.from(text), name);
  for (const [k, v] of Object.entries(fields)) r = r.field(k, v);
  return r;
};

describe('flight records', () => {
  it('when a CSV record with a 3-minute perch is uploaded, then the perch is matched to the span with predicted and measured harvest', async () => {
    const { line, span } = await approvedSpan(-30.25);
    const res = await upload(planner, flightCsv(-30.25, 20));
    expect(res.status).toBe(201);
    expect(res.body.pointCount).toBe(10 + 36 + 10);
    const perches = res.body.events.filter((e: { kind: string }) => e.kind === 'perch');
    expect(perches).toHaveLength(1);
    const p = perches[0];
    expect(p.spanId).toBe(span.id);
    expect(p.spanDistanceM).toBeLessThan(2);
    const spanView = (await planner.get(`/api/spans/${span.id}`)).body;
    expect(p.spanLabel).toBe(`${spanView.fromStructureLabel} → ${spanView.toStructureLabel}`);
    expect((await planner.get(`/api/flight-records/${res.body.id}`)).body.events.find((e: { kind: string }) => e.kind === 'perch').spanLabel).toBe(p.spanLabel);
    expect(p.measuredW).toBeCloseTo(20, 6);
    expect(p.predictedSource).toBe('estimate');
    expect(p.startAt).toBe('2026-06-01T10:00:50-09:00');
    // predicted at 10:00 local: the line's estimate for hour 10, through the harvester model after the converter
    const hp = (await planner.get('/api/profiles/harvesters')).body.items.find((h: { id: string }) => h.id === res.body.harvesterProfileId);
    expect(p.lineCurrentA).toBe(line.loadProfileA![10]);
    expect(p.predictedW).toBeCloseTo(harvest({ currentA: line.loadProfileA![10], frequencyHz: 60, harvester: hp }).powerW * hp.converterEfficiency, 6);
    // the implied current reproduces the measured harvest through the same model (round trip)
    expect(harvest({ currentA: p.impliedCurrentA, frequencyHz: 60, harvester: hp }).powerW * hp.converterEfficiency).toBeCloseTo(20, 2);
    expect(p.ratio).toBeCloseTo(20 / p.predictedW, 9);
    expect(p.lowHarvest).toBe(p.ratio < 0.5);

    const evidence = await planner.get(`/api/evidence/perches?spanId=${span.id}`);
    expect(evidence.body.items).toHaveLength(1);
    expect(evidence.body.items[0].lineName).toBe(line.name);
  });

  it('when the measured harvest is below half the prediction, then the span is flagged', async () => {
    const { span } = await approvedSpan(-30.3);
    const res = await upload(planner, flightCsv(-30.3, 0.5));
    expect(res.status).toBe(201);
    const flags = await planner.get('/api/evidence/perches');
    expect(flags.body.lowHarvestSpanIds).toContain(span.id);
  });

  it('when one of a span\'s perches harvested below half the prediction, then its evidence summary flags it with the counts and the latest perch', async () => {
    const { span, line } = await approvedSpan(-30.31);
    const good = await upload(planner, flightCsv(-30.31, 20, '2026-06-01T10:00:00-09:00'));
    const poor = await upload(planner, flightCsv(-30.31, 0.5, '2026-06-02T10:00:00-09:00'));
    const g = good.body.events.find((e: { kind: string }) => e.kind === 'perch');
    const p = poor.body.events.find((e: { kind: string }) => e.kind === 'perch');
    expect(p.lowHarvest).toBe(true);
    const res = await planner.get(`/api/evidence/spans/${span.id}`);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ spanId: span.id, lineId: line.id, threshold: 0.5, perchCount: 2, measuredCount: 2, lowHarvestCount: g.lowHarvest ? 2 : 1, lowHarvest: true });
    expect(res.body.medianRatio).toBeCloseTo((g.ratio + p.ratio) / 2, 9); // median of two = their mean
    expect(res.body.latest).toMatchObject({ flightRecordId: poor.body.id, startAt: '2026-06-02T10:00:50-09:00', measuredW: 0.5, lowHarvest: true, predictedSource: 'estimate' });
    expect(res.body.latest.predictedW).toBeCloseTo(p.predictedW, 9);
  });

  it('when a span has no perches, then its summary is empty and unflagged; an unknown span is 404', async () => {
    const { span } = await approvedSpan(-30.32);
    const res = await planner.get(`/api/evidence/spans/${span.id}`);
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ perchCount: 0, measuredCount: 0, lowHarvestCount: 0, lowHarvest: false, medianRatio: null, latest: null });
    expect((await planner.get('/api/evidence/spans/nope')).status).toBe(404);
  });

  it('when the same flight comes as GPX with the product extension, then the same perch is found', async () => {
    const { span } = await approvedSpan(-30.35);
    const csv = flightCsv(-30.35, 20).split('\n').slice(1).map((r) => r.split(','));
    const gpx = `<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="Roostline test" xmlns="http://www.topografix.com/GPX/1/1" xmlns:rl="urn:roostline:flight:1">
  <trk><name>Test</name><trkseg>
${csv.map(([time, lat, lon, alt, bat, w]) => `    <trkpt lat="${lat}" lon="${lon}"><ele>${alt}</ele><time>${time}</time><extensions><rl:battery_pct>${bat}</rl:battery_pct>${w ? `<rl:harvest_w>${w}</rl:harvest_w>` : ''}</extensions></trkpt>`).join('\n')}
  </trkseg></trk>
</gpx>`;
    const res = await upload(planner, gpx, 'flight.gpx');
    expect(res.status).toBe(201);
    expect(res.body.format).toBe('gpx');
    const perches = res.body.events.filter((e: { kind: string }) => e.kind === 'perch');
    expect(perches.map((e: { spanId: string }) => e.spanId)).toEqual([span.id]);
  });

  it('when a row is bad, then 400 names the row and nothing is stored', async () => {
    const before = await t.orm.em.fork().count(FlightRecord, {});
    const lines = flightCsv(-30.4, 20).split('\n');
    lines[12] = lines[12].replace(/,-30\.4,/, ',-95,');
    const res = await upload(planner, lines.join('\n'));
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('row 12');
    expect(res.body.error.message).toMatch(/lat .* from -90 to 90/);
    const noOffset = await upload(planner, 'time,lat,lon\n2026-06-01T10:00:00,-30,-130\n2026-06-01T10:00:05,-30,-130\n');
    expect(noOffset.status).toBe(400);
    expect(noOffset.body.error.issues[0].path).toBe('row 1');
    expect((await upload(planner, '<gpx><trk>', 'x.gpx')).status).toBe(400);
    expect(await t.orm.em.fork().count(FlightRecord, {})).toBe(before);
    expect(await t.orm.em.fork().count(PerchEvent, { flightRecordId: { $nin: (await t.orm.em.fork().find(FlightRecord, {})).map((r) => r.id) } })).toBe(0);
  });

  it('when the missionId names no mission, then 400 names the field and nothing is stored', async () => {
    const before = await t.orm.em.fork().count(FlightRecord, {});
    const res = await upload(planner, flightCsv(-30.42, 20), 'flight.csv', { missionId: 'no-such-mission' });
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('missionId');
    expect(res.body.error.message).toMatch(/no such mission/);
    expect(await t.orm.em.fork().count(FlightRecord, {})).toBe(before);
  });

  it('when a flight is uploaded to a saved mission, then it is linked to it and listed under the mission', async () => {
    // A short mission (3 km, within one charge: no perch needed), saved by the planner.
    const mission = await planner.post('/api/missions', {
      name: 'Flight link check',
      droneProfileId: LIGHT_QUAD.id,
      harvesterProfileId: CLAMP_S.id,
      base: { lat: -30.43, lon: -130.32 },
      target: { lat: -30.43, lon: -130.29 },
      departAt: '2026-06-01T09:00:00-09:00',
    });
    expect(mission.status).toBe(201);
    const other = await upload(planner, flightCsv(-30.43, 20));
    const res = await upload(planner, flightCsv(-30.43, 20), 'mission-flight.csv', { missionId: mission.body.id });
    expect(res.status).toBe(201);
    expect(res.body.missionId).toBe(mission.body.id);
    const listed = await planner.get(`/api/flight-records?missionId=${mission.body.id}`);
    expect(listed.status).toBe(200);
    expect(listed.body.items.map((r: { id: string }) => r.id)).toEqual([res.body.id]);
    expect(listed.body.items[0].missionId).toBe(mission.body.id);
    expect((await planner.get('/api/flight-records')).body.items.map((r: { id: string }) => r.id)).toEqual(expect.arrayContaining([res.body.id, other.body.id]));
  });

  it('when a surveyor uploads, then 403; the template lists the documented columns', async () => {
    expect((await upload(await t.as('surveyor'), flightCsv(-30.45, 20))).status).toBe(403);
    const tpl = await planner.get('/api/flight-records/template.csv');
    expect(tpl.status).toBe(200);
    expect(tpl.text.split('\n')[0]).toBe('time,lat,lon,altitude_m,battery_pct,harvest_w');
  });
});

describe('load estimate from flight evidence', () => {
  it('when an admin applies the flight estimate, then the line estimate scales by the implied ÷ predicted current', async () => {
    const { line } = await approvedSpan(-30.5);
    const up = await upload(planner, flightCsv(-30.5, 20));
    const perch = up.body.events.find((e: { kind: string }) => e.kind === 'perch');
    const k = perch.impliedCurrentA / perch.lineCurrentA;
    const admin = await t.as('admin');
    const res = await admin.post(`/api/lines/${line.id}/load-estimate/from-evidence`, { source: 'flights', version: line.version });
    expect(res.status).toBe(200);
    expect(res.body.loadTypicalA).toBeCloseTo(line.loadTypicalA * k, 0); // one perch: the median ratio is its own
    expect(res.body.loadProfileA[10]).toBeCloseTo(line.loadProfileA![10] * k, 0);
  });
});
