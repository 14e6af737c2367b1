// Generates the demo basemap of the invented Harrow Vale region with our own code (a seeded PRNG: coast,
// rivers, lakes, roads between the towns, forest, farmland, town areas, place labels), cuts it into vector
// tiles with geojson-vt + vt-pbf and writes a PMTiles v3 archive.
// Usage: npx tsx scripts/build-basemap.ts [out.pmtiles]   (default server/map-assets/basemap.pmtiles)
import fs from 'node:fs';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import GeoJSONVT from 'geojson-vt';
import vtpbf from 'vt-pbf';
import type { Feature, FeatureCollection, Geometry, Position } from 'geojson';
import { DEMO_BBOX, DEMO_CENTER, DEMO_TOWNS, type DemoTown } from '../shared/demo-region.ts';
import { writePmtiles, type PmtilesTile } from '../server/modules/map/pmtiles-writer.ts';
import { latToTileY, lonToTileX } from '../shared/tile-math.ts';
import { prng } from '../shared/prng.ts';

export const BASEMAP_MAX_ZOOM = 14;
export const BASEMAP_LAYERS = ['land', 'landuse', 'water', 'waterway', 'roads', 'places'] as const;

const KM_PER_DEG_LAT = 111.32;
const KM_PER_DEG_LON = KM_PER_DEG_LAT * Math.cos((DEMO_CENTER[1] * Math.PI) / 180);
const round6 = (v: number) => Math.round(v * 1e6) / 1e6;
const pt = (lon: number, lat: number): Position => [round6(lon), round6(lat)];
/** Offsets a position by km east / km north. */
const offset = (p: Position, eastKm: number, northKm: number): Position => pt(p[0] + eastKm / KM_PER_DEG_LON, p[1] + northKm / KM_PER_DEG_LAT);
const distKm = (a: Position, b: Position) => Math.hypot((a[0] - b[0]) * KM_PER_DEG_LON, (a[1] - b[1]) * KM_PER_DEG_LAT);

function feature(geometry: Geometry, properties: Record<string, unknown>): Feature {
  return { type: 'Feature', geometry, properties };
}

/** A closed blob: a circle whose radius wobbles with a few low harmonics. */
function blob(rand: () => number, centre: Position, radiusKm: number, points = 28, roughness = 0.28): Position[] {
  const harmonics = [1, 2, 3, 5].map((k) => ({ k, amp: (rand() - 0.5) * roughness * (2 / k), phase: rand() * Math.PI * 2 }));
  const ring: Position[] = [];
  for (let i = 0; i < points; i++) {
    const a = (i / points) * Math.PI * 2;
    const r = radiusKm * (1 + harmonics.reduce((s, h) => s + h.amp * Math.sin(h.k * a + h.phase), 0));
    ring.push(offset(centre, r * Math.cos(a), r * Math.sin(a)));
  }
  ring.push(ring[0]);
  return ring;
}

/** A wiggly path from a to b by midpoint displacement (sideways offsets shrinking each pass). */
function wiggle(rand: () => number, a: Position, b: Position, amplitude: number, passes = 4): Position[] {
  let line: Position[] = [a, b];
  let amp = amplitude;
  for (let pass = 0; pass < passes; pass++) {
    const next: Position[] = [line[0]];
    for (let i = 1; i < line.length; i++) {
      const p = line[i - 1];
      const q = line[i];
      const dx = (q[0] - p[0]) * KM_PER_DEG_LON;
      const dy = (q[1] - p[1]) * KM_PER_DEG_LAT;
      const len = Math.hypot(dx, dy);
      const side = (rand() - 0.5) * 2 * amp * len;
      const mid = offset(pt((p[0] + q[0]) / 2, (p[1] + q[1]) / 2), (-dy / (len || 1)) * side, (dx / (len || 1)) * side);
      next.push(mid, q);
    }
    line = next;
    amp *= 0.55;
  }
  return line;
}

function townRadiusKm(t: DemoTown) {
  return t.kind === 'town' ? 1.5 : 0.8;
}

/** Every feature of the demo region, by layer. */
export function generateRegion(seed = 6061): Record<(typeof BASEMAP_LAYERS)[number], FeatureCollection> {
  const rand = prng(seed);
  const { west, south, east, north } = DEMO_BBOX;
  const towns = DEMO_TOWNS.map((t) => ({ ...t, at: pt(t.lon, t.lat) }));
  const nearTown = (p: Position, marginKm: number) => towns.some((t) => distKm(p, t.at) < townRadiusKm(t) + marginKm);

  // Land: the box, with a coast that wanders up to ~2 km outside it, so the whole box is land.
  const corners: Position[] = [pt(west, south), pt(east, south), pt(east, north), pt(west, north)];
  const coast: Position[] = [];
  for (let side = 0; side < 4; side++) {
    const a = corners[side];
    const b = corners[(side + 1) % 4];
    const steps = 24;
    for (let i = 0; i < steps; i++) {
      const f = i / steps;
      const p = pt(a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f);
      const out = 0.6 + rand() * 1.4 * Math.sin(Math.PI * f + 0.3) ** 2;
      const normal = [[0, -1], [1, 0], [0, 1], [-1, 0]][side];
      coast.push(offset(p, normal[0] * (out + 0.3), normal[1] * (out + 0.3)));
    }
  }
  coast.push(coast[0]);
  const land = [feature({ type: 'Polygon', coordinates: [coast] }, { class: 'land', name: 'Harrow Vale' })];

  // Lakes and the rivers that feed and drain them.
  const lakes = [
    { name: 'Tallow Mere', at: pt(-130.52, -30.225), r: 1.5 },
    { name: 'Quarnock Water', at: pt(-130.215, -30.125), r: 1.1 },
    { name: 'Ostle Pool', at: pt(-130.4, -30.3), r: 0.6 },
  ];
  const water: Feature[] = lakes.map((l) => feature({ type: 'Polygon', coordinates: [blob(rand, l.at, l.r, 36, 0.35)] }, { class: 'lake', name: l.name }));
  const rivers = [
    { name: 'Harrow Water', class: 'river', path: [pt(-130.44, north + 0.02), pt(-130.36, -30.12), pt(-130.31, -30.215), pt(-130.24, -30.3), pt(-130.19, south - 0.02)] },
    { name: 'Pellow Brook', class: 'stream', path: [lakes[1].at, pt(-130.15, -30.2), pt(-130.09, -30.27), pt(east + 0.02, -30.34)] },
    { name: 'Tallow Beck', class: 'stream', path: [pt(west - 0.02, -30.16), lakes[0].at, pt(-130.43, -30.26), pt(-130.36, -30.25), pt(-130.31, -30.215)] },
  ];
  const waterway: Feature[] = rivers.map((r) => {
    const coords: Position[] = [r.path[0]];
    for (let i = 1; i < r.path.length; i++) coords.push(...wiggle(rand, r.path[i - 1], r.path[i], 0.18, 5).slice(1));
    return feature({ type: 'LineString', coordinates: coords }, { class: r.class, name: r.name });
  });

  // Roads: a minimum spanning tree over the towns plus the two shortest other links, then town streets and farm tracks.
  const edges: [number, number, number][] = [];
  for (let i = 0; i < towns.length; i++) for (let j = i + 1; j < towns.length; j++) edges.push([i, j, distKm(towns[i].at, towns[j].at)]);
  edges.sort((a, b) => a[2] - b[2]);
  const parent = towns.map((_, i) => i);
  const find = (i: number): number => (parent[i] === i ? i : (parent[i] = find(parent[i])));
  const links: [number, number][] = [];
  const spare: [number, number][] = [];
  for (const [i, j] of edges) {
    if (find(i) !== find(j)) {
      parent[find(i)] = find(j);
      links.push([i, j]);
    } else spare.push([i, j]);
  }
  links.push(...spare.slice(0, 2));
  const roads: Feature[] = links.map(([i, j]) => {
    const a = towns[i];
    const b = towns[j];
    const major = a.kind === 'town' && b.kind === 'town';
    return feature({ type: 'LineString', coordinates: wiggle(rand, a.at, b.at, 0.07, 5) }, { class: major ? 'main' : 'secondary', name: `${b.name} Road` });
  });
  for (const t of towns) {
    const r = townRadiusKm(t);
    const streets = t.kind === 'town' ? 9 : 4;
    for (let s = 0; s < streets; s++) {
      const angle = rand() * Math.PI * 2;
      const from = offset(t.at, Math.cos(angle) * r * 0.15, Math.sin(angle) * r * 0.15);
      const to = offset(t.at, Math.cos(angle) * r * (0.7 + rand() * 0.4), Math.sin(angle) * r * (0.7 + rand() * 0.4));
      roads.push(feature({ type: 'LineString', coordinates: wiggle(rand, from, to, 0.05, 2) }, { class: 'street' }));
    }
    for (let k = 0; k < 3; k++) {
      const angle = rand() * Math.PI * 2;
      const from = offset(t.at, Math.cos(angle) * r, Math.sin(angle) * r);
      const len = 2 + rand() * 3;
      const to = offset(from, Math.cos(angle) * len, Math.sin(angle) * len);
      roads.push(feature({ type: 'LineString', coordinates: wiggle(rand, from, to, 0.12, 3) }, { class: 'track' }));
    }
  }

  // Land use: farmland fields around the towns, forest blobs away from them, then the town areas on top.
  const landuse: Feature[] = [];
  const cellKm = 0.8;
  for (const t of towns) {
    const reach = t.kind === 'town' ? 5 : 3.5;
    const tilt = (rand() - 0.5) * 0.6;
    for (let gx = -reach; gx <= reach; gx += cellKm) {
      for (let gy = -reach; gy <= reach; gy += cellKm) {
        const d = Math.hypot(gx, gy);
        if (d < townRadiusKm(t) + 0.3 || d > reach || rand() < 0.35) continue;
        const c = offset(t.at, gx * Math.cos(tilt) - gy * Math.sin(tilt), gx * Math.sin(tilt) + gy * Math.cos(tilt));
        const w = cellKm * (0.38 + rand() * 0.08);
        const h = cellKm * (0.38 + rand() * 0.08);
        const corner = (sx: number, sy: number) => offset(c, sx * w * Math.cos(tilt) - sy * h * Math.sin(tilt), sx * w * Math.sin(tilt) + sy * h * Math.cos(tilt));
        const ring = [corner(-1, -1), corner(1, -1), corner(1, 1), corner(-1, 1)];
        ring.push(ring[0]);
        landuse.push(feature({ type: 'Polygon', coordinates: [ring] }, { class: rand() < 0.25 ? 'meadow' : 'farmland' }));
      }
    }
  }
  let forests = 0;
  for (let attempt = 0; attempt < 200 && forests < 11; attempt++) {
    const c = pt(west + 0.03 + rand() * (east - west - 0.06), south + 0.03 + rand() * (north - south - 0.06));
    const r = 1.2 + rand() * 2.6;
    if (nearTown(c, r + 0.5) || lakes.some((l) => distKm(c, l.at) < l.r + r * 0.8)) continue;
    landuse.push(feature({ type: 'Polygon', coordinates: [blob(rand, c, r, 32, 0.45)] }, { class: 'forest', name: `${['Hollin', 'Brackley', 'Sedge', 'Marrow', 'Oakhurst', 'Wendle', 'Carrow', 'Thistle', 'Yarrow', 'Greyling', 'Hob'][forests]} Wood` }));
    forests++;
  }
  for (const t of towns) landuse.push(feature({ type: 'Polygon', coordinates: [blob(rand, t.at, townRadiusKm(t), 24, 0.2)] }, { class: 'residential', name: t.name }));

  const places: Feature[] = towns.map((t) => feature({ type: 'Point', coordinates: t.at }, { class: t.kind, name: t.name, rank: t.kind === 'town' ? 1 : 2 }));
  for (const l of lakes) places.push(feature({ type: 'Point', coordinates: l.at }, { class: 'water', name: l.name, rank: 3 }));

  const fc = (features: Feature[]): FeatureCollection => ({ type: 'FeatureCollection', features });
  return { land: fc(land), landuse: fc(landuse), water: fc(water), waterway: fc(waterway), roads: fc(roads), places: fc(places) };
}

/** Cuts the region into gzip-compressed MVT tiles z0..maxZoom over the region's box (plus the coast margin). */
export function tileRegion(region: ReturnType<typeof generateRegion>, maxZoom = BASEMAP_MAX_ZOOM, onProgress?: (z: number, count: number) => void): PmtilesTile[] {
  const indexes = Object.fromEntries(
    BASEMAP_LAYERS.map((name) => [name, new GeoJSONVT(region[name], { maxZoom, indexMaxZoom: maxZoom, indexMaxPoints: 0, tolerance: 3, extent: 4096, buffer: 64 })]),
  );
  const margin = 0.03;
  const tiles: PmtilesTile[] = [];
  for (let z = 0; z <= maxZoom; z++) {
    const x0 = lonToTileX(DEMO_BBOX.west - margin, z);
    const x1 = lonToTileX(DEMO_BBOX.east + margin, z);
    const y0 = latToTileY(DEMO_BBOX.north + margin, z);
    const y1 = latToTileY(DEMO_BBOX.south - margin, z);
    let count = 0;
    for (let x = x0; x <= x1; x++) {
      for (let y = y0; y <= y1; y++) {
        const layers: Record<string, { features: unknown[] }> = {};
        for (const name of BASEMAP_LAYERS) {
          const tile = indexes[name].getTile(z, x, y);
          if (tile && tile.features.length) layers[name] = tile;
        }
        if (!Object.keys(layers).length) continue;
        tiles.push({ z, x, y, data: gzipSync(vtpbf.fromGeojsonVt(layers, { version: 2, extent: 4096 }), { level: 9 }) });
        count++;
      }
    }
    onProgress?.(z, count);
  }
  return tiles;
}

export function buildBasemap(onProgress?: (z: number, count: number) => void): Buffer {
  const region = generateRegion();
  const tiles = tileRegion(region, BASEMAP_MAX_ZOOM, onProgress);
  const bounds: [number, number, number, number] = [DEMO_BBOX.west - 0.03, DEMO_BBOX.south - 0.03, DEMO_BBOX.east + 0.03, DEMO_BBOX.north + 0.03];
  return writePmtiles({
    tiles,
    bounds,
    center: [DEMO_CENTER[0], DEMO_CENTER[1], 10],
    metadata: {
      name: 'Harrow Vale (invented demo region)',
      description: 'Generated by scripts/build-basemap.ts from a seeded random generator; every feature is invented.',
      attribution: 'Roostline demo basemap',
      vector_layers: BASEMAP_LAYERS.map((id) => ({ id, minzoom: 0, maxzoom: BASEMAP_MAX_ZOOM, fields: {} })),
    },
  });
}

if (import.meta.url === `file://${process.argv[1]}` || process.argv[1]?.endsWith('build-basemap.ts')) {
  const out = path.resolve(process.argv[2] ?? 'server/map-assets/basemap.pmtiles');
  const started = Date.now();
  const bytes = buildBasemap((z, count) => console.log(`z${z}: ${count} tiles`));
  fs.mkdirSync(path.dirname(out), { recursive: true });
  fs.writeFileSync(out, bytes);
  console.log(`Wrote ${out}: ${(bytes.length / 1024).toFixed(0)} KiB in ${((Date.now() - started) / 1000).toFixed(1)} s`);
}
