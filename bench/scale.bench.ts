// Scale bench: `npm run bench -- --spans N` builds a realistic invented network of N spans (and the smaller sizes
// 10 k / 100 k below it) with bulk prepared inserts, then measures each figure beside a baseline taken in the same
// run on the same data, and writes the table to bench/RESULTS.md. Runs only when asked for (`--spans` or "scale").
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import v8 from 'node:v8';
import vm from 'node:vm';
import type { AddressInfo } from 'node:net';
import { createApp } from '../server/app.ts';
import { testConfig } from '../server/env.ts';
import { DEMO_PASSWORD } from '../server/seeders/demo-users.ts';
import { seedScaleInventory } from '../server/seeders/scale-inventory.ts';
import { assessSpans, assessSpansBulk } from '../server/modules/assessment/assessment.service.ts';
import { SpanTileService } from '../server/modules/map/span-tiles.ts';
import { assessSpan, DEFAULT_DESIGN_WEATHER, DEFAULT_SCORING_SETTINGS } from '../shared/engineering/assessment.ts';
import { findConductor, thermalConductorOf } from '../shared/engineering/conductors.ts';
import { CLAMP_S, LIGHT_QUAD } from '../shared/engineering/demo-profiles.ts';
import type { BenchRow } from './run.ts';
import { concurrent, pct, tileOf } from './measure.ts';
import { fillAssessments, openBenchDatabase } from './bench-db.ts';
import { measureImport } from './import.bench.ts';
import { measureServerAlone } from './server-alone.ts';

const asked = Number(process.env.BENCH_SCALE_SPANS ?? 10_000);
/** Seconds a full rescore may run before it is stopped and its rate taken from what it did (a 1 M run stays under 30 min). */
const RESCORE_BUDGET_S = Number(process.env.BENCH_RESCORE_S ?? 150);
/** Seconds the list is read while a second rescore runs. */
const DURING_BUDGET_S = Number(process.env.BENCH_DURING_S ?? 30);
/** CSV rows imported into each size's inventory (0 leaves the import out). */
const IMPORT_ROWS = Number(process.env.BENCH_SCALE_IMPORT_ROWS ?? 100_000);
const SIZES = [...new Set([...[10_000, 100_000, 1_000_000].filter((n) => n < asked), asked])];
const f1 = (v: number) => (v >= 100 ? Math.round(v).toLocaleString('en-GB') : v.toFixed(1));
const mb = (b: number) => Math.round(b / 1048576);
v8.setFlagsFromString('--expose-gc');
const gc = vm.runInNewContext('gc') as () => void;
/** JS heap in use after a full collection: what a service keeps, apart from what the bench and seeding left behind in RSS. */
const heapAfterGc = () => {
  gc();
  return process.memoryUsage().heapUsed;
};



function pureRate(n: number) {
  const codes = ['Penguin', 'Partridge', 'Linnet', 'Hawk', 'Dove', 'Drake'];
  const t = performance.now();
  for (let i = 0; i < n; i++) {
    const typical = 200 + (i % 900);
    assessSpan(
      {
        conductor: thermalConductorOf(findConductor(codes[i % 6])!),
        clearanceM: 6 + (i % 14),
        loadCurrentA: { min: typical * 0.5, typical, peak: typical * 1.3 },
        voltageKv: 69,
        frequencyHz: 60,
        lengthM: 80 + (i % 600),
        hazards: [],
        completeness: { a: true },
        surveyAgeDays: i % 2000,
        zones: { inExclude: false, inCautionCount: 0 },
      },
      CLAMP_S,
      LIGHT_QUAD,
      DEFAULT_DESIGN_WEATHER,
      DEFAULT_SCORING_SETTINGS,
    );
  }
  return n / ((performance.now() - t) / 1000);
}

function initialJsGzipKB(): string {
  const html = path.resolve('dist/index.html');
  if (!fs.existsSync(html)) return 'no build (run npm run build)';
  const src = fs.readFileSync(html, 'utf8');
  const files = [...src.matchAll(/(?:src|href)="\/?(assets\/[^"]+\.js)"/g)].map((m) => m[1]);
  const total = files.reduce((sum, f) => sum + zlib.gzipSync(fs.readFileSync(path.resolve('dist', f))).length, 0);
  return `${Math.round(total / 1024)} KB`;
}

async function measure(spans: number): Promise<Record<string, string>> {
  const db = await openBenchDatabase('scale');
  const { orm } = db;
  const out: Record<string, string> = {};
  const load0 = os.loadavg()[0];
  const began = performance.now();
  try {
    const em = orm.em.fork();
    let t = performance.now();
    const seeded = await seedScaleInventory(orm.em.fork(), { spans, surveyorIds: [db.surveyorId] });
    out.seed = `${f1((performance.now() - t) / 1000)} s (${seeded.lines} lines, ${seeded.hazards} hazards)`;

    // Rescoring all spans × active pairs after a settings change: the bulk path (the background job's), beside the
    // per-span path on a sample of 2 000 spans and the pure function in one process.
    const conn0 = orm.em.fork().getConnection();
    const sample = (await conn0.execute<{ id: string }[]>('select id from spans order by id limit 2000')).map((r) => r.id);
    t = performance.now();
    await assessSpans(orm.em.fork(), sample);
    const plainS = (performance.now() - t) / 1000;
    const [{ n: samplePairs }] = await conn0.execute<{ n: number }[]>('select count(*) as n from assessments');
    t = performance.now();
    const rescoreStart = t;
    const assessed = await assessSpansBulk(orm.em.fork(), undefined, { clearBetweenBatches: true, shouldStop: () => performance.now() - rescoreStart > RESCORE_BUDGET_S * 1000 });
    const rescoreS = (performance.now() - t) / 1000;
    const perSpan = Number(samplePairs) / sample.length;
    const pairs = assessed * perSpan;
    const stopped = assessed < spans ? `; stopped at the ${RESCORE_BUDGET_S} s budget, the other spans keep no assessment` : '';
    out.rescore = `${f1(pairs / rescoreS)} span·pairs/s bulk (${assessed} spans × ${Math.round(perSpan)} pairs, ${f1(rescoreS)} s${stopped})`;
    out['rescore before'] = `${f1(Number(samplePairs) / plainS)} span·pairs/s per-span path (2 000-span sample)`;
    out['rescore baseline'] = `${f1(pureRate(20_000))} span·pairs/s pure`;
    // Spans the budget did not reach get a copied assessment: a server starting on spans without one rescores them
    // in the background, and the list and tile figures below would otherwise run beside that rescore.
    const template = await conn0.execute<{ span_id: string }[]>('select span_id from assessments order by span_id limit 1');
    const filled = template.length ? await fillAssessments(orm.em.fork(), template[0].span_id) : 0;
    if (filled) out.rescore += `; the ${f1(filled / perSpan)} spans it did not reach then copy an assessed span's rows, so no start-up rescore runs under the list and tile figures`;

    // List API: filtered, sorted, page of 50, 10 concurrent clients, beside the bare prepared query.
    const { app, close } = createApp({ orm, config: testConfig({ databasePath: db.file }) });
    const server = app.listen(0);
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const signIn = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json', origin: base }, body: JSON.stringify({ email: 'planner@roostline.test', password: DEMO_PASSWORD }) });
    const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0];
    const pages = [1, 2, 3, 5, 8, 13, 21, 34];
    const times = await concurrent(10, 200, (i) => fetch(`${base}/api/spans?status=approved&sort=-updatedAt&pageSize=50&page=${pages[i % pages.length]}`, { headers: { cookie } }).then((r) => r.json()));
    const conn = orm.em.fork().getConnection();
    const bare = await concurrent(10, 200, (i) => conn.execute("select s.id from spans s where s.status = ? order by s.updated_at desc limit 50 offset ?", ['approved', (pages[i % pages.length] - 1) * 50]));
    out['list (one process)'] = `p50 ${f1(pct(times, 50))} / p95 ${f1(pct(times, 95))} ms (bench and server in one process)`;
    out['list baseline'] = `p50 ${f1(pct(bare, 50))} / p95 ${f1(pct(bare, 95))} ms bare SQL`;
    out['RSS idle (one process)'] = `${mb(process.memoryUsage().rss)} MB (bench and server in one process: includes the bench's seeding)`;
    // Reads while a full rescore runs (one client, one page after another, until the rescore ends).
    let rescoring = true;
    const during: number[] = [];
    const duringStart = performance.now();
    const again = assessSpansBulk(orm.em.fork(), undefined, { clearBetweenBatches: true, shouldStop: () => performance.now() - duringStart > DURING_BUDGET_S * 1000 }).finally(() => (rescoring = false));
    while (rescoring) {
      const s0 = performance.now();
      await fetch(`${base}/api/spans?status=approved&sort=-updatedAt&pageSize=50&page=${pages[during.length % pages.length]}`, { headers: { cookie } }).then((r) => r.json());
      during.push(performance.now() - s0);
    }
    await again;
    out['list during rescore'] = `p50 ${f1(pct(during, 50))} / p95 ${f1(pct(during, 95))} ms (${during.length} pages answered in the rescore's first ${f1((performance.now() - duringStart) / 1000)} s)`;
    server.close();
    await close();

    // Tiles over the densest area. A fresh service is a restart: its first tiles come from their own box query
    // while the snapshot is read and the generalised layers are built in the background.
    const heapBefore = heapAfterGc();
    const service = new SpanTileService(orm);
    const [lon, lat] = seeded.densest;
    const started = performance.now();
    const f = tileOf(lon, lat, 11);
    await service.tile(11, f.x, f.y);
    out['first tile after restart'] = `${f1(performance.now() - started)} ms z11`;
    const f14 = tileOf(lon, lat, 14);
    t = performance.now();
    await service.tile(14, f14.x, f14.y);
    out['first tile after restart'] += `, then ${f1(performance.now() - t)} ms z14 (${service.stats.directTiles} from their own query)`;
    await service.layersReady();
    out['first tile after restart baseline'] = `${f1((performance.now() - started) / 1000)} s reading the snapshot and building the layers in the background (a first tile waited for the whole read before; tiles below z10 still do)`;
    const plainTiles = spans > 200_000 ? 3 : 10;
    for (const z of [6, 8, 11, 14]) {
      const c = tileOf(lon, lat, z);
      const list: { x: number; y: number }[] = [];
      for (let dx = -2; dx <= 2; dx++) for (let dy = -2; dy <= 2; dy++) list.push({ x: c.x + dx, y: c.y + dy });
      const cold: number[] = [];
      const warm: number[] = [];
      const plain: number[] = [];
      for (const tl of list) {
        const s = performance.now();
        await service.tile(z, tl.x, tl.y);
        cold.push(performance.now() - s);
      }
      for (const tl of list) {
        const s = performance.now();
        await service.tile(z, tl.x, tl.y);
        warm.push(performance.now() - s);
      }
      // Baseline: the plain path (every span looked at for the one tile), on the first tiles of the same list.
      for (const tl of list.slice(0, plainTiles)) {
        const s = performance.now();
        await service.plainTile(z, tl.x, tl.y);
        plain.push(performance.now() - s);
      }
      out[`tile z${z}`] = `cold p95 ${f1(pct(cold, 95))} / cached p95 ${f1(pct(warm, 95))} ms`;
      out[`tile z${z} baseline`] = `plain path p95 ${f1(pct(plain, 95))} ms (${plain.length} tiles)`;
    }
    out['RSS under tile load (one process)'] = `${mb(process.memoryUsage().rss)} MB (bench and server in one process: includes the bench's seeding); the tile service's own heap ${mb(heapAfterGc() - heapBefore)} MB (snapshot, grid, layers z6–z11, cached tiles)`;
    // A restart of a server that had these tiles cached: it keeps them in a file at its stop and serves them at the
    // next start while the database is unchanged (the "first tile after restart" above is a tile not kept).
    t = performance.now();
    service.close();
    const closeMs = performance.now() - t;
    const keptFile = `${db.file}.tiles`;
    const keptMb = fs.existsSync(keptFile) ? fs.statSync(keptFile).size / 1048576 : 0;
    const restarted = new SpanTileService(orm);
    const kept: string[] = [];
    for (const z of [11, 14, 8]) {
      const c = tileOf(lon, lat, z);
      t = performance.now();
      await restarted.tile(z, c.x, c.y);
      kept.push(`${f1(performance.now() - t)} ms z${z}`);
    }
    out['first tile after restart, kept'] = `${kept.join(', ')} (${restarted.stats.keptTiles} of 3 kept; the stop wrote ${keptMb.toFixed(1)} MB of tiles in ${f1(closeMs)} ms)`;
    restarted.close();
    // The server below starts cold, as on a first start.
    fs.rmSync(keptFile, { force: true });
    // The real server as its own process on this database: list latency and its own RSS, idle and under tile load.
    const alone = await measureServerAlone(db.file, seeded.densest, pages.map((p) => `/api/spans?status=approved&sort=-updatedAt&pageSize=50&page=${p}`));
    out['list (server alone)'] = `p50 ${f1(pct(alone.list, 50))} / p95 ${f1(pct(alone.list, 95))} ms (the server as its own process, 10 concurrent clients)`;
    out['server RSS idle'] = `${mb(alone.rssIdle)} MB (VmRSS of the server as its own process, after start-up, sign-in and the list run)`;
    out['server RSS under tile load'] = `peak ${mb(alone.rssTilePeak)} MB, ${mb(alone.rssTileEnd)} MB at the end (${alone.tiles} tiles z6–z14 over the densest area from a fresh start, 10 clients; tile p95 ${f1(pct(alone.tileMs, 95))} ms)`;
    // Import of a CSV of new spans into this inventory: streamed dry run and commit beside a raw prepared insert.
    if (IMPORT_ROWS > 0) {
      const im = await measureImport(orm, db.surveyorId, IMPORT_ROWS);
      const rate = (ms: number) => IMPORT_ROWS / (ms / 1000);
      const of = (ms: number) => `${Math.round((100 * rate(ms)) / rate(im.raw.ms))} % of raw`;
      out.import = `commit ${f1(rate(im.commit.ms))} rows/s (${of(im.commit.ms)}), heap peak +${Math.round(im.commit.heapPeakMb)} MB; dry run ${f1(rate(im.dry.ms))} rows/s (${of(im.dry.ms)}), heap peak +${Math.round(im.dry.heapPeakMb)} MB (${f1(IMPORT_ROWS)} rows, ${im.fileMb.toFixed(1)} MB)`;
      out['import baseline'] = `raw prepared insert ${f1(rate(im.raw.ms))} rows/s, heap peak +${Math.round(im.raw.heapPeakMb)} MB`;
    }
    out['load average (1 min)'] = `${load0.toFixed(1)} at the start, ${os.loadavg()[0].toFixed(1)} at the end of this size (2 cores; ${f1((performance.now() - began) / 60_000)} min for this size)`;
  } finally {
    await db.close();
  }
  return out;
}

export async function run(): Promise<BenchRow[]> {
  const results = new Map<number, Record<string, string>>();
  let rows: BenchRow[] = [];
  for (const n of SIZES) {
    console.log(`  building ${n.toLocaleString('en-GB')} spans…`);
    results.set(n, await measure(n));
    // The table so far is written after each size (a long run stopped early keeps what it measured).
    rows = writeTable(results);
  }
  return rows;
}

function writeTable(results: Map<number, Record<string, string>>): BenchRow[] {
  const sizes = SIZES.filter((n) => results.has(n));
  const keys = [...new Set([...results.values()].flatMap((r) => Object.keys(r)))];
  const rows: BenchRow[] = keys.map((k) => ({ figure: k, ...Object.fromEntries(sizes.map((n) => [`${n / 1000} k`, results.get(n)![k] ?? ''])) }));
  rows.push({ figure: 'initial JS gzip', ...Object.fromEntries(sizes.map((n) => [`${n / 1000} k`, initialJsGzipKB()])) });
  const header = `| figure | ${sizes.map((n) => `${n / 1000} k spans`).join(' | ')} |\n|---|${sizes.map(() => '---').join('|')}|\n`;
  const body = rows.map((r) => `| ${Object.values(r).join(' | ')} |`).join('\n');
  const note = `# Scale bench\n\n${new Date().toISOString().slice(0, 10)} · ${os.cpus().length} cores · load average ${os.loadavg()[0].toFixed(1)} at the end (the machine is shared with other work, so figures are loaded).\n\n`;
  // Other benches keep their sections below their own marker comment: those stay as they are.
  const file = path.resolve('bench/RESULTS.md');
  const before = fs.existsSync(file) ? fs.readFileSync(file, 'utf8') : '';
  const others = before.indexOf('<!-- ');
  const how = `\nRun with \`npm run bench -- --spans ${SIZES[SIZES.length - 1]}\`: each size seeded in full; a full rescore may run ${RESCORE_BUDGET_S} s (\`BENCH_RESCORE_S\`) and its rate is taken from what it did; "list during rescore" reads for the first ${DURING_BUDGET_S} s of a second rescore (\`BENCH_DURING_S\`); the import brings ${IMPORT_ROWS.toLocaleString('en-GB')} new CSV rows into each size's inventory (\`BENCH_SCALE_IMPORT_ROWS\`). Rows marked "one process" run the server inside the bench process, so their RSS includes the bench's own seeding and client; "server alone" rows start the real server (\`server/index.ts\`) as a child process on the same database and read its own VmRSS (from a cold start: the tiles kept by the bench's own tile service are removed first). "First tile after restart" is a tile no earlier run kept (its own box query); "kept" is the same tiles after a stop that kept them, the database unchanged.\n`;
  fs.writeFileSync(file, note + header + body + '\n' + how + (others >= 0 ? `\n${before.slice(others)}` : ''));
  return rows;
}
