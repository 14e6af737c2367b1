// Load evidence on a temp SQLite file: importing one year of 15-minute readings for one line (35 040 rows, dry run and
// commit, beside parsing the same CSV with no checks), and the line-page queries over 500 such lines (≈ 17.5 M readings).
// BENCH_EVIDENCE_LINES sets the line count (default 500).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import Papa from 'papaparse';
import { initORM } from '../server/db.ts';
import { Line } from '../server/modules/inventory/line.entity.ts';
import { User } from '../server/modules/auth/user.entity.ts';
import { LoadSeries, LoadSeriesDay } from '../server/modules/evidence/load-series.entity.ts';
import { packReadings, type Reading } from '../server/modules/evidence/load-series.parse.ts';
import { importLoadSeries, loadEvidence, loadProfile, seriesProfiles } from '../server/modules/evidence/load-series.service.ts';
import { ensureAssessmentDefaults } from '../server/modules/assessment/profiles.service.ts';
import { prng } from '../shared/prng.ts';
import type { BenchRow } from './run.ts';

const LINES = Number(process.env.BENCH_EVIDENCE_LINES ?? 500);
const OFFSET_MIN = -9 * 60;
const START_S = Date.UTC(2026, 0, 1) / 1000 - OFFSET_MIN * 60;

const pct = (list: number[], p: number) => [...list].sort((a, b) => a - b)[Math.min(list.length - 1, Math.floor((p / 100) * list.length))];
const ms = (v: number) => +v.toFixed(1);

function yearCsv(rnd: () => number): string {
  const out = ['timestamp,current_a'];
  for (let i = 0; i < 365 * 96; i++) {
    const local = new Date((START_S + i * 900 + OFFSET_MIN * 60) * 1000).toISOString().slice(0, 19);
    out.push(`${local}-09:00,${(500 + 200 * Math.sin((i % 96) / 15) + 40 * rnd()).toFixed(1)}`);
  }
  return out.join('\n') + '\n';
}

export async function run(): Promise<BenchRow[]> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-evidence-bench-'));
  const orm = await initORM(path.join(dir, 'bench.sqlite'));
  const rows: BenchRow[] = [];
  try {
    const em = orm.em.fork();
    await ensureAssessmentDefaults(em);
    const user = em.create(User, { id: 'bench-admin', email: 'bench@roostline.test', name: 'Bench', passwordHash: 'x', roles: ['admin'], active: true, createdAt: new Date(), updatedAt: new Date() } as never);
    const now = new Date();
    const lines = Array.from({ length: LINES }, (_, i) => ({ id: `bl-${i}`, name: `Bench line ${i}`, owner: 'Bench', voltageKv: 69, frequencyHz: 60, phases: 3, loadTypicalA: 500, loadMinA: 300, loadPeakA: 700, loadProfileA: null, version: 1, createdAt: now, updatedAt: now }));
    await em.insertMany(Line, lines);
    await em.flush();
    void user;

    // One line's year through the import path, beside a bare parse of the same text.
    const csv = yearCsv(prng(18));
    let t = performance.now();
    let n = 0;
    Papa.parse<string[]>(csv, { step: () => void n++ });
    const bare = performance.now() - t;
    t = performance.now();
    const dry = await importLoadSeries(orm.em.fork(), user as User, 'bl-0', Readable.from([csv]), 'dry-run');
    const dryMs = performance.now() - t;
    t = performance.now();
    await importLoadSeries(orm.em.fork(), user as User, 'bl-0', Readable.from([csv]), 'commit');
    const commitMs = performance.now() - t;
    const rowsPerS = (msv: number) => Math.round((dry.rows / msv) * 1000);
    rows.push({ figure: `import ${dry.rows} rows, dry run`, value: `${ms(dryMs)} ms (${rowsPerS(dryMs).toLocaleString('en-US')} rows/s)`, baseline: `bare CSV parse ${ms(bare)} ms (${rowsPerS(bare).toLocaleString('en-US')} rows/s)` });
    rows.push({ figure: `import ${dry.rows} rows, commit`, value: `${ms(commitMs)} ms (${rowsPerS(commitMs).toLocaleString('en-US')} rows/s)`, baseline: `bare CSV parse ${ms(bare)} ms` });

    // The other lines get their year written straight as packed days (the stored form the import produces).
    t = performance.now();
    const rnd = prng(500);
    for (let l = 1; l < LINES; l++) {
      const days: { lineId: string; day: string; readingCount: number; readings: Buffer }[] = [];
      for (let d = 0; d < 365; d++) {
        const list: Reading[] = [];
        for (let q = 0; q < 96; q++) list.push({ epochS: START_S + d * 86_400 + q * 900, offsetMin: OFFSET_MIN, currentA: 400 + 300 * rnd() });
        days.push({ lineId: `bl-${l}`, day: new Date((START_S + d * 86_400 + OFFSET_MIN * 60) * 1000).toISOString().slice(0, 10), readingCount: 96, readings: packReadings(list) });
      }
      const wem = orm.em.fork();
      await wem.transactional(async (tx) => {
        for (let i = 0; i < days.length; i += 400) await tx.insertMany(LoadSeriesDay, days.slice(i, i + 400));
        tx.create(LoadSeries, { lineId: `bl-${l}`, firstAt: '2026-01-01T00:00:00-09:00', lastAt: '2026-12-31T23:45:00-09:00', readingCount: 35_040, dayCount: 365, importedById: 'bench-admin', importedAt: now });
      });
    }
    const buildS = (performance.now() - t) / 1000;
    const sizeMb = fs.statSync(path.join(dir, 'bench.sqlite')).size / 1024 / 1024 + (fs.existsSync(path.join(dir, 'bench.sqlite-wal')) ? fs.statSync(path.join(dir, 'bench.sqlite-wal')).size / 1024 / 1024 : 0);
    rows.push({ figure: `${LINES} lines × 35 040 readings stored`, value: `${(LINES * 35_040).toLocaleString('en-US')} readings, ${sizeMb.toFixed(0)} MB on disk`, baseline: `12 bytes a reading = ${((LINES * 35_040 * 12) / 1024 / 1024).toFixed(0)} MB packed; written in ${buildS.toFixed(1)} s` });

    const profileMs: number[] = [];
    const pageMs: number[] = [];
    const pick = prng(7);
    for (let i = 0; i < 60; i++) {
      const id = `bl-${Math.floor(pick() * LINES)}`;
      const month = `2026-${String(1 + Math.floor(pick() * 12)).padStart(2, '0')}`;
      let s = performance.now();
      await loadProfile(orm.em.fork(), id, month);
      profileMs.push(performance.now() - s);
      if (i < 20) {
        s = performance.now();
        await loadEvidence(orm.em.fork(), id, month);
        pageMs.push(performance.now() - s);
      }
    }
    rows.push({ figure: 'month profile of one line (GET load-profile)', value: `p50 ${ms(pct(profileMs, 50))} ms, p95 ${ms(pct(profileMs, 95))} ms`, baseline: `over ${LINES} lines` });
    rows.push({ figure: 'line page (GET load-evidence: 12 months × 24 h, peaks, harvest bands)', value: `p50 ${ms(pct(pageMs, 50))} ms, p95 ${ms(pct(pageMs, 95))} ms`, baseline: `over ${LINES} lines` });
    t = performance.now();
    await seriesProfiles(orm.em.fork(), lines.map((l) => l.id), '2026-07');
    rows.push({ figure: `one month's profiles of all ${LINES} lines`, value: `${ms(performance.now() - t)} ms`, baseline: 'what an assessment or plan of every line reads' });
    rows.push({ figure: 'process RSS', value: `${Math.round(process.memoryUsage().rss / 1024 / 1024)} MB`, baseline: '' });
  } finally {
    await orm.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
  return rows;
}
