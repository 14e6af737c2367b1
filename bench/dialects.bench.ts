// The list API and span tiles on PostgreSQL beside SQLite, on the same invented network (seedScaleInventory, the
// same seed) at 100 000 spans (BENCH_DIALECT_SPANS). Each database gets the same assessments: a sample of spans is
// assessed for real, and every other span takes a sample row's result with its score and harvest varied by its length
// (so tiles and sorts see a spread; this measures reading, not the assessment). PostgreSQL runs on a throwaway
// cluster (tests/postgres/cluster.ts: fsync and synchronous commit off, as for the tests); skipped with one line
// without the PostgreSQL binaries. Runs only when asked for: `npm run bench -- dialects`.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import pg from 'pg';
import { initORM } from '../server/db.ts';
import { createApp } from '../server/app.ts';
import { testConfig } from '../server/env.ts';
import { DEMO_PASSWORD } from '../server/seeders/demo-users.ts';
import { seedScaleAccounts } from '../server/seeders/index.ts';
import { seedScaleInventory } from '../server/seeders/scale-inventory.ts';
import { assessSpansBulk } from '../server/modules/assessment/assessment.service.ts';
import { SpanTileService } from '../server/modules/map/span-tiles.ts';
import { usesPostgis } from '../server/sql/postgis.ts';
import { sql } from '../server/sql/query.ts';
import { postgresBinDir, startCluster } from '../tests/postgres/cluster.ts';
import type { BenchRow } from './run.ts';
import { concurrent, pct, tileOf } from './measure.ts';
import { machineLine, writeResultsSection } from './results.ts';
import { fillAssessments } from './bench-db.ts';

type Orm = Awaited<ReturnType<typeof initORM>>;

const SPANS = Number(process.env.BENCH_DIALECT_SPANS ?? 100_000);
const SAMPLE = 500;
const ZOOMS = [8, 11, 14] as const;
const ms = (v: number) => +v.toFixed(1);



interface Figures {
  seed: string;
  list: string;
  bare: string;
  tiles: Record<number, { cold: number; cached: number }>;
  first: number;
  tilePath: string;
}

async function measure(orm: Orm, target: { databasePath?: string; databaseUrl?: string }): Promise<Figures> {
  const em = orm.em.fork();
  const surveyorId = await seedScaleAccounts(em);
  let t = performance.now();
  const seeded = await seedScaleInventory(orm.em.fork(), { spans: SPANS, surveyorIds: [surveyorId] });
  // Real assessments for a sample; every other span copies the first sample span's rows (score and harvest varied by length).
  const sample = (await sql.all<{ id: string }>(em, 'select id from spans order by id limit ?', [SAMPLE])).map((r) => r.id);
  await assessSpansBulk(orm.em.fork(), sample);
  await fillAssessments(em, sample[0]);
  await sql.run(em, 'analyze');
  const seed = `${(SPANS / 1000).toFixed(0)} k spans, ${seeded.lines} lines, ${((performance.now() - t) / 1000).toFixed(1)} s`;

  // The list API: filtered, sorted, page of 50, 10 concurrent clients; beside the bare query for the same page.
  const { app, close } = createApp({ orm, config: testConfig(target) });
  const server = app.listen(0);
  try {
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const signIn = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json', origin: base }, body: JSON.stringify({ email: 'planner@roostline.test', password: DEMO_PASSWORD }) });
    const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0];
    const pages = [1, 2, 3, 5, 8, 13, 21, 34];
    const list = await concurrent(10, 200, async (i) => {
      const res = await fetch(`${base}/api/spans?status=approved&sort=-updatedAt&pageSize=50&page=${pages[i % pages.length]}`, { headers: { cookie } });
      if (res.status !== 200) throw new Error(`list answered ${res.status}`);
      await res.json();
    });
    const bare = await concurrent(10, 200, (i) => sql.all(orm.em.fork(), 'select s.id from spans s where s.status = ? order by s.updated_at desc limit 50 offset ?', ['approved', (pages[i % pages.length] - 1) * 50]));

    // Tiles over the densest centre: a fresh service (a restart), its first tile, then 5 × 5 tiles per zoom cold and again cached.
    const service = new SpanTileService(orm);
    try {
      const [lon, lat] = seeded.densest;
      t = performance.now();
      const c11 = tileOf(lon, lat, 11);
      await service.tile(11, c11.x, c11.y);
      const first = performance.now() - t;
      await service.layersReady();
      const tiles: Figures['tiles'] = {};
      for (const z of ZOOMS) {
        const c = tileOf(lon, lat, z);
        const cells: { x: number; y: number }[] = [];
        for (let dx = -2; dx <= 2; dx++) for (let dy = -2; dy <= 2; dy++) cells.push({ x: c.x + dx, y: c.y + dy });
        const cold: number[] = [];
        const cached: number[] = [];
        for (const cell of cells) {
          const a = performance.now();
          await service.tile(z, cell.x, cell.y);
          cold.push(performance.now() - a);
        }
        for (const cell of cells) {
          const a = performance.now();
          await service.tile(z, cell.x, cell.y);
          cached.push(performance.now() - a);
        }
        tiles[z] = { cold: pct(cold, 95), cached: pct(cached, 95) };
      }
      const tilePath = (await usesPostgis(em)) ? 'z14 from PostGIS (ST_AsMVT), z8/z11 from the generalised layers' : 'all from the in-memory layers and grid';
      return {
        seed,
        list: `p50 ${ms(pct(list, 50))} / p95 ${ms(pct(list, 95))} ms`,
        bare: `p50 ${ms(pct(bare, 50))} / p95 ${ms(pct(bare, 95))} ms`,
        tiles,
        first,
        tilePath,
      };
    } finally {
      service.close();
    }
  } finally {
    server.close();
    await close();
  }
}

export async function run(): Promise<BenchRow[]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-dialects-'));
  const file = path.join(dir, 'bench.sqlite');
  let sqlite: Figures;
  {
    const orm = await initORM(file);
    try {
      sqlite = await measure(orm, { databasePath: file });
    } finally {
      await orm.close();
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }
  let postgres: Figures | null = null;
  const bin = postgresBinDir();
  if (!bin) console.log('  PostgreSQL column skipped: no PostgreSQL binaries (apt-get install -y postgresql-15 postgresql-15-postgis-3)');
  else {
    const cluster = await startCluster(bin);
    try {
      const admin = new pg.Client({ connectionString: cluster.url });
      await admin.connect();
      await admin.query('create database bench');
      await admin.end();
      const url = cluster.url.replace(/\/postgres$/, '/bench');
      const orm = await initORM(url);
      try {
        postgres = await measure(orm, { databaseUrl: url });
      } finally {
        await orm.close();
      }
    } finally {
      cluster.stop();
    }
  }
  const row = (measure: string, pick: (f: Figures) => string | number): BenchRow => ({ measure, SQLite: pick(sqlite), PostgreSQL: postgres ? pick(postgres) : 'skipped' });
  const rows = [
    row('seed', (f) => f.seed),
    row('list API p50 / p95 (10 clients, page of 50 with total)', (f) => f.list),
    row('bare SQL for the same page p50 / p95', (f) => f.bare),
    row('first tile after start, z11 (ms)', (f) => ms(f.first)),
    ...ZOOMS.flatMap((z) => [row(`tile z${z} cold p95 (ms)`, (f) => ms(f.tiles[z].cold)), row(`tile z${z} cached p95 (ms)`, (f) => ms(f.tiles[z].cached))]),
    row('tile path', (f) => f.tilePath),
  ];
  writeResultsSection(
    'dialects',
    `# SQLite and PostgreSQL side by side\n\n${machineLine()} ` +
      '`npm run bench -- dialects` (`BENCH_DIALECT_SPANS`): the same invented network in each database; PostgreSQL on a throwaway local cluster with fsync and synchronous commit off.\n\n| figure | SQLite | PostgreSQL |\n|---|---|---|\n' +
      rows.map((r) => `| ${r.measure} | ${r.SQLite} | ${r.PostgreSQL} |`).join('\n'),
  );
  return rows;
}
