// Span tiles kept between runs: a service that closes keeps its cached tiles in a file beside the SQLite database,
// and the next start serves a kept tile (before its snapshot is read) only while the database is unchanged since.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PbfReader } from 'pbf';
import { VectorTile } from '@mapbox/vector-tile';
import type { MikroORM } from '@mikro-orm/sqlite';
import { initORM } from '../../server/db.ts';
import { seedDemoUsers } from '../../server/seeders/demo-users.ts';
import { seedScaleInventory } from '../../server/seeders/scale-inventory.ts';
import { ensureAssessmentDefaults } from '../../server/modules/assessment/profiles.service.ts';
import { assessSpansBulk } from '../../server/modules/assessment/assessment.service.ts';
import { SpanTileService } from '../../server/modules/map/span-tiles.ts';
import { readStoredTiles } from '../../server/modules/map/tile-store.ts';
import { sql } from '../../server/sql/query.ts';

let dir: string;
let file: string;
let orm: MikroORM;
let spanId: string;
let at: { z: number; x: number; y: number };
let low: { z: number; x: number; y: number };

const tileOf = (lon: number, lat: number, z: number) => {
  const r = (lat * Math.PI) / 180;
  return { z, x: Math.floor(((lon + 180) / 360) * 2 ** z), y: Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z) };
};
function spanFeatures(bytes: Buffer) {
  const l = new VectorTile(new PbfReader(bytes)).layers.spans;
  return l ? Array.from({ length: l.length }, (_, i) => l.feature(i).properties) : [];
}
/** A service that has read its snapshot and made the two tiles, closed so it keeps them. */
async function keepTwoTiles() {
  const s = new SpanTileService(orm);
  await s.layersReady();
  const made = [await s.tile(at.z, at.x, at.y), await s.tile(low.z, low.x, low.y)];
  s.close();
  return made;
}

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-kept-tiles-'));
  file = path.join(dir, 'kept.sqlite');
  orm = await initORM(file);
  await seedDemoUsers(orm.em.fork());
  await ensureAssessmentDefaults(orm.em.fork());
  await seedScaleInventory(orm.em.fork(), { spans: 300, seed: 9 });
  await assessSpansBulk(orm.em.fork());
  const row = (await sql.get<{ id: string; lon: number; lat: number }>(orm.em.fork(), "select s.id, a.lon, a.lat from spans s join structures a on a.id = s.from_structure_id where s.status = 'approved' order by s.id limit 1"))!;
  spanId = row.id;
  at = tileOf(row.lon, row.lat, 15);
  low = tileOf(row.lon, row.lat, 8);
}, 120_000);
afterAll(async () => {
  await orm?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('span tiles kept between runs', () => {
  it('when the database is unchanged since the last run, then the first tiles are the kept ones, byte for byte, with no query of their own', async () => {
    const made = await keepTwoTiles();
    const kept = await readStoredTiles(`${file}.tiles`);
    expect(kept?.tiles.size).toBe(2);

    const next = new SpanTileService(orm);
    expect(Buffer.compare(await next.tile(at.z, at.x, at.y), made[0])).toBe(0);
    // A low zoom waits for the whole snapshot otherwise; kept, it comes at once.
    expect(Buffer.compare(await next.tile(low.z, low.x, low.y), made[1])).toBe(0);
    expect(next.stats.keptTiles).toBe(2);
    expect(next.stats.directTiles).toBe(0);
    // A tile that was not kept comes from its own query as before.
    await next.tile(at.z, at.x + 3, at.y);
    expect(next.stats.directTiles).toBe(1);
    next.close();
  });

  it('when a span is changed by a direct write after the last run (no listener), then the kept tile is not served and the new status shows', async () => {
    await keepTwoTiles();
    await sql.run(orm.em.fork(), "update spans set status = 'suspended', updated_at = (select max(updated_at) from spans) + 1 where id = ?", [spanId]);
    const next = new SpanTileService(orm);
    const p = spanFeatures(await next.tile(at.z, at.x, at.y)).find((f) => f.id === spanId);
    expect(p?.status).toBe('suspended');
    expect(next.stats.keptTiles).toBe(0);
    next.close();
  });

  it('when the database changes while kept tiles are being served, then the next tile is made afresh', async () => {
    await keepTwoTiles();
    const next = new SpanTileService(orm);
    await next.tile(at.z, at.x, at.y);
    expect(next.stats.keptTiles).toBe(1);
    await sql.run(orm.em.fork(), "update spans set status = 'approved', updated_at = (select max(updated_at) from spans) + 1 where id = ?", [spanId]);
    const p = spanFeatures(await next.tile(at.z, at.x, at.y)).find((f) => f.id === spanId);
    expect(p?.status).toBe('approved');
    expect(next.stats.keptTiles).toBe(1);
    next.close();
  });

  it('when this app writes (a listener syncs), then kept tiles are no longer served', async () => {
    await keepTwoTiles();
    const next = new SpanTileService(orm);
    await next.syncNow();
    await next.tile(at.z, at.x, at.y);
    expect(next.stats.keptTiles).toBe(0);
    next.close();
  });

  it('when the kept file is damaged, then it is ignored', async () => {
    fs.writeFileSync(`${file}.tiles`, 'RLT1 not a tile file');
    expect(await readStoredTiles(`${file}.tiles`)).toBeNull();
    const next = new SpanTileService(orm);
    await next.tile(at.z, at.x, at.y);
    expect(next.stats.keptTiles).toBe(0);
    next.close();
  });
});
