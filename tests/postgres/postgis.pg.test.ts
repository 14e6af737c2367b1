// PostGIS answers three spatial questions on PostgreSQL (server/sql/postgis.ts); the JavaScript path answers them
// on SQLite. On the same data both must give the same answers: the zones a span touches and the spans near a zone,
// the spans near a photo's position (nearest first), and the features of a full-detail span tile.
import { afterAll, beforeAll, describe, expect, it, onTestFinished } from 'vitest';
import type { LineString, Polygon } from 'geojson';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import { makeTestApp, type Client, type TestApp } from '../server/helpers.ts';
import { waitForAllJobs } from '../server/assessment-helpers.ts';
import { postgisDisabled, usesPostgis } from '../../server/sql/postgis.ts';
import { activeZonesForGeometry, zonesTouching } from '../../server/modules/zones/zone.service.ts';
import { Zone } from '../../server/modules/zones/zone.entity.ts';
import { spansNearBy } from '../../server/modules/assessment/index.ts';
import { SUGGEST_WITHIN_M, suggestSpansBy } from '../../server/modules/photos/photo.service.ts';
import { FULL_DETAIL_ZOOM, SpanTileService } from '../../server/modules/map/span-tiles.ts';

let t: TestApp;
let postgis = false;
const lines: string[] = [];
const structures: { id: string; lon: number; lat: number }[] = [];
const spans: { id: string; from: number; to: number }[] = [];
let zones: Polygon[] = [];

/** An invented patch of the demo region, about 3 km across. */
const BOX = { lon: -128.93, lat: -29.61, dLon: 0.03, dLat: 0.027 };

/** A seeded generator (mulberry32), so every run builds the same network. */
function random(seed: number) {
  return () => {
    seed |= 0;
    seed = (seed + 0x6d2b79f5) | 0;
    let r = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    r = (r + Math.imul(r ^ (r >>> 7), 61 | r)) ^ r;
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

const metresApart = (a: { lon: number; lat: number }, b: { lon: number; lat: number }) =>
  Math.hypot((a.lon - b.lon) * 111_320 * Math.cos((a.lat * Math.PI) / 180), (a.lat - b.lat) * 110_574);

const ring = (...pts: [number, number][]): Polygon => ({ type: 'Polygon', coordinates: [[...pts, pts[0]]] });
const at = (fx: number, fy: number): [number, number] => [BOX.lon + fx * BOX.dLon, BOX.lat + fy * BOX.dLat];

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  postgis = await usesPostgis(t.orm.em.fork());
  // Without POSTGIS=off (the suite sets it when the extension is missing) the migration must have installed it.
  expect(postgis).toBe(!postgisDisabled());
  if (!postgis) return;
  const surveyor: Client = await t.as('surveyor');
  const safety: Client = await t.as('safety');
  for (const name of ['Spatial line north', 'Spatial line south']) {
    const line = await surveyor.post('/api/lines', { name, owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, loadTypicalA: 300, loadMinA: 120, loadPeakA: 520 });
    expect(line.status).toBe(201);
    lines.push(line.body.id);
  }
  const rnd = random(17);
  for (let i = 0; i < 36; i++) {
    const pos = { lon: BOX.lon + rnd() * BOX.dLon, lat: BOX.lat + rnd() * BOX.dLat };
    const s = await surveyor.post('/api/structures', { lineId: lines[i % 2], ...pos, kind: 'pole', attachmentHeightM: 14 });
    expect(s.status).toBe(201);
    structures.push({ id: s.body.id, ...pos });
  }
  // Spans between structures of the same line up to 1.2 km apart: diagonal, crossing, some across tile edges.
  for (let i = 0; i < structures.length && spans.length < 40; i++) {
    for (let j = i + 2; j < structures.length && spans.length < 40; j += 2) {
      if (metresApart(structures[i], structures[j]) > 1200 || rnd() < 0.4) continue;
      const s = await surveyor.post('/api/spans', {
        lineId: lines[i % 2],
        fromStructureId: structures[i].id,
        toStructureId: structures[j].id,
        conductor: { codeWord: 'Linnet' },
        clearanceM: 9.5,
        terrain: 'open-field',
        surveyDate: '2026-11-20',
      });
      expect(s.status).toBe(201);
      spans.push({ id: s.body.id, from: i, to: j });
    }
  }
  const [s0, s1] = [structures[spans[0].from], structures[spans[0].to]];
  zones = [
    ring(at(0.1, 0.1), at(0.45, 0.15), at(0.3, 0.5)),
    // Concave, with a hole.
    {
      type: 'Polygon',
      coordinates: [
        [at(0.5, 0.5), at(0.95, 0.5), at(0.95, 0.95), at(0.75, 0.7), at(0.5, 0.95), at(0.5, 0.5)],
        [at(0.55, 0.55), at(0.6, 0.55), at(0.6, 0.6), at(0.55, 0.55)],
      ],
    },
    // A corner exactly on a structure (the span touches the zone at one point).
    ring([s0.lon, s0.lat], [s0.lon - 0.002, s0.lat - 0.001], [s0.lon - 0.001, s0.lat - 0.003]),
    // A thin sliver across the middle of a span.
    ring([(s0.lon + s1.lon) / 2 - 0.00005, (s0.lat + s1.lat) / 2 - 0.002], [(s0.lon + s1.lon) / 2 + 0.00005, (s0.lat + s1.lat) / 2 - 0.002], [(s0.lon + s1.lon) / 2, (s0.lat + s1.lat) / 2 + 0.002]),
  ];
  for (const [i, geometry] of zones.entries()) {
    const res = await safety.post('/api/zones', { name: `Spatial zone ${i + 1}`, reason: 'Nesting season', severity: i % 2 ? 'caution' : 'exclude', geometry, ...(i === 1 ? { validTo: '2020-01-01' } : {}) });
    expect(res.status).toBe(201);
  }
  // The zones' rescoring runs in the background: both tile paths must read the same assessments.
  await waitForAllJobs(safety);
}, 120_000);
afterAll(() => t?.close());

const lineOf = (sp: { from: number; to: number }): LineString => ({
  type: 'LineString',
  coordinates: [
    [structures[sp.from].lon, structures[sp.from].lat],
    [structures[sp.to].lon, structures[sp.to].lat],
  ],
});

// Without PostGIS the suite's set-up has said so in one line (tests/postgres/global-setup.ts).
describe.skipIf(postgisDisabled())('PostGIS and the JavaScript path give the same answers', () => {
  it('zone membership: each span touches the same active zones both ways, and each zone finds the same spans near it', async () => {
    const em = t.orm.em.fork();
    const all = await em.find(Zone, {}, { orderBy: { createdAt: 'asc', id: 'asc' } });
    let touching = 0;
    for (const sp of spans) {
      const viaPostgis = (await activeZonesForGeometry(em, lineOf(sp))).map((z) => z.id);
      const viaJs = zonesTouching(all, lineOf(sp)).map((z) => z.id);
      expect(viaPostgis, `span ${sp.id}`).toEqual(viaJs);
      const excludeOnly = (await activeZonesForGeometry(em, lineOf(sp), new Date(), { severity: 'exclude' })).map((z) => z.id);
      expect(excludeOnly).toEqual(zonesTouching(all.filter((z) => z.severity === 'exclude'), lineOf(sp)).map((z) => z.id));
      touching += viaJs.length;
    }
    // Not a vacuous comparison: some spans are in zones, most are not; the point-touch and the sliver both count.
    expect(touching).toBeGreaterThanOrEqual(3);
    expect(touching).toBeLessThan(spans.length);
    expect(zonesTouching(all.filter((z) => z.name === 'Spatial zone 3'), lineOf(spans[0]))).toHaveLength(1);
    expect(zonesTouching(all.filter((z) => z.name === 'Spatial zone 4'), lineOf(spans[0]))).toHaveLength(1);
    for (const polygon of zones) {
      const a = (await spansNearBy.postgis(em, polygon)).sort();
      const b = (await spansNearBy.javascript(em, polygon)).sort();
      expect(a).toEqual(b);
      expect(a.length).toBeGreaterThan(0);
    }
  });

  it('nearest span: the spans within reach of a position, nearest first, are the same, with distances within 1 cm', async () => {
    const em = t.orm.em.fork();
    const rnd = random(99);
    const points: { lon: number; lat: number }[] = [];
    for (let i = 0; i < 40; i++) points.push({ lon: BOX.lon + rnd() * BOX.dLon, lat: BOX.lat + rnd() * BOX.dLat });
    // Beside spans (a photo taken under the line), and exactly on a structure.
    for (const sp of spans.slice(0, 15)) {
      const f = rnd();
      const a = structures[sp.from];
      const b = structures[sp.to];
      points.push({ lon: a.lon + f * (b.lon - a.lon) + (rnd() - 0.5) * 0.0008, lat: a.lat + f * (b.lat - a.lat) + (rnd() - 0.5) * 0.0008 });
    }
    points.push({ lon: structures[spans[0].from].lon, lat: structures[spans[0].from].lat });
    const order = (l: { spanId: string; distanceM: number }[]) => [...l].sort((x, y) => x.distanceM - y.distanceM || x.spanId.localeCompare(y.spanId));
    // Two formulas on one sphere agree to well under a millimetre; a span right at the reach could fall either side.
    const clearOfEdge = (l: { spanId: string; distanceM: number }[]) => l.filter((s) => Math.abs(s.distanceM - SUGGEST_WITHIN_M) > 0.01);
    let found = 0;
    let several = 0;
    for (const p of points) {
      const a = order(await suggestSpansBy.postgis(em, p.lat, p.lon));
      const b = order(await suggestSpansBy.javascript(em, p.lat, p.lon));
      expect(clearOfEdge(a).map((s) => s.spanId), `near ${p.lon},${p.lat}`).toEqual(clearOfEdge(b).map((s) => s.spanId));
      const byId = new Map(b.map((s) => [s.spanId, s.distanceM]));
      for (const s of a) if (byId.has(s.spanId)) expect(Math.abs(s.distanceM - byId.get(s.spanId)!)).toBeLessThan(0.01);
      if (a.length) found++;
      if (a.length > 1) several++;
    }
    expect(found).toBeGreaterThanOrEqual(15);
    expect(several).toBeGreaterThanOrEqual(2);
  });

  it('span tiles: at zooms 12, 14 and 16 the PostGIS tile has the same features, tags and positions as the in-memory one, with and without filters', async () => {
    const tiles = new SpanTileService(t.orm);
    onTestFinished(() => tiles.close());
    const pair = await tiles.pairFor();
    expect(pair).not.toBeNull();
    const decode = (buf: Buffer, layer: string) => {
      const l = new VectorTile(new PbfReader(buf)).layers[layer];
      const out = new Map<string, { tags: Record<string, unknown>; points: { x: number; y: number }[] }>();
      for (let i = 0; l && i < l.length; i++) {
        const f = l.feature(i);
        out.set(String(f.properties.id), { tags: f.properties, points: f.loadGeometry().flat() });
      }
      return out;
    };
    const tileX = (lon: number, z: number) => Math.floor(((lon + 180) / 360) * 2 ** z);
    const tileY = (lat: number, z: number) => {
      const r = (lat * Math.PI) / 180;
      return Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z);
    };
    const filterSets = [{}, { status: 'draft', lineId: lines[0] }, { minScore: 0 }, { minHarvestW: 1e9 }];
    let compared = 0;
    for (const z of [FULL_DETAIL_ZOOM, 14, 16]) {
      const xs = [tileX(BOX.lon, z), tileX(BOX.lon + BOX.dLon, z)];
      const ys = [tileY(BOX.lat + BOX.dLat, z), tileY(BOX.lat, z)];
      const step = z === 16 ? Math.max(1, Math.floor((xs[1] - xs[0]) / 4)) : 1;
      for (let x = xs[0]; x <= xs[1]; x += step) {
        for (let y = ys[0]; y <= ys[1]; y += step) {
          for (const filters of filterSets) {
            const viaPostgis = (await tiles.postgisTile(pair, z, x, y, filters))!;
            const inMemory = await tiles.plainTile(z, x, y, {}, filters);
            for (const layer of z >= 13 ? ['spans', 'structures'] : ['spans']) {
              const a = decode(viaPostgis, layer);
              const b = decode(inMemory, layer);
              expect([...a.keys()].sort(), `${layer} ${z}/${x}/${y} ${JSON.stringify(filters)}`).toEqual([...b.keys()].sort());
              for (const [id, f] of a) {
                expect(f.tags, `${layer} ${id} at ${z}/${x}/${y}`).toEqual(b.get(id)!.tags);
                const other = b.get(id)!.points;
                expect(f.points.length).toBe(other.length);
                // Tile units are integers; the two round a projected position each their own way.
                f.points.forEach((p, i) => expect(Math.max(Math.abs(p.x - other[i].x), Math.abs(p.y - other[i].y))).toBeLessThanOrEqual(1));
              }
              compared += a.size;
            }
          }
        }
      }
    }
    expect(compared).toBeGreaterThan(spans.length);
  });
});
