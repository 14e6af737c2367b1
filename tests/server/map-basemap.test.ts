import fs from 'node:fs';
import { gunzipSync, gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { PMTiles, type Source, type RangeResponse } from 'pmtiles';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import { writePmtiles } from '../../server/modules/map/pmtiles-writer.ts';
import { buildBasemap, BASEMAP_LAYERS, BASEMAP_MAX_ZOOM } from '../../scripts/build-basemap.ts';
import { DEMO_BBOX, DEMO_TOWNS } from '../../shared/demo-region.ts';

const BASEMAP = new URL('../../server/map-assets/basemap.pmtiles', import.meta.url);

/** A pmtiles Source over bytes in memory. */
class BytesSource implements Source {
  constructor(private readonly bytes: Uint8Array) {}
  getKey() {
    return 'memory';
  }
  async getBytes(offset: number, length: number): Promise<RangeResponse> {
    const slice = this.bytes.slice(offset, offset + length);
    return { data: slice.buffer.slice(slice.byteOffset, slice.byteOffset + slice.byteLength) };
  }
}

const node = async (buf: ArrayBuffer, compression: number): Promise<ArrayBuffer> => {
  if (compression !== 2) return buf;
  const out = gunzipSync(Buffer.from(buf));
  return out.buffer.slice(out.byteOffset, out.byteOffset + out.byteLength) as ArrayBuffer;
};

function tileXY(lon: number, lat: number, z: number) {
  const r = (lat * Math.PI) / 180;
  return { x: Math.floor(((lon + 180) / 360) * 2 ** z), y: Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z) };
}

describe('PMTiles writer', () => {
  it('when tiles are written, then the pmtiles reader reads every one back byte for byte, with header and metadata', async () => {
    const tiles = [];
    for (let z = 0; z <= 3; z++) for (let x = 0; x < 2 ** z; x++) for (let y = 0; y < 2 ** z; y++) tiles.push({ z, x, y, data: gzipSync(Buffer.from(`tile ${z}/${x}/${y}`)) });
    const archive = writePmtiles({ tiles, metadata: { name: 'check' }, bounds: [-10, -5, 10, 5], center: [1, 2, 3] });
    const p = new PMTiles(new BytesSource(archive), undefined, node);
    const header = await p.getHeader();
    expect(header).toMatchObject({ specVersion: 3, minZoom: 0, maxZoom: 3, minLon: -10, minLat: -5, maxLon: 10, maxLat: 5, centerZoom: 3, centerLon: 1, centerLat: 2, tileType: 1, numAddressedTiles: tiles.length });
    expect(await p.getMetadata()).toEqual({ name: 'check' });
    for (const t of tiles) {
      const got = await p.getZxy(t.z, t.x, t.y);
      expect(Buffer.from(got!.data).toString()).toBe(`tile ${t.z}/${t.x}/${t.y}`);
    }
    expect(await p.getZxy(4, 0, 0)).toBeUndefined();
  });

  it('when there are too many tiles for the root directory, then leaf directories are written and still read back; identical tiles are stored once', async () => {
    const tiles = [];
    const same = Buffer.from('ocean');
    for (let x = 0; x < 256; x++) for (let y = 0; y < 256; y++) tiles.push({ z: 8, x, y, data: (x * 7 + y) % 5 === 0 ? Buffer.from(`land ${x}/${y}`) : same });
    const archive = writePmtiles({ tiles, metadata: {}, bounds: [-180, -85, 180, 85], center: [0, 0, 8], tileCompression: 1 });
    const p = new PMTiles(new BytesSource(archive), undefined, node);
    const header = await p.getHeader();
    expect(header.leafDirectoryLength).toBeGreaterThan(0);
    expect(header.numTileContents).toBe(1 + tiles.filter((t) => t.data !== same).length);
    for (const [x, y] of [[0, 0], [5, 0], [255, 255], [100, 37], [13, 200]]) {
      const got = Buffer.from((await p.getZxy(8, x, y))!.data).toString();
      expect(got).toBe((x * 7 + y) % 5 === 0 ? `land ${x}/${y}` : 'ocean');
    }
  });
});

describe('demo basemap', () => {
  it('when the generator runs, then it reproduces the committed basemap byte for byte (the file is generated, not hand-made)', () => {
    expect(Buffer.compare(buildBasemap(), fs.readFileSync(BASEMAP))).toBe(0);
    expect(fs.statSync(BASEMAP).size).toBeLessThan(2 * 1024 * 1024);
  });

  it('when a tile over a town is read from the committed file, then it has the basemap layers and the town name', async () => {
    const p = new PMTiles(new BytesSource(fs.readFileSync(BASEMAP)), undefined, node);
    const header = await p.getHeader();
    expect(header.maxZoom).toBe(BASEMAP_MAX_ZOOM);
    expect(header.minLon).toBeLessThanOrEqual(DEMO_BBOX.west);
    expect(header.maxLat).toBeGreaterThanOrEqual(DEMO_BBOX.north);
    const town = DEMO_TOWNS.find((t) => t.kind === 'town')!;
    const { x, y } = tileXY(town.lon, town.lat, 12);
    const got = await p.getZxy(12, x, y);
    const tile = new VectorTile(new PbfReader(new Uint8Array(got!.data)));
    for (const layer of ['land', 'landuse', 'roads', 'places']) expect(Object.keys(tile.layers)).toContain(layer);
    expect(Object.keys(tile.layers).every((l) => (BASEMAP_LAYERS as readonly string[]).includes(l))).toBe(true);
    const places = tile.layers.places;
    const names = Array.from({ length: places.length }, (_, i) => places.feature(i).properties.name);
    expect(names).toContain(town.name);
    const landuse = tile.layers.landuse;
    const classes = new Set(Array.from({ length: landuse.length }, (_, i) => landuse.feature(i).properties.class));
    expect(classes.has('residential')).toBe(true);
  });
});
