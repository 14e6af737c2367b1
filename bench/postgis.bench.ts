// Span tiles on PostgreSQL at 100 000 spans: the PostGIS path (ST_AsMVT over the GiST index, zoom 12 and up) beside
// the in-memory builder's plain path (the reference the tests use) on the same database, cold (nothing cached), per zoom; and the first tile of a fresh
// service each way (PostGIS needs no snapshot; the in-memory builder reads every span first). A throwaway cluster
// (tests/postgres/cluster.ts); skipped with one line without PostgreSQL or PostGIS. BENCH_PG_SPANS sets the count.
// The inventory is written with SQL (generate_series; the triggers give each span its line); scores are synthetic.
import pg from 'pg';
import { initORM } from '../server/db.ts';
import { ensureAssessmentDefaults } from '../server/modules/assessment/profiles.service.ts';
import { defaultAssessmentPair } from '../server/modules/inventory/inventory.service.ts';
import { SpanTileService, type TilePair } from '../server/modules/map/span-tiles.ts';
import { usesPostgis } from '../server/sql/postgis.ts';
import { sql } from '../server/sql/query.ts';
import { DEMO_BBOX } from '../shared/demo-region.ts';
import { prng } from '../shared/prng.ts';
import { postgresBinDir, startCluster } from '../tests/postgres/cluster.ts';
import type { BenchRow } from './run.ts';
import { pct, tileOf } from './measure.ts';

const SPANS = Number(process.env.BENCH_PG_SPANS ?? 100_000);
const PER_LINE = 100;
const STEP_DEG = 0.0018;
const ROWS = 200;
const SAMPLES = 30;

const ms = (v: number) => +v.toFixed(1);

export async function run(): Promise<BenchRow[]> {
  const bin = postgresBinDir();
  if (!bin) {
    console.log('  skipped: no PostgreSQL binaries (apt-get install -y postgresql-15 postgresql-15-postgis-3)');
    return [];
  }
  const cluster = await startCluster(bin);
  try {
    const admin = new pg.Client({ connectionString: cluster.url });
    await admin.connect();
    const { rows: available } = await admin.query("select 1 from pg_available_extensions where name = 'postgis'");
    await admin.query('create database bench');
    await admin.end();
    if (!available.length) {
      console.log('  skipped: PostGIS is not installed (apt-get install -y postgresql-15-postgis-3)');
      return [];
    }
    const orm = await initORM(cluster.url.replace(/\/postgres$/, '/bench'));
    try {
      const em = orm.em.fork();
      await ensureAssessmentDefaults(em);
      const pair = (await defaultAssessmentPair(em))! as TilePair;
      if (!(await usesPostgis(em))) throw new Error('PostGIS columns missing after the migration');
      const lines = Math.ceil(SPANS / PER_LINE);
      const seedStart = performance.now();
      // Lines in rows 0.002° apart, each running east from its own start; structure j of line i, span j → j+1.
      await sql.run(em, "insert into lines (id, name, owner, voltage_kv, frequency_hz, load_typical_a, load_min_a, load_peak_a, created_at, updated_at) select 'l' || i, 'Bench line ' || i, 'Harrow Vale Power Cooperative', 69, 60, 300, 120, 520, now(), now() from generate_series(0, ?::int - 1) i", [lines]);
      await sql.run(
        em,
        "insert into structures (id, line_id, lat, lon, kind, label, attachment_height_m, created_at, updated_at) select 'l' || i || 's' || j, 'l' || i, ?::float8 + (i % ?::int) * 0.002, ?::float8 + (i / ?::int) * (?::int * ?::float8 + 0.01) + j * ?::float8, 'pole', 'S' || j, 14, now(), now() from generate_series(0, ?::int - 1) i, generate_series(0, ?::int) j",
        [DEMO_BBOX.south, ROWS, DEMO_BBOX.west, ROWS, PER_LINE, STEP_DEG, STEP_DEG, lines, PER_LINE],
      );
      await sql.run(
        em,
        "insert into spans (id, line_id, from_structure_id, to_structure_id, status, length_m, created_at, updated_at) select 'l' || i || 'p' || j, 'l' || i, 'l' || i || 's' || j, 'l' || i || 's' || (j + 1), (array['draft','submitted','approved','returned','suspended'])[1 + (i + j) % 5], 170 + (j % 30), now(), now() from generate_series(0, ?::int - 1) i, generate_series(0, ?::int - 1) j",
        [lines, PER_LINE],
      );
      await sql.run(
        em,
        "insert into assessments (span_id, harvester_profile_id, drone_profile_id, perchable, score, harvest_w, conductor_temp_c, ampacity_a, result, inputs, method_version, settings_version, harvester_version, drone_version, computed_at) select id, ?, ?, (length_m::int % 3) > 0, (length_m::int * 7) % 100, (length_m::int * 13) % 400 / 3.0, 40, 500, '{}'::jsonb, '{}'::jsonb, 'bench', 1, 1, 1, now() from spans",
        [pair.harvesterProfileId, pair.droneProfileId],
      );
      await sql.run(em, 'analyze');
      const seedMs = performance.now() - seedStart;

      const rand = prng(41);
      const lon = () => DEMO_BBOX.west + rand() * (lines / ROWS) * (PER_LINE * STEP_DEG + 0.01);
      const lat = () => DEMO_BBOX.south + rand() * ROWS * 0.002;
      const out: BenchRow[] = [{ measure: `seed ${SPANS.toLocaleString('en')} spans (SQL, triggers)`, ms: ms(seedMs) }];

      // A fresh service each way: its first tile, as after a restart.
      const fresh = new SpanTileService(orm);
      const t0 = performance.now();
      const first = tileOf(lon(), lat(), 14);
      await fresh.tile(14, first.x, first.y);
      out.push({ measure: 'first tile after start, z14, PostGIS', ms: ms(performance.now() - t0) });
      const t1 = performance.now();
      await fresh.plainTile(14, first.x, first.y);
      out.push({ measure: 'first tile after start, z14, in memory (reads every span)', ms: ms(performance.now() - t1) });

      for (const z of [12, 14, 16]) {
        const viaPostgis: number[] = [];
        const inMemory: number[] = [];
        let bytes = 0;
        for (let i = 0; i < SAMPLES; i++) {
          const { x, y } = tileOf(lon(), lat(), z);
          const a = performance.now();
          const buf = await fresh.postgisTile(pair, z, x, y);
          viaPostgis.push(performance.now() - a);
          bytes += buf?.length ?? 0;
          const b = performance.now();
          await fresh.plainTile(z, x, y);
          inMemory.push(performance.now() - b);
        }
        out.push({ measure: `z${z} cold tile p50 / p95, PostGIS`, ms: `${ms(pct(viaPostgis, 50))} / ${ms(pct(viaPostgis, 95))}`, 'avg KB': +(bytes / SAMPLES / 1024).toFixed(1) });
        out.push({ measure: `z${z} cold tile p50 / p95, in memory`, ms: `${ms(pct(inMemory, 50))} / ${ms(pct(inMemory, 95))}` });
      }
      fresh.close();
      return out;
    } finally {
      await orm.close();
    }
  } finally {
    cluster.stop();
  }
}
