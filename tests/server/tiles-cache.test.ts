// A write stamps its row with the time of writing (as every writer of the app does).
// Span tiles kept in step with the database by its data version: a change made without any listener (a direct
// write, as a background job or another process makes) shows in the next tile after a sync; an unchanged database
// is not re-read; cached tiles are served until then.
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
import { sql } from '../../server/sql/query.ts';

let orm: MikroORM;
let service: SpanTileService;
let at: { z: number; x: number; y: number };
let spanId: string;

function spanFeatures(bytes: Buffer) {
  const l = new VectorTile(new PbfReader(bytes)).layers.spans;
  return l ? Array.from({ length: l.length }, (_, i) => l.feature(i).properties) : [];
}

beforeAll(async () => {
  orm = await initORM(':memory:');
  await seedDemoUsers(orm.em.fork());
  await ensureAssessmentDefaults(orm.em.fork());
  await seedScaleInventory(orm.em.fork(), { spans: 300, seed: 5 });
  await assessSpansBulk(orm.em.fork());
  const row = (await sql.get<{ id: string; lon: number; lat: number }>(orm.em.fork(), "select s.id, a.lon, a.lat from spans s join structures a on a.id = s.from_structure_id where s.status = 'approved' order by s.id limit 1"))!;
  spanId = row.id;
  const z = 15;
  const r = (row.lat * Math.PI) / 180;
  at = { z, x: Math.floor(((row.lon + 180) / 360) * 2 ** z), y: Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z) };
  service = new SpanTileService(orm);
  // Read into memory first (tiles asked for before that come from their own query, uncached: tiles-generalised.test.ts).
  await service.layersReady();
}, 120_000);
afterAll(async () => {
  service?.close();
  await orm?.close();
});

describe('span tiles and the data version', () => {
  it('when a span is changed by a direct write, then the next tile after a sync shows it; with no change the cache is served and nothing is re-read', async () => {
    const before = spanFeatures(await service.tile(at.z, at.x, at.y)).find((p) => p.id === spanId);
    expect(before?.status).toBe('approved');
    await service.syncNow(); // reads the fingerprint once, records the version
    const hits = service.stats.hits;
    const version = service.dataVersion;
    await service.syncNow(); // nothing changed: same data version, cached tile kept
    expect(service.dataVersion).toBe(version);
    await service.tile(at.z, at.x, at.y);
    expect(service.stats.hits).toBe(hits + 1);

    await sql.run(orm.em.fork(), "update spans set status = 'suspended', updated_at = (select max(updated_at) from spans) + 1 where id = ?", [spanId]);
    await service.syncNow();
    expect(service.dataVersion).toBeGreaterThan(version);
    const after = spanFeatures(await service.tile(at.z, at.x, at.y)).find((p) => p.id === spanId);
    expect(after?.status).toBe('suspended');
  });

  it('when a rescore changes a span\'s harvest, then its tile carries the new figure after a sync', async () => {
    await sql.run(orm.em.fork(), 'update assessments set harvest_w = 1234.5, computed_at = (select max(computed_at) from assessments) + 1 where span_id = ?', [spanId]);
    await service.syncNow();
    const p = spanFeatures(await service.tile(at.z, at.x, at.y)).find((f) => f.id === spanId);
    expect(p?.harvestW).toBe(1234.5);
  });
});
