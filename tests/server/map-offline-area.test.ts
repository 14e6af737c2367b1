// Taking an area offline, the server's part: basemap tiles one by one out of the PMTiles file (a cache keeps whole
// answers, not byte ranges) and the records in a framed box.
import fs from 'node:fs';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PMTiles, type RangeResponse, type Source } from 'pmtiles';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import { DEMO_TOWNS } from '../../shared/demo-region.ts';
import { latToTileY, lonToTileX, tileCounts, tileLat, tileLon, tileRange, tilesIn } from '../../shared/tile-math.ts';
import { makeTestApp, ORIGIN, type Client, type TestApp } from './helpers.ts';

const BASEMAP = new URL('../../server/map-assets/basemap.pmtiles', import.meta.url);
const PHOTO = fs.readFileSync(path.resolve('tests/fixtures/photos/ne.jpg'));

class BytesSource implements Source {
  constructor(private readonly bytes: Uint8Array) {}
  getKey() {
    return 'memory';
  }
  async getBytes(offset: number, length: number): Promise<RangeResponse> {
    const s = this.bytes.slice(offset, offset + length);
    return { data: s.buffer.slice(s.byteOffset, s.byteOffset + s.byteLength) };
  }
}
const gunzip = async (buf: ArrayBuffer, compression: number): Promise<ArrayBuffer> => {
  if (compression !== 2) return buf;
  const out = gunzipSync(Buffer.from(buf));
  return out.buffer.slice(out.byteOffset, out.byteOffset + out.byteLength) as ArrayBuffer;
};

function bytesOf(c: Client, url: string) {
  return c.get(url).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (d: Buffer) => chunks.push(d));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

let t: TestApp;
let surveyor: Client;
beforeAll(async () => {
  t = await makeTestApp();
  surveyor = await t.as('surveyor');
});
afterAll(() => t?.close());

describe('tile arithmetic', () => {
  it('when a point is turned into a tile and back, then the tile\'s edges hold the point (Web Mercator XYZ, common practice)', () => {
    for (const [lon, lat] of [[-130.3, -30.19], [0, 0], [179.9, 84.9], [-179.9, -84.9], [12.49, 41.89]] as const) {
      for (const z of [0, 4, 10, 16]) {
        const x = lonToTileX(lon, z);
        const y = latToTileY(lat, z);
        expect(tileLon(x, z)).toBeLessThanOrEqual(lon);
        expect(tileLon(x + 1, z)).toBeGreaterThan(lon);
        expect(tileLat(y, z)).toBeGreaterThanOrEqual(lat);
        expect(tileLat(y + 1, z)).toBeLessThan(lat);
      }
    }
    // Zoom 1 has four tiles; the point 0°, 0° lies on the corner shared by them, in the south-east one.
    expect([lonToTileX(0, 1), latToTileY(0, 1)]).toEqual([1, 1]);
  });

  it('when a box is counted, then each zoom has the tiles listed one by one, about four times the one before', () => {
    const box: [number, number, number, number] = [-130.35, -30.25, -130.25, -30.15];
    const counts = tileCounts(box, 10, 14);
    const listed = [...tilesIn(box, 10, 14)];
    for (const { z, count } of counts) expect(listed.filter((tl) => tl.z === z)).toHaveLength(count);
    expect(counts.map((c) => c.count).reduce((a, b) => a + b)).toBe(listed.length);
    for (let i = 1; i < counts.length; i++) expect(counts[i]!.count / counts[i - 1]!.count).toBeGreaterThan(1.5);
    expect(tileRange(box, 0).count).toBe(1);
  });
});

describe('basemap tiles one by one', () => {
  it('when the style is read, then its basemap source names tiles on the app with the zoom range of the file', async () => {
    const style = (await t.client().get('/map/style.json')).body;
    const header = await new PMTiles(new BytesSource(fs.readFileSync(BASEMAP)), undefined, gunzip).getHeader();
    expect(style.sources.basemap).toEqual({ type: 'vector', tiles: [`${ORIGIN}/map/basemap/{z}/{x}/{y}.mvt`], minzoom: header.minZoom, maxzoom: header.maxZoom });
  });

  it('when a tile over a town is asked for, then it is the file\'s own tile, decompressed, with the town name', async () => {
    const p = new PMTiles(new BytesSource(fs.readFileSync(BASEMAP)), undefined, gunzip);
    const town = DEMO_TOWNS[0]!;
    for (const z of [8, 12, 14]) {
      const x = lonToTileX(town.lon, z);
      const y = latToTileY(town.lat, z);
      const res = await bytesOf(t.client(), `/map/basemap/${z}/${x}/${y}.mvt`);
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('application/vnd.mapbox-vector-tile');
      expect(Buffer.compare(res.body as Buffer, Buffer.from((await p.getZxy(z, x, y))!.data))).toBe(0);
      if (z === 12) {
        const places = new VectorTile(new PbfReader(res.body as Buffer)).layers.places!;
        expect(Array.from({ length: places.length }, (_, i) => places.feature(i).properties.name)).toContain(town.name);
      }
    }
  });

  it('when a tile lies outside the file, then it is empty; a tile off the grid is a 400 naming the coordinate', async () => {
    const far = await bytesOf(t.client(), `/map/basemap/10/${lonToTileX(10, 10)}/${latToTileY(50, 10)}.mvt`);
    expect(far.status).toBe(200);
    expect((far.body as Buffer).length).toBe(0);
    const off = await t.client().get('/map/basemap/3/8/0.mvt');
    expect(off.status).toBe(400);
    expect(off.body.error.issues[0].path).toBe('x');
    expect((await t.client().get('/map/basemap/3/0/9.mvt')).body.error.issues[0].path).toBe('y');
    expect((await t.client().get('/map/basemap/40/0/0.mvt')).body.error.issues[0].path).toBe('z');
  });
});

describe('records in a framed box', () => {
  it('when a box is framed, then the spans with either structure inside it are listed with their lines, photos and structure count', async () => {
    const line = (await surveyor.post('/api/lines', { name: 'Area test line', owner: 'Harrow Vale Power Cooperative', voltageKv: 12.47, frequencyHz: 60, phases: 3, loadTypicalA: 180, loadMinA: 90, loadPeakA: 260 })).body;
    // Four structures going east, 0.002° apart, far from the demo network: the box holds the middle two.
    const ids: string[] = [];
    for (let i = 0; i < 4; i++) ids.push((await surveyor.post('/api/structures', { lineId: line.id, lat: -30.39, lon: -130.59 + i * 0.002, kind: 'pole', attachmentHeightM: 10 })).body.id);
    const spans: string[] = [];
    for (let i = 0; i < 3; i++) spans.push((await surveyor.post('/api/spans', { lineId: line.id, fromStructureId: ids[i], toStructureId: ids[i + 1], hazards: [] })).body.id);
    const photo = (await surveyor.upload('/api/photos').field('spanId', spans[1]!).attach('photo', PHOTO, 'span.jpg')).body;
    expect(photo.id).toBeTruthy();
    const box = [-130.5885, -30.395, -130.5855, -30.385].join(',');
    const res = await surveyor.get(`/api/map/area?bbox=${box}`);
    expect(res.status).toBe(200);
    // Structures 1 and 2 are inside: spans 0–1 and 1–2 touch structure 1, spans 1–2 and 2–3 touch structure 2.
    expect(res.body.structures).toBe(2);
    expect(res.body.spans.map((s: { id: string }) => s.id).sort()).toEqual([...spans].sort());
    expect(res.body.lineIds).toEqual([line.id]);
    expect(res.body.photos).toEqual([{ id: photo.id, spanId: spans[1] }]);
    expect(res.body.truncated).toBe(false);

    // A box holding only structure 0 lists only the first span.
    const west = await surveyor.get(`/api/map/area?bbox=${[-130.5905, -30.395, -130.5895, -30.385].join(',')}`);
    expect(west.body.spans.map((s: { id: string }) => s.id)).toEqual([spans[0]]);
    expect(west.body.photos).toEqual([]);
  });

  it('when the demo region is framed, then every span whose structures lie in it is listed, as the structures say', async () => {
    const lines = (await surveyor.get('/api/lines')).body.items as { id: string }[];
    const box = [-130.32, -30.22, -130.28, -30.18] as const;
    const inside = new Set<string>();
    for (const l of lines) {
      for (const s of (await surveyor.get(`/api/structures?lineId=${l.id}`)).body.items as { id: string; lat: number; lon: number }[]) {
        if (s.lon >= box[0] && s.lon <= box[2] && s.lat >= box[1] && s.lat <= box[3]) inside.add(s.id);
      }
    }
    const res = await surveyor.get(`/api/map/area?bbox=${box.join(',')}`);
    expect(res.body.structures).toBe(inside.size);
    for (const s of res.body.spans as { id: string }[]) {
      const span = (await surveyor.get(`/api/spans/${s.id}`)).body;
      expect(inside.has(span.fromStructureId) || inside.has(span.toStructureId)).toBe(true);
    }
  });

  it('when the box is missing or malformed, then a 400 names bbox', async () => {
    for (const q of ['', '?bbox=1,2,3', '?bbox=a,b,c,d', '?bbox=10,10,5,20', '?bbox=-200,0,10,10', '?bbox=0,-95,10,10', '?bbox=1,,3,4']) {
      const res = await surveyor.get(`/api/map/area${q}`);
      expect(res.status, q).toBe(400);
      expect(res.body.error.issues[0].path, q).toBe('bbox');
    }
    expect((await t.client().get('/api/map/area?bbox=0,0,1,1')).status).toBe(401);
  });
});
