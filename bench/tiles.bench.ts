// Span-tile latency at 100 000 spans on a temp SQLite file: the first tile (reads the spans into memory),
// further cold tiles per zoom, the same tiles again from the cache, and the data-version check.
// BENCH_SPANS sets the span count (default 100 000). Score and harvest values are synthetic (this measures tiles,
// not the assessment).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { initORM } from '../server/db.ts';
import { Line } from '../server/modules/inventory/line.entity.ts';
import { Structure } from '../server/modules/inventory/structure.entity.ts';
import { Span } from '../server/modules/inventory/span.entity.ts';
import { Assessment } from '../server/modules/assessment/assessment.entity.ts';
import { ensureAssessmentDefaults } from '../server/modules/assessment/profiles.service.ts';
import { defaultAssessmentPair } from '../server/modules/inventory/inventory.service.ts';
import { SpanTileService } from '../server/modules/map/span-tiles.ts';
import { DEMO_BBOX } from '../shared/demo-region.ts';
import type { BenchRow } from './run.ts';
import { prng } from '../shared/prng.ts';

const SPANS = Number(process.env.BENCH_SPANS ?? 100_000);
const SPANS_PER_LINE = 100;
const STEP_DEG = 0.0018; // ≈ 170–200 m

function tileOf(lon: number, lat: number, z: number) {
  const r = (lat * Math.PI) / 180;
  return { z, x: Math.floor(((lon + 180) / 360) * 2 ** z), y: Math.floor(((1 - Math.log(Math.tan(r) + 1 / Math.cos(r)) / Math.PI) / 2) * 2 ** z) };
}

const pct = (list: number[], p: number) => {
  const s = [...list].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))];
};
const ms = (v: number) => +v.toFixed(2);
/** CPU time of this process (all threads, incl. SQLite's), ms: steadier than wall time on a shared machine. */
const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

export async function run(): Promise<BenchRow[]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-tiles-bench-'));
  const orm = await initORM(path.join(dir, 'bench.sqlite'));
  const rows: BenchRow[] = [];
  try {
    const em = orm.em.fork();
    await ensureAssessmentDefaults(em);
    const pair = (await defaultAssessmentPair(em))!;
    const rand = prng(14);
    const now = new Date();
    const lines = Math.ceil(SPANS / SPANS_PER_LINE);
    const seedStart = performance.now();
    const statuses = ['draft', 'submitted', 'approved', 'returned', 'suspended'] as const;
    let made = 0;
    const pending = { lines: [] as object[], structures: [] as object[], spans: [] as object[], assessments: [] as object[] };
    const flush = async () => {
      await em.insertMany(Line, pending.lines as never[]);
      await em.insertMany(Structure, pending.structures as never[]);
      await em.insertMany(Span, pending.spans as never[]);
      await em.insertMany(Assessment, pending.assessments as never[]);
      pending.lines = [];
      pending.structures = [];
      pending.spans = [];
      pending.assessments = [];
    };
    for (let l = 0; l < lines; l++) {
      const lineId = `bl${l}`;
      const n = Math.min(SPANS_PER_LINE, SPANS - made);
      pending.lines.push({ id: lineId, name: `Bench ${l}`, owner: 'Harrow Vale Power Cooperative', voltageKv: 69, frequencyHz: 60, phases: 3, loadTypicalA: 400, loadMinA: 150, loadPeakA: 650, loadProfileA: null, version: 1, createdAt: now, updatedAt: now });
      let lon = DEMO_BBOX.west + rand() * (DEMO_BBOX.east - DEMO_BBOX.west);
      let lat = DEMO_BBOX.south + rand() * (DEMO_BBOX.north - DEMO_BBOX.south);
      let heading = rand() * Math.PI * 2;
      const structures = [];
      for (let i = 0; i <= n; i++) {
        structures.push({ id: `${lineId}s${i}`, lineId, lat, lon, kind: 'pole' as const, label: `B${l}-${i}`, attachmentHeightM: 14, version: 1, createdAt: now, updatedAt: now });
        heading += (rand() - 0.5) * 0.3;
        lon = Math.min(DEMO_BBOX.east, Math.max(DEMO_BBOX.west, lon + Math.cos(heading) * STEP_DEG));
        lat = Math.min(DEMO_BBOX.north, Math.max(DEMO_BBOX.south, lat + Math.sin(heading) * STEP_DEG * 0.86));
      }
      pending.structures.push(...structures);
      const spans = pending.spans;
      const assessments = pending.assessments;
      for (let i = 0; i < n; i++) {
        const id = `${lineId}p${i}`;
        spans.push({ id, lineId, fromStructureId: structures[i].id, toStructureId: structures[i + 1].id, status: statuses[(l + i) % 5], version: 1, lengthM: 190, conductorMaterial: 'ACSR' as const, conductorDiameterMm: 18.3, createdAt: now, updatedAt: now });
        assessments.push({ spanId: id, harvesterProfileId: pair.harvesterProfileId, droneProfileId: pair.droneProfileId, perchable: rand() > 0.3, score: rand() * 100, harvestW: rand() * 25, chargeTimeMin: 40, conductorTempC: 45, ampacityA: 600, result: {}, inputs: {}, methodVersion: 'bench', settingsVersion: 1, harvesterVersion: 1, droneVersion: 1, computedAt: now });
      }
      made += n;
      if (pending.spans.length >= 10_000) await flush();
    }
    await flush();
    rows.push({ step: `seed ${made} spans`, ms: ms(performance.now() - seedStart) });

    const service = new SpanTileService(orm);
    // The tiles over the region at each zoom a planner uses, in a fixed order.
    const zooms = [8, 10, 12, 14];
    const byZoom = new Map<number, { z: number; x: number; y: number }[]>();
    for (const z of zooms) {
      const a = tileOf(DEMO_BBOX.west, DEMO_BBOX.north, z);
      const b = tileOf(DEMO_BBOX.east, DEMO_BBOX.south, z);
      const list = [];
      for (let x = a.x; x <= b.x; x++) for (let y = a.y; y <= b.y; y++) list.push({ z, x, y });
      byZoom.set(z, list.filter((_, i) => i % Math.max(1, Math.floor(list.length / 40)) === 0).slice(0, 40));
    }

    const first = byZoom.get(12)![0];
    let t = performance.now();
    let c = cpuMs();
    await service.tile(first.z, first.x, first.y);
    rows.push({ step: 'first tile (reads every span into memory)', ms: ms(performance.now() - t), 'cpu ms': ms(cpuMs() - c), spans: made });

    for (const z of zooms) {
      const tiles = byZoom.get(z)!;
      const cold: number[] = [];
      const warm: number[] = [];
      let bytes = 0;
      c = cpuMs();
      for (const tile of tiles) {
        t = performance.now();
        const b = await service.tile(tile.z, tile.x, tile.y);
        cold.push(performance.now() - t);
        bytes = Math.max(bytes, b.length);
      }
      const coldCpu = (cpuMs() - c) / tiles.length;
      c = cpuMs();
      for (const tile of tiles) {
        t = performance.now();
        await service.tile(tile.z, tile.x, tile.y);
        warm.push(performance.now() - t);
      }
      const warmCpu = (cpuMs() - c) / tiles.length;
      rows.push({ step: `z${z} cold`, tiles: tiles.length, 'median ms': ms(pct(cold, 50)), 'p95 ms': ms(pct(cold, 95)), 'cpu ms': ms(coldCpu), 'largest KB': Math.round(bytes / 1024) });
      rows.push({ step: `z${z} cached`, tiles: tiles.length, 'median ms': ms(pct(warm, 50)), 'p95 ms': ms(pct(warm, 95)), 'cpu ms': ms(warmCpu) });
    }

    // One span edited (status and harvest): the change is patched in, then the tile is rebuilt.
    const edited = `bl0p0`;
    const conn0 = orm.em.fork().getConnection();
    await conn0.execute("update spans set status = 'approved', updated_at = ? where id = ?", [Date.now() + 1000, edited]);
    t = performance.now();
    c = cpuMs();
    await service.syncNow();
    await service.tile(first.z, first.x, first.y);
    rows.push({ step: 'one span edited: patch + next tile', ms: ms(performance.now() - t), 'cpu ms': ms(cpuMs() - c) });

    // Without patching (e.g. after a deletion), the next tile re-reads every span.
    service.invalidate();
    t = performance.now();
    c = cpuMs();
    await service.tile(first.z, first.x, first.y);
    rows.push({ step: 'first tile after an edit (re-read)', ms: ms(performance.now() - t), 'cpu ms': ms(cpuMs() - c) });

    const fpStart = performance.now();
    c = cpuMs();
    const conn = orm.em.fork().getConnection();
    await conn.execute(
      'select (select count(*) from spans) as sc, (select max(updated_at) from spans) as su, (select count(*) from structures) as tc, (select max(updated_at) from structures) as tu, (select count(*) from assessments) as ac, (select max(computed_at) from assessments) as au',
    );
    rows.push({ step: 'data-version check (background, every 2 s)', ms: ms(performance.now() - fpStart), 'cpu ms': ms(cpuMs() - c) });
    rows.push({ step: 'stats', builds: service.stats.builds, hits: service.stats.hits, 'snapshot loads': service.stats.snapshotLoads });
    service.close();
  } finally {
    await orm.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}
