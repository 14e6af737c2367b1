import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { writePmtiles } from '../../server/modules/map/pmtiles-writer.ts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import { makeTestApp, ORIGIN, type Client, type TestApp } from './helpers.ts';

let t: TestApp;
let surveyor: Client;
let safety: Client;
let lineId: string;
const structureIds: string[] = [];
const spanIds: string[] = [];

// Structures of an invented line in the demo region, ~180 m apart eastwards.
const START = { lon: -130.315, lat: -30.2 };
const STEP_DEG = 0.00187;

function lonToTileX(lon: number, z: number) {
  return Math.floor(((lon + 180) / 360) * 2 ** z);
}
function latToTileY(lat: number, z: number) {
  const r = (lat * Math.PI) / 180;
  return Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z);
}
const tileOf = (z: number, lon = START.lon + STEP_DEG, lat = START.lat) => `${z}/${lonToTileX(lon, z)}/${latToTileY(lat, z)}`;

async function getTile(c: Client, path: string, query = '') {
  const res = await c.get(`/api/tiles/spans/${path}.mvt${query}`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (d: Buffer) => chunks.push(d));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  return { res, tile: res.status === 200 ? new VectorTile(new PbfReader(res.body as Buffer)) : null };
}

function features(tile: VectorTile, layer: string) {
  const l = tile.layers[layer];
  if (!l) return [];
  return Array.from({ length: l.length }, (_, i) => l.feature(i));
}

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  surveyor = await t.as('surveyor');
  safety = await t.as('safety');
  const line = await surveyor.post('/api/lines', { name: 'Map test line', owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, loadTypicalA: 300, loadMinA: 120, loadPeakA: 520 });
  expect(line.status).toBe(201);
  lineId = line.body.id;
  for (let i = 0; i < 4; i++) {
    const s = await surveyor.post('/api/structures', { lineId, lat: START.lat, lon: START.lon + i * STEP_DEG, kind: 'pole', attachmentHeightM: 14 });
    expect(s.status).toBe(201);
    structureIds.push(s.body.id);
  }
  for (let i = 0; i < 3; i++) {
    const s = await surveyor.post('/api/spans', {
      lineId,
      fromStructureId: structureIds[i],
      toStructureId: structureIds[i + 1],
      conductor: { codeWord: 'Linnet' },
      clearanceM: 9.5,
      terrain: 'open-field',
      surveyDate: '2026-11-20',
    });
    expect(s.status).toBe(201);
    spanIds.push(s.body.id);
  }
});
afterAll(() => t?.close());

describe('span tiles', () => {
  it('when a signed-in user asks for a tile over the spans, then it is an MVT whose layer `spans` has one feature per span with id, status, score, harvestW', async () => {
    for (const role of ['planner', 'surveyor', 'safety', 'admin'] as const) {
      const { res, tile } = await getTile(await t.as(role), tileOf(14));
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('application/vnd.mapbox-vector-tile');
      const spans = features(tile!, "spans");
      expect(spans.map((f) => f.properties.id).sort()).toEqual([...spanIds].sort());
      for (const f of spans) {
        expect(f.type).toBe(2); // LineString
        expect(f.properties).toMatchObject({ status: 'draft', lineId });
        expect(typeof f.properties.lengthM).toBe('number');
        expect(Math.abs(Number(f.properties.lengthM) - 180)).toBeLessThan(5);
        const span = (await safety.get(`/api/spans/${f.properties.id}`)).body;
        if (span.assessment) {
          expect(f.properties.score).toBeCloseTo(span.assessment.score, 1);
          expect(f.properties.harvestW).toBeCloseTo(span.assessment.harvestW, 2);
        }
      }
      expect(spans.some((f) => typeof f.properties.score === 'number' && typeof f.properties.harvestW === 'number')).toBe(true);
    }
  });

  it('when the zoom is high enough, then the `structures` layer carries the structures as points', async () => {
    const { tile } = await getTile(surveyor, tileOf(15));
    const points = features(tile!, 'structures');
    expect(points.length).toBeGreaterThanOrEqual(2);
    expect(points.every((p) => p.type === 1 && structureIds.includes(String(p.properties.id)))).toBe(true);
  });

  it('when the tile is far from every span, then its `spans` layer is empty', async () => {
    const { tile } = await getTile(surveyor, tileOf(14, -130.05, -30.05));
    expect(features(tile!, 'spans')).toHaveLength(0);
  });

  it('when nobody is signed in, then 401; a bad tile address gives 400 naming the field', async () => {
    expect((await t.client().get(`/api/tiles/spans/${tileOf(14)}.mvt`)).status).toBe(401);
    const bad = await surveyor.get('/api/tiles/spans/3/9/1.mvt');
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues[0].path).toBe('x');
    expect((await surveyor.get('/api/tiles/spans/abc/1/1.mvt')).status).toBe(400);
  });

  it('when a span is edited, then the cached tile is replaced and shows the new status at once', async () => {
    const path = tileOf(13);
    const first = await getTile(surveyor, path);
    const again = await getTile(surveyor, path);
    expect(Buffer.compare(first.res.body, again.res.body)).toBe(0);
    const span = (await surveyor.get(`/api/spans/${spanIds[0]}`)).body;
    const submitted = await surveyor.post(`/api/spans/${spanIds[0]}/submit`, { version: span.version });
    expect(submitted.status).toBe(200);
    const after = await getTile(surveyor, path);
    const statuses = Object.fromEntries(features(after.tile!, 'spans').map((f) => [f.properties.id, f.properties.status]));
    expect(statuses[spanIds[0]]).toBe('submitted');
    expect(statuses[spanIds[1]]).toBe('draft');
  });

  it('when the zoom is low, then spans of one status close together are generalised into one feature that keeps the best harvest and the count; a status or line filter in the URL applies first', async () => {
    const { tile } = await getTile(surveyor, tileOf(8));
    const spans = features(tile!, 'spans');
    const drafts = spans.filter((f) => f.properties.status === 'draft');
    const detailed = features((await getTile(surveyor, tileOf(14))).tile!, 'spans').filter((f) => f.properties.status === 'draft');
    expect(detailed.length).toBeGreaterThanOrEqual(2);
    expect(drafts).toHaveLength(1);
    expect(drafts[0].properties.count).toBe(detailed.length);
    const best = Math.max(...detailed.map((f) => Number(f.properties.harvestW ?? -Infinity)));
    if (Number.isFinite(best)) expect(drafts[0].properties.harvestW).toBe(best);
    const onlySubmitted = features((await getTile(surveyor, tileOf(8), '?status=submitted')).tile!, 'spans');
    expect(onlySubmitted.map((f) => f.properties.status)).toEqual(['submitted']);
    expect(features((await getTile(surveyor, tileOf(14), '?lineId=no-such-line')).tile!, 'spans')).toHaveLength(0);
  });

  it('when the map asks for the box around the filtered spans, then it gets their count and extent', async () => {
    const all = await surveyor.get('/api/map/span-bounds');
    expect(all.status).toBe(200);
    expect(all.body.count).toBe(3);
    const [w, s, e, n] = all.body.bbox;
    expect(w).toBeCloseTo(START.lon, 6);
    expect(e).toBeCloseTo(START.lon + 3 * STEP_DEG, 6);
    expect(s).toBeCloseTo(START.lat, 6);
    expect(n).toBeCloseTo(START.lat, 6);
    const none = await surveyor.get(`/api/map/span-bounds?lineId=${lineId}&status=approved`);
    expect(none.body).toEqual({ count: 0, bbox: null });
    const bad = await surveyor.get('/api/map/span-bounds?minHarvestW=lots');
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues[0].path).toBe('minHarvestW');
  });
});

describe('approval blocked by a zone', () => {
  it('when a submitted span lies inside an active exclude zone, then approval is refused with 409 naming the zone; outside its dates it passes', async () => {
    const span = (await surveyor.get(`/api/spans/${spanIds[1]}`)).body;
    const sub = await surveyor.post(`/api/spans/${spanIds[1]}/submit`, { version: span.version });
    expect(sub.status).toBe(200);
    const box = { type: 'Polygon', coordinates: [[[-130.315, -30.205], [-130.305, -30.205], [-130.305, -30.195], [-130.315, -30.195], [-130.315, -30.205]]] };
    const zone = await safety.post('/api/zones', { name: 'Raptor nest', reason: 'Nesting season', severity: 'exclude', geometry: box });
    expect(zone.status).toBe(201);
    const refused = await safety.post(`/api/spans/${spanIds[1]}/approve`, { version: sub.body.version });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toContain('Raptor nest');
    // The zone ended yesterday: it no longer blocks.
    const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
    const ended = await safety.patch(`/api/zones/${zone.body.id}`, { version: 1, validFrom: '2020-01-01', validTo: yesterday });
    expect(ended.status).toBe(200);
    const approved = await safety.post(`/api/spans/${spanIds[1]}/approve`, { version: sub.body.version });
    expect(approved.status).toBe(200);
    expect(approved.body.status).toBe('approved');
  });

  it('when the zone is only a caution zone, then approval is not blocked', async () => {
    const span = (await surveyor.get(`/api/spans/${spanIds[2]}`)).body;
    const sub = await surveyor.post(`/api/spans/${spanIds[2]}/submit`, { version: span.version });
    const box = { type: 'Polygon', coordinates: [[[-130.316, -30.205], [-130.3, -30.205], [-130.3, -30.195], [-130.316, -30.195], [-130.316, -30.205]]] };
    expect((await safety.post('/api/zones', { name: 'Loose gravel', reason: 'Ground crew footing', severity: 'caution', geometry: box })).status).toBe(201);
    const approved = await safety.post(`/api/spans/${spanIds[2]}/approve`, { version: sub.body.version });
    expect(approved.status).toBe(200);
  });
});

describe('tile updates in place', () => {
  it('when a span is added and a structure moved, then the next tiles show the new span and the span at its new place', async () => {
    const path = tileOf(14);
    await getTile(surveyor, path); // a warm snapshot and cache
    const extra = await surveyor.post('/api/structures', { lineId, lat: START.lat, lon: START.lon + 4 * STEP_DEG, kind: 'pole', attachmentHeightM: 14 });
    expect(extra.status).toBe(201);
    const added = await surveyor.post('/api/spans', { lineId, fromStructureId: structureIds[3], toStructureId: extra.body.id });
    expect(added.status).toBe(201);
    const afterAdd = features((await getTile(surveyor, path)).tile!, 'spans');
    expect(afterAdd.map((f) => f.properties.id)).toContain(added.body.id);
    const moved = await surveyor.patch(`/api/structures/${extra.body.id}`, { version: extra.body.version, lat: START.lat + 0.001 });
    expect(moved.status).toBe(200);
    const afterMove = features((await getTile(surveyor, path)).tile!, 'spans').find((f) => f.properties.id === added.body.id)!;
    const [a, b] = afterMove.loadGeometry()[0];
    expect(b.y).toBeLessThan(a.y); // further north is further up the tile
  });
});

describe('zones and the tile cache', () => {
  it('when a caution zone is drawn over a span, then the span is rescored and its tile shows the lower score without a restart', async () => {
    const path = tileOf(14);
    const scoreOf = async () => features((await getTile(surveyor, path)).tile!, 'spans').find((f) => f.properties.id === spanIds[0])?.properties.score as number | undefined;
    const before = await scoreOf();
    expect(typeof before).toBe('number');
    const box = { type: 'Polygon', coordinates: [[[-130.3152, -30.2004], [-130.3138, -30.2004], [-130.3138, -30.1996], [-130.3152, -30.1996], [-130.3152, -30.2004]]] };
    expect((await safety.post('/api/zones', { name: 'Cache check', reason: 'Tile cache check', severity: 'caution', geometry: box })).status).toBe(201);
    let after = before;
    for (let i = 0; i < 40 && after === before; i++) {
      await new Promise((r) => setTimeout(r, 250));
      after = await scoreOf();
    }
    expect(after).toBeLessThan(before!);
  });
});

describe('map style and assets', () => {
  it('when the style is fetched, then every URL in it is on the app\'s own origin', async () => {
    const res = await t.client().get('/map/style.json');
    expect(res.status).toBe(200);
    const text = JSON.stringify(res.body);
    const urls = [...text.matchAll(/(?:[a-z]+:)?\/\/[^"\s]+/gi)].map((m) => m[0]);
    expect(urls.length).toBeGreaterThanOrEqual(6);
    for (const url of urls) expect(url.replace(/^pmtiles:\/\//, '').startsWith(ORIGIN + '/')).toBe(true);
    expect(Object.keys(res.body.sources).sort()).toEqual(['basemap', 'photos', 'spans', 'zones']);
    expect(res.body.sources.spans.tiles[0]).toBe(`${ORIGIN}/api/tiles/spans/{z}/{x}/{y}.mvt`);
  });

  it('when the style names a font, sprite or basemap tiles, then the app serves them (and the basemap file in byte ranges)', async () => {
    const style = (await t.client().get('/map/style.json')).body;
    const c = t.client();
    const local = (url: string) => url.replace(/^pmtiles:\/\//, '').slice(ORIGIN.length);
    for (const face of Object.values(style['font-faces']).flat() as { url: string }[]) {
      const res = await c.get(local(face.url));
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('font/woff2');
    }
    for (const ext of ['.json', '.png', '@2x.json', '@2x.png']) expect((await c.get(local(style.sprite) + ext)).status).toBe(200);
    // The basemap is read tile by tile (tests/server/map-offline-area.test.ts); the file itself is still served in ranges.
    expect(style.sources.basemap.tiles).toEqual([`${ORIGIN}/map/basemap/{z}/{x}/{y}.mvt`]);
    const range = await c.get('/map/basemap.pmtiles').set('Range', 'bytes=0-126');
    expect(range.status).toBe(206);
    expect(Buffer.from(range.body).subarray(0, 7).toString()).toBe('PMTiles');
    expect((await c.get('/map/sprites/../../package.json')).status).toBe(404);
  });

  it('when BASEMAP_PATH names a PMTiles file of another region, then the style opens on that region', async () => {
    const file = path.join(os.tmpdir(), `roostline-region-${process.pid}.pmtiles`);
    fs.writeFileSync(file, writePmtiles({ tiles: [{ z: 0, x: 0, y: 0, data: gzipSync(Buffer.from('x')) }], metadata: {}, bounds: [10.1, 45.2, 10.9, 45.8], center: [10.5, 45.5, 9] }));
    const other = await makeTestApp({ basemapPath: file });
    try {
      const style = (await other.client().get('/map/style.json')).body;
      expect(style.center).toEqual([10.5, 45.5]);
      expect(style.zoom).toBe(9);
      expect(style.metadata['roostline:bbox']).toEqual([10.1, 45.2, 10.9, 45.8]);
    } finally {
      await other.close();
      fs.rmSync(file, { force: true });
    }
    const own = (await t.client().get('/map/style.json')).body;
    expect(own.center[0]).toBeCloseTo(-130.3, 6);
    expect(own.center[1]).toBeCloseTo(-30.2, 6);
  });

  it('when BASEMAP_PATH names another file, then that file is served', async () => {
    const other = await makeTestApp({ basemapPath: new URL('../../package.json', import.meta.url).pathname });
    try {
      const res = await other.client().get('/map/basemap.pmtiles');
      expect(res.status).toBe(200);
      expect(Buffer.from(res.body).toString()).toBe(fs.readFileSync(new URL('../../package.json', import.meta.url), 'utf8'));
    } finally {
      await other.close();
    }
  });
});
