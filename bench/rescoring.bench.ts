// Rescoring throughput: the pure assessment for many spans, and the full database path
// (spans read in batches, every active pair assessed, rows replaced with insertMany) on a temp SQLite file.
// BENCH_SPANS sets the span count (default 100 000); BENCH_PAIRS the harvester × drone pair counts to run (default "4": the
// two active demo harvesters × two demo drones; "1,4" adds a default-pair-only run).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { assessSpan, DEFAULT_DESIGN_WEATHER, DEFAULT_SCORING_SETTINGS, type SpanAssessmentInput } from '../shared/engineering/assessment.ts';
import { findConductor, thermalConductorOf } from '../shared/engineering/conductors.ts';
import { CLAMP_S, LIGHT_QUAD } from '../shared/engineering/demo-profiles.ts';
import { initORM } from '../server/db.ts';
import { Line } from '../server/modules/inventory/line.entity.ts';
import { Structure } from '../server/modules/inventory/structure.entity.ts';
import { Span } from '../server/modules/inventory/span.entity.ts';
import { Assessment } from '../server/modules/assessment/assessment.entity.ts';
import { DroneProfile, HarvesterProfile } from '../server/modules/assessment/profile.entity.ts';
import { ensureAssessmentDefaults } from '../server/modules/assessment/profiles.service.ts';
import { assessSpans } from '../server/modules/assessment/assessment.service.ts';
import type { BenchRow } from './run.ts';

const SPANS = Number(process.env.BENCH_SPANS ?? 100_000);
const PAIRS = (process.env.BENCH_PAIRS ?? '4').split(',').map(Number).filter((n) => n === 1 || n === 4);
const CODES = ['Penguin', 'Partridge', 'Linnet', 'Hawk', 'Dove', 'Drake'];
const mb = (bytes: number) => Math.round(bytes / 1048576);

function peakSampler() {
  let rss = process.memoryUsage().rss;
  let heap = process.memoryUsage().heapUsed;
  const timer = setInterval(() => {
    const m = process.memoryUsage();
    rss = Math.max(rss, m.rss);
    heap = Math.max(heap, m.heapUsed);
  }, 50);
  return () => {
    clearInterval(timer);
    return { rss, heap };
  };
}

function pureRun(): BenchRow {
  const stop = peakSampler();
  const started = performance.now();
  let perchable = 0;
  for (let i = 0; i < SPANS; i++) {
    const c = findConductor(CODES[i % CODES.length])!;
    const typical = 200 + (i % 900);
    const input: SpanAssessmentInput = {
      conductor: thermalConductorOf(c),
      clearanceM: 6 + (i % 14),
      loadCurrentA: { min: typical * 0.5, typical, peak: typical * 1.3 },
      voltageKv: 138,
      frequencyHz: 60,
      lengthM: 80 + (i % 600),
      hazards: i % 3 === 0 ? [{ severity: 'medium' }] : [],
      completeness: { a: true, b: i % 2 === 0 },
      surveyAgeDays: i % 2000,
      zones: { inExclude: i % 97 === 0, inCautionCount: i % 31 === 0 ? 1 : 0 },
    };
    if (assessSpan(input, CLAMP_S, LIGHT_QUAD, DEFAULT_DESIGN_WEATHER, DEFAULT_SCORING_SETTINGS).perchable) perchable++;
  }
  const s = (performance.now() - started) / 1000;
  const peak = stop();
  return { path: 'pure assessSpan (1 pair)', spans: SPANS, pairs: 1, seconds: +s.toFixed(2), 'spans/s': Math.round(SPANS / s), 'peak heap MB': mb(peak.heap), 'peak RSS MB': mb(peak.rss), perchable };
}

async function dbRun(): Promise<BenchRow[]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-bench-'));
  const file = path.join(dir, 'bench.sqlite');
  const orm = await initORM(file);
  const rows: BenchRow[] = [];
  try {
    const em = orm.em.fork();
    await ensureAssessmentDefaults(em);
    const now = new Date();
    await em.insertMany(Line, [
      { id: 'bench-line', name: 'Bench line', owner: 'Harrow Vale Power Cooperative', voltageKv: 138, frequencyHz: 60, phases: 3, loadTypicalA: 700, loadMinA: 350, loadPeakA: 900, loadProfileA: null, version: 1, createdAt: now, updatedAt: now },
    ]);
    const seedStart = performance.now();
    const CHUNK = 5000;
    for (let i = 0; i <= SPANS; i += CHUNK) {
      const structures = [];
      for (let k = i; k < Math.min(SPANS + 1, i + CHUNK); k++) {
        structures.push({ id: `st${k}`, lineId: 'bench-line', lat: -30.4 + (k % 400) * 0.001, lon: -130.6 + Math.floor(k / 400) * 0.002, kind: 'tower' as const, label: `B-${k}`, attachmentHeightM: 24, version: 1, createdAt: now, updatedAt: now });
      }
      await em.insertMany(Structure, structures);
    }
    for (let i = 0; i < SPANS; i += CHUNK) {
      const spans = [];
      for (let k = i; k < Math.min(SPANS, i + CHUNK); k++) {
        const c = findConductor(CODES[k % CODES.length])!;
        spans.push({
          id: `sp${String(k).padStart(7, '0')}`, lineId: 'bench-line', fromStructureId: `st${k}`, toStructureId: `st${k + 1}`, status: 'approved' as const, version: 1, lengthM: 80 + (k % 600),
          conductorCodeWord: c.codeWord, conductorSize: c.size, conductorMaterial: 'ACSR' as const, conductorDiameterMm: c.diameterMm,
          conductorResistanceLowOhmPerM: c.resistanceAc25OhmPerM, conductorTempLowC: 25, conductorResistanceHighOhmPerM: c.resistanceAc75OhmPerM, conductorTempHighC: 75,
          phasePosition: 'top', clearanceM: 6 + (k % 14), lowestClearanceM: 5, terrain: 'open-field' as const, loadCurrentA: 200 + (k % 900), surveyDate: '2026-06-01',
          surveyorId: null, returnReason: null, suspendReason: null, submittedAt: null, approvedAt: null, approvedById: null, createdAt: now, updatedAt: now,
        });
      }
      await em.insertMany(Span, spans);
    }
    const seedS = (performance.now() - seedStart) / 1000;
    rows.push({ path: 'seed spans + structures (insertMany)', spans: SPANS, pairs: 0, seconds: +seedS.toFixed(2), 'spans/s': Math.round(SPANS / seedS), 'peak heap MB': mb(process.memoryUsage().heapUsed), 'peak RSS MB': mb(process.memoryUsage().rss), perchable: '' });

    for (const pairs of PAIRS) {
      // 1 pair: only the default harvester and drone active; 4: the two demo harvesters × two demo drones.
      await em.nativeUpdate(HarvesterProfile, {}, { active: pairs === 4 });
      await em.nativeUpdate(HarvesterProfile, { id: 'clamp-s' }, { active: true });
      await em.nativeUpdate(HarvesterProfile, { id: 'clamp-s-open' }, { active: false });
      await em.nativeUpdate(DroneProfile, {}, { active: pairs === 4 });
      await em.nativeUpdate(DroneProfile, { id: 'light-quad' }, { active: true });
      const work = orm.em.fork();
      const stop = peakSampler();
      const started = performance.now();
      const n = await assessSpans(work, undefined, { clearBetweenBatches: true });
      const s = (performance.now() - started) / 1000;
      const peak = stop();
      const stored = await orm.em.fork().count(Assessment, {});
      const perchable = await orm.em.fork().count(Assessment, { perchable: true });
      rows.push({ path: `full DB rescore (${pairs} pair${pairs > 1 ? 's' : ''})`, spans: n, pairs, seconds: +s.toFixed(2), 'spans/s': Math.round(n / s), 'peak heap MB': mb(peak.heap), 'peak RSS MB': mb(peak.rss), perchable: `${perchable}/${stored} rows (${Math.round(stored / s)} rows/s)` });
    }
    rows.push({ path: 'database file', spans: SPANS, pairs: PAIRS[PAIRS.length - 1] ?? 0, seconds: 0, 'spans/s': 0, 'peak heap MB': 0, 'peak RSS MB': 0, perchable: `${mb(fs.statSync(file).size)} MB on disk` });
  } finally {
    await orm.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}

export async function run(): Promise<BenchRow[]> {
  const pure = pureRun();
  return [pure, ...(await dbRun())];
}
