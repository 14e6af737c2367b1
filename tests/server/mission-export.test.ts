// Mission exports (api.md "Missions": GPX 1.1 with one rtept per base, perch and target in order; GeoJSON; KML),
// written from a plan the real planner made over approved, assessed spans. The GPX is checked against the GPX 1.1
// schema with xmllint (Debian libxml2-utils; .ci/run installs it).
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { XMLParser } from 'fast-xml-parser';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { lonFor, makeLine, spansAlong } from './missions-fixtures.ts';
import { LIGHT_QUAD, CLAMP_S } from '../../shared/engineering/demo-profiles.ts';
import { MISSION_COLOURS } from '../../shared/mission-colours.ts';
import { MISSION_CAUTION, missionToGeoJson, missionToGpx, missionToKml, type ExportMission } from '../../server/modules/missions/export.ts';

const XSD = path.resolve('tests/fixtures/gpx/gpx-1.1.xsd');
const haveXmllint = spawnSync('xmllint', ['--version']).status === 0;
if (!haveXmllint) console.log('GPX schema checks skipped: no xmllint (apt-get install -y libxml2-utils).');

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-gpx-'));
/** xmllint --schema on a file; its exit status is 0 only when the document is valid. */
function validate(file: string) {
  const r = spawnSync('xmllint', ['--noout', '--nonet', '--schema', XSD, file], { encoding: 'utf8' });
  return { ok: r.status === 0, out: `${r.stdout}${r.stderr}` };
}
function validateText(text: string, name: string) {
  const file = path.join(tmp, name);
  fs.writeFileSync(file, text);
  return validate(file);
}

let t: TestApp;
let planner: Client;
const LAT = -30.2;
const LON0 = -130.5;
const request = (over: Record<string, unknown> = {}) => ({
  droneProfileId: LIGHT_QUAD.id,
  harvesterProfileId: CLAMP_S.id,
  base: { lat: LAT, lon: LON0 },
  target: { lat: LAT, lon: LON0 + lonFor(24_000, LAT) },
  departAt: '2026-06-01T09:00:00+02:00',
  ...over,
});
let oneWay: ExportMission;
let round: ExportMission;

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  planner = await t.as('planner');
  const line = await makeLine(t.orm);
  // Perches at 8 and 16 km east, the job site at 24 km: beyond one battery of the demo quad (11.5 km calm reach).
  await spansAlong(t.orm, line, LAT, LON0, [8_000, 16_000]);
  const a = await planner.post('/api/missions/plan', request());
  const b = await planner.post('/api/missions/plan', request({ returnToBase: true, target: { lat: LAT, lon: LON0 + lonFor(12_000, LAT) } }));
  expect(a.body.feasible, JSON.stringify(a.body)).toBe(true);
  expect(b.body.feasible, JSON.stringify(b.body)).toBe(true);
  oneWay = { id: 'm1', name: 'Vale survey <north> & back', plan: a.body, plannerName: 'Pat Planner' };
  round = { id: 'm2', name: 'Round trip', plan: b.body, plannerName: 'Pat Planner', authorisedByName: 'Sam Safety' };
}, 120_000);
afterAll(async () => {
  fs.rmSync(tmp, { recursive: true, force: true });
  await t?.close();
});

describe('the committed GPX 1.1 schema', () => {
  it.skipIf(!haveXmllint)('when a hand-written minimal GPX 1.1 file is checked, then it validates', () => {
    const r = validate(path.resolve('tests/fixtures/gpx/minimal-valid.gpx'));
    expect(r.ok, r.out).toBe(true);
  });
  it.skipIf(!haveXmllint)('when a file breaks the element order or a latitude range, then it fails', () => {
    // GPX 1.1 wptType: <time> comes before <name>; latitudeType is −90…90 (topografix.com/GPX/1/1, read from the schema's structure, from memory).
    const order = validate(path.resolve('tests/fixtures/gpx/invalid-elements-out-of-order.gpx'));
    expect(order.ok).toBe(false);
    expect(order.out).toMatch(/not expected/);
    const lat = validate(path.resolve('tests/fixtures/gpx/invalid-latitude.gpx'));
    expect(lat.ok).toBe(false);
    expect(lat.out).toMatch(/maxInclusive/);
  });
  it.skipIf(!haveXmllint)('when a GPX 1.0 root is checked, then it fails (wrong namespace)', () => {
    const r = validateText('<?xml version="1.0"?><gpx version="1.0" creator="x" xmlns="http://www.topografix.com/GPX/1/0"/>', 'gpx10.gpx');
    expect(r.ok).toBe(false);
  });
});

describe('GPX export', () => {
  const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '', isArray: (name) => name === 'rtept' });

  it.skipIf(!haveXmllint)('when a planned mission is written as GPX, then xmllint validates it against GPX 1.1, one-way and round trip', () => {
    for (const [m, name] of [[oneWay, 'one-way.gpx'], [round, 'round.gpx']] as const) {
      const r = validateText(missionToGpx(m, { generatedAt: new Date('2026-05-30T08:00:00Z') }), name);
      expect(r.ok, r.out).toBe(true);
    }
  });

  it('when written, then there is one rtept per base, perch and job site, in flight order, at the planned positions and times', () => {
    const doc = parser.parse(missionToGpx(oneWay));
    const pts = doc.gpx.rte.rtept as { lat: string; lon: string; name: string; type: string; time: string; desc: string }[];
    const plan = oneWay.plan;
    expect(pts).toHaveLength(plan.perches.length + 2);
    expect(pts.map((p) => p.type)).toEqual(['base', ...plan.perches.map(() => 'perch'), 'job site']);
    expect(Number(pts[0]!.lat)).toBeCloseTo(LAT, 7);
    expect(Number(pts[0]!.lon)).toBeCloseTo(LON0, 7);
    plan.perches.forEach((p, i) => {
      expect(Number(pts[i + 1]!.lat)).toBeCloseTo(p.lat, 6);
      expect(Number(pts[i + 1]!.lon)).toBeCloseTo(p.lon, 6);
      expect(pts[i + 1]!.time).toBe(p.arriveAt);
      expect(pts[i + 1]!.name).toMatch(new RegExp(`^Perch ${i + 1}`));
      expect(pts[i + 1]!.desc).toContain(`dwell ${Math.round(p.dwellS / 60)} min`);
    });
    expect(Number(pts.at(-1)!.lon)).toBeCloseTo(plan.legs.at(-1)!.to.lon, 7);
    expect(pts[0]!.time).toBe(plan.departAt);
    expect(doc.gpx.version).toBe('1.1');
    expect(doc.gpx.metadata.name).toBe('Vale survey <north> & back');
    expect(doc.gpx.metadata.desc).toContain(MISSION_CAUTION);
  });

  it('when the mission returns to base, then the route ends at the base after the job site', () => {
    const pts = parser.parse(missionToGpx(round)).gpx.rte.rtept as { type: string; lat: string; lon: string }[];
    expect(pts.map((p) => p.type)).toEqual(['base', ...round.plan.legs.map((l) => (l.to.kind === 'target' ? 'job site' : l.to.kind))]);
    expect(pts.filter((p) => p.type === 'job site')).toHaveLength(1);
    expect(pts.at(-1)!.type).toBe('base');
    expect(Number(pts.at(-1)!.lon)).toBeCloseTo(LON0, 7);
    expect(pts.filter((p) => p.type === 'perch')).toHaveLength(round.plan.perches.length);
  });

  it('when the reader uses US units, then the descriptions are in feet and miles per hour', () => {
    const text = missionToGpx(oneWay, { units: 'us' });
    expect(text).toMatch(/ ft/);
    expect(text).toMatch(/ mph/);
    expect(missionToGpx(oneWay)).not.toMatch(/ mph/);
  });
});

describe('GeoJSON export', () => {
  it('when written, then the route LineString runs through every stop and each perch Point carries its figures', () => {
    const fc = missionToGeoJson(oneWay);
    const plan = oneWay.plan;
    const route = fc.features[0]!;
    expect(route.geometry.type).toBe('LineString');
    expect(route.geometry.coordinates).toHaveLength(plan.perches.length + 2);
    // RFC 7946 §3.1.1: positions are [longitude, latitude].
    expect(route.geometry.coordinates[0]).toEqual([LON0, LAT]);
    expect(route.properties).toMatchObject({ kind: 'route', totalDistanceM: plan.totalDistanceM, totalDurationS: plan.totalDurationS, caution: MISSION_CAUTION });
    const perches = fc.features.filter((f) => f.properties.kind === 'perch');
    expect(perches).toHaveLength(plan.perches.length);
    perches.forEach((f, i) => {
      const p = plan.perches[i]!;
      expect(f.geometry).toEqual({ type: 'Point', coordinates: [Number(p.lon.toFixed(7)), Number(p.lat.toFixed(7))] });
      expect(f.properties).toMatchObject({
        perchOrder: i + 1,
        spanId: p.spanId,
        lineId: p.lineId,
        dwellS: p.dwellS,
        harvestW: p.harvestW,
        socArrivePct: p.socArrivePct,
        socDepartPct: p.socDepartPct,
        lineBearingDeg: p.lineBearingDeg,
        conductorHeightM: p.conductorHeightM,
      });
    });
    expect(fc.features.map((f) => f.properties.kind)).toEqual(['route', 'base', ...plan.perches.map(() => 'perch'), 'target']);
    expect(JSON.parse(JSON.stringify(fc))).toEqual(fc);
  });
});

describe('KML export', () => {
  it('when written, then it is well-formed KML with the route and every stop, in the app’s palette in aabbggrr order', () => {
    const text = missionToKml(oneWay);
    const doc = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '' }).parse(text);
    const placemarks = [doc.kml.Document.Placemark, ...doc.kml.Document.Folder.Placemark];
    expect(placemarks).toHaveLength(1 + oneWay.plan.perches.length + 2);
    expect(doc.kml.Document.Placemark.LineString.coordinates.split(' ')).toHaveLength(oneWay.plan.perches.length + 2);
    // OGC KML 2.2 (07-147r2) §16.9: kml:color is aabbggrr. The route's night-teal #12343b → ff 3b 34 12.
    expect(MISSION_COLOURS.route).toBe('#12343b');
    const styles = Object.fromEntries((doc.kml.Document.Style as { id: string; LineStyle?: { color: string }; IconStyle?: { color: string } }[]).map((s) => [s.id, s]));
    expect(styles['mission-route']!.LineStyle!.color).toBe('ff3b3412');
    // Perch go-green #2e7d4f → ff 4f 7d 2e.
    expect(styles['mission-perch']!.IconStyle!.color).toBe('ff4f7d2e');
    expect(doc.kml.Document.description).toContain(MISSION_CAUTION);
    if (haveXmllint) expect(spawnSync('xmllint', ['--noout', '-'], { input: text }).status).toBe(0);
  });
});

describe('export routes', () => {
  let id: string;
  const text = (res: { text?: string; body: unknown }) => res.text ?? String(res.body);
  beforeAll(async () => {
    const saved = await planner.post('/api/missions', { ...request(), name: 'Ridge run, north–east' });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    id = saved.body.id;
  });

  it.each([
    ['gpx', 'application/gpx+xml'],
    ['geojson', 'application/geo+json'],
    ['kml', 'application/vnd.google-earth.kml+xml'],
  ])('when any role asks for export.%s, then it downloads as a file of its own type named after the mission', async (ext, type) => {
    for (const role of ['planner', 'safety', 'surveyor', 'admin'] as const) {
      const c = role === 'planner' ? planner : await t.as(role);
      const res = await c.get(`/api/missions/${id}/export.${ext}`).buffer(true);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe(`${type}; charset=utf-8`);
      expect(res.headers['content-disposition']).toBe(`attachment; filename="ridge-run-north-east.${ext}"`);
    }
  });

  it.skipIf(!haveXmllint)('when the saved mission is exported as GPX, then the file validates against GPX 1.1 and has a point per stop', async () => {
    const res = await planner.get(`/api/missions/${id}/export.gpx`).buffer(true);
    const r = validateText(text(res), 'route.gpx');
    expect(r.ok, r.out).toBe(true);
    const mission = (await planner.get(`/api/missions/${id}`)).body;
    expect(text(res).match(/<rtept /g)).toHaveLength(mission.plan.perches.length + 2);
  });

  it('when exported as GeoJSON, then the perch Points carry the saved plan’s figures', async () => {
    const res = await planner.get(`/api/missions/${id}/export.geojson`).buffer(true);
    const fc = JSON.parse(text(res));
    const mission = (await planner.get(`/api/missions/${id}`)).body;
    const perches = fc.features.filter((f: { properties: { kind: string } }) => f.properties.kind === 'perch');
    expect(perches.map((f: { properties: { spanId: string } }) => f.properties.spanId)).toEqual(mission.plan.perches.map((p: { spanId: string }) => p.spanId));
  });

  it('when the mission does not exist, then 404; without a session, 401', async () => {
    expect((await planner.get('/api/missions/nope/export.gpx')).status).toBe(404);
    expect((await t.client().get(`/api/missions/${id}/export.kml`)).status).toBe(401);
  });
});

