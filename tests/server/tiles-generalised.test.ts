// The fast span tiles (generalised layers built once per data version, patched on edits; the grid at full detail)
// give the same features as the plain path that looks at every span for each tile, on a sample of tiles at
// z6, z8, z11 and z14, before and after edits; and every approved span stays drawn at each of those zooms
// (at a generalised zoom: by an approved feature of its own cell in a tile it crosses). Right after a start, the
// first tiles come from a box query before the spans are read into memory: those match the plain path too.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../../server/db.ts';
import { seedDemoUsers } from '../../server/seeders/demo-users.ts';
import { seedScaleInventory } from '../../server/seeders/scale-inventory.ts';
import { ensureAssessmentDefaults } from '../../server/modules/assessment/profiles.service.ts';
import { assessSpansBulk } from '../../server/modules/assessment/assessment.service.ts';
import { cellSizeAt, FULL_DETAIL_ZOOM, SpanTileService, TILE_EXTENT } from '../../server/modules/map/span-tiles.ts';
import { sql } from '../../server/sql/query.ts';
import { spanLengthM } from '../../server/modules/inventory/inventory.service.ts';

interface Row {
  id: string;
  line_id: string;
  status: string;
  lon0: number;
  lat0: number;
  lon1: number;
  lat1: number;
}

let orm: MikroORM;
let service: SpanTileService;
const ZOOMS = [6, 8, 11, 14];

// Web mercator, written out here on its own (not the module's helpers), so the check does not share the code it checks.
const mx = (lon: number) => (lon + 180) / 360;
const my = (lat: number) => {
  const s = Math.sin((lat * Math.PI) / 180);
  return 0.5 - Math.log((1 + s) / (1 - s)) / (4 * Math.PI);
};
const px = (m: number, z: number) => Math.round(m * 2 ** z * TILE_EXTENT);

async function spans(): Promise<Row[]> {
  return sql.all<Row>(
    orm.em.fork(),
    'select s.id, s.line_id, s.status, a.lon as lon0, a.lat as lat0, b.lon as lon1, b.lat as lat1 from spans s join structures a on a.id = s.from_structure_id join structures b on b.id = s.to_structure_id',
  );
}

function decode(bytes: Buffer) {
  const layer = new VectorTile(new PbfReader(bytes)).layers.spans;
  if (!layer) return [];
  return Array.from({ length: layer.length }, (_, i) => {
    const f = layer.feature(i);
    const [[a, b]] = f.loadGeometry();
    return { props: f.properties, a, b };
  });
}

/** What the comparison looks at: id, status, count and the figures each feature carries, sorted. */
const featureSet = (bytes: Buffer) =>
  decode(bytes)
    .map(({ props: p }) => `${p.id}|${p.status}|${p.count ?? ''}|${p.harvestW ?? ''}|${p.score ?? ''}|${p.perchable ?? ''}`)
    .sort();

/** A sample of tiles at zoom z: those holding the ends of every 7th span, and the tile beside each. */
function sampleTiles(rows: Row[], z: number) {
  const keys = new Set<string>();
  rows.forEach((r, k) => {
    if (k % 7) return;
    const x = Math.floor(mx(r.lon0) * 2 ** z);
    const y = Math.floor(my(r.lat0) * 2 ** z);
    keys.add(`${x}/${y}`);
    keys.add(`${x + 1}/${y}`);
  });
  return [...keys].slice(0, 40).map((k) => k.split('/').map(Number) as [number, number]);
}

async function compareSample(z: number, filters = {}) {
  const rows = await spans();
  let features = 0;
  for (const [x, y] of sampleTiles(rows, z)) {
    const fast = await service.tile(z, x, y, {}, filters);
    const plain = await service.plainTile(z, x, y, {}, filters);
    const set = featureSet(fast);
    expect(set, `z${z}/${x}/${y}`).toEqual(featureSet(plain));
    features += set.length;
  }
  expect(features).toBeGreaterThan(0);
}

/** Every approved span is drawn at zoom z in the tile that holds its first end. */
async function everyApprovedSpanDrawn(z: number) {
  const rows = (await spans()).filter((r) => r.status === 'approved');
  expect(rows.length).toBeGreaterThan(50);
  const tiles = new Map<string, ReturnType<typeof decode>>();
  for (const r of rows) {
    const x = Math.floor(mx(r.lon0) * 2 ** z);
    const y = Math.floor(my(r.lat0) * 2 ** z);
    const key = `${x}/${y}`;
    if (!tiles.has(key)) tiles.set(key, decode(await service.tile(z, x, y)));
    const features = tiles.get(key)!.filter((f) => f.props.status === 'approved');
    if (z >= FULL_DETAIL_ZOOM) {
      expect(features.some((f) => f.props.id === r.id), `${r.id} at z${z}`).toBe(true);
      continue;
    }
    // Generalised: an approved feature whose midpoint falls in the same cell as this span's midpoint.
    const cs = cellSizeAt(z);
    const cell = (ax: number, bx: number) => Math.floor((ax + bx) / 2 / cs);
    const cx = cell(px(mx(r.lon0), z), px(mx(r.lon1), z));
    const cy = cell(px(my(r.lat0), z), px(my(r.lat1), z));
    const found = features.some((f) => cell(f.a.x + x * TILE_EXTENT, f.b.x + x * TILE_EXTENT) === cx && cell(f.a.y + y * TILE_EXTENT, f.b.y + y * TILE_EXTENT) === cy);
    expect(found, `${r.id} at z${z}`).toBe(true);
  }
}

beforeAll(async () => {
  orm = await initORM(':memory:');
  await seedDemoUsers(orm.em.fork());
  await ensureAssessmentDefaults(orm.em.fork());
  await seedScaleInventory(orm.em.fork(), { spans: 1500, seed: 9 });
  // Two spans in three assessed: the rest carry no figures (ties and missing values are part of what is compared).
  const ids = (await sql.all<{ id: string }>(orm.em.fork(), 'select id from spans order by id')).map((r) => r.id).filter((_, i) => i % 3);
  await assessSpansBulk(orm.em.fork(), ids);
  service = new SpanTileService(orm);
  await service.layersReady();
}, 180_000);
afterAll(async () => {
  service?.close();
  await orm?.close();
});

describe('fast span tiles against the plain path', () => {
  it.each(ZOOMS)('when tiles at z%i are built by the fast path, then each has the same features as the plain path', async (z) => {
    await compareSample(z);
  });

  it.each(ZOOMS)('when the map is at z%i, then every approved span is drawn in the tile it starts in', async (z) => {
    await everyApprovedSpanDrawn(z);
  });

  it('when the tile URL filters by status or by line, then the fast path still gives the plain path\'s features', async () => {
    const [{ line_id: lineId }] = await spans();
    for (const z of ZOOMS) {
      await compareSample(z, { status: 'approved' });
      await compareSample(z, { status: 'returned' });
      await compareSample(z, { lineId });
    }
  });

  it('when spans are edited, moved and added, then the layers are patched (not rebuilt) and still match the plain path', async () => {
    const builds = service.stats.layerBuilds;
    const em = orm.em.fork();
    const rows = await spans();
    const stamp = `(select max(updated_at) from spans) + 1`;
    // Statuses changed, a harvest raised far above the rest (its cell's representative changes), a figure removed.
    for (const r of rows.filter((_, i) => i % 37 === 0)) await sql.run(em, `update spans set status = 'approved', updated_at = ${stamp} where id = ?`, [r.id]);
    for (const r of rows.filter((_, i) => i % 41 === 1)) await sql.run(em, `update spans set status = 'suspended', updated_at = ${stamp} where id = ?`, [r.id]);
    await sql.run(em, 'update assessments set harvest_w = 9999, computed_at = (select max(computed_at) from assessments) + 1 where span_id = ?', [rows[5].id]);
    // A structure moved about 3 km: its spans change cell at every zoom.
    const [moved] = await sql.all<{ id: string }>(em, 'select from_structure_id as id from spans where id = ?', [rows[10].id]);
    await sql.run(em, 'update structures set lon = lon + 0.04, lat = lat + 0.02, updated_at = (select max(updated_at) from structures) + 1 where id = ?', [moved.id]);
    // Every writer keeps a span's length with its structures (the first tiles after a start rely on the longest).
    const relength = async (id: string) => {
      const [r] = await sql.all<Row>(em, 'select s.id, a.lon as lon0, a.lat as lat0, b.lon as lon1, b.lat as lat1 from spans s join structures a on a.id = s.from_structure_id join structures b on b.id = s.to_structure_id where s.id = ?', [id]);
      await sql.run(em, 'update spans set length_m = ? where id = ?', [spanLengthM({ lon: r.lon0, lat: r.lat0 }, { lon: r.lon1, lat: r.lat1 }), id]);
    };
    for (const r of await sql.all<{ id: string }>(em, 'select id from spans where from_structure_id = ? or to_structure_id = ?', [moved.id, moved.id])) await relength(r.id);
    // A new span between two structures of one line that no span joins yet.
    const [a, , b] = await sql.all<{ id: string; line_id: string }>(em, 'select id, line_id from structures where line_id = (select line_id from structures order by id limit 1) order by id limit 3');
    await sql.run(
      em,
      `insert into spans (id, line_id, from_structure_id, to_structure_id, status, version, length_m, conductor_material, conductor_diameter_mm, created_at, updated_at)
       values ('span-added-in-test', ?, ?, ?, 'approved', 1, 150, 'ACSR', 18.3, ${stamp}, ${stamp})`,
      [a.line_id, a.id, b.id],
    );
    await relength('span-added-in-test');
    await service.syncNow();
    for (const z of ZOOMS) await compareSample(z);
    for (const z of ZOOMS) await everyApprovedSpanDrawn(z);
    expect(service.stats.layerBuilds).toBe(builds);
    const z14 = (await spans()).find((r) => r.id === 'span-added-in-test')!;
    const tile = decode(await service.tile(14, Math.floor(mx(z14.lon0) * 2 ** 14), Math.floor(my(z14.lat0) * 2 ** 14)));
    expect(tile.some((f) => f.props.id === 'span-added-in-test')).toBe(true);
  });

  it('when tiles are asked for right after a start (nothing read into memory yet), then each is answered from its own box query with the plain path\'s features', async () => {
    const rows = await spans();
    for (const z of [10, 11, 14]) {
      for (const [x, y] of sampleTiles(rows, z).slice(0, 12)) {
        const fresh = new SpanTileService(orm);
        try {
          const first = await fresh.tile(z, x, y);
          expect(fresh.stats.directTiles, `z${z}/${x}/${y}`).toBe(1);
          expect(featureSet(first), `z${z}/${x}/${y}`).toEqual(featureSet(await service.plainTile(z, x, y)));
          await fresh.layersReady(); // the snapshot is read after the first tile; let it finish before closing
        } finally {
          fresh.close();
        }
      }
    }
  });
});
