// Import bench: `npm run bench -- import` (BENCH_IMPORT_ROWS, default 100 000). A generated CSV of span rows is
// dry-run and committed through the streamed import (the job's own functions), beside a raw prepared insert of the
// same rows (csv-parse's stream into a table of the file's columns, multi-row bound statements, one transaction).
// Memory: the heap's peak above its start while each step runs, sampled every 50 ms.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parse } from 'csv-parse';
import type { MikroORM } from '@mikro-orm/sqlite';
import type { BenchRow } from './run.ts';
import { openBenchDatabase } from './bench-db.ts';
import { User } from '../server/modules/auth/user.entity.ts';
import { applyPlanInParts, planCsvStream } from '../server/modules/import-export/import-stream.ts';
import { bulkInsert } from '../server/sql/bulk.ts';
import { sql } from '../server/sql/query.ts';

const HEADER = ['line_name', 'line_owner', 'voltage_kv', 'frequency_hz', 'phases', 'load_typical_a', 'load_min_a', 'load_peak_a', 'from_label', 'from_lat', 'from_lon', 'from_kind', 'from_attachment_height_m', 'to_label', 'to_lat', 'to_lon', 'to_kind', 'to_attachment_height_m', 'conductor_code_word', 'clearance_m', 'lowest_clearance_m', 'terrain', 'survey_date', 'hazards'];

/** Lines of 1 000 spans, each a chain of structures about 45 m apart, inside the invented demo region. */
function writeFile(file: string, rows: number) {
  const out = fs.openSync(file, 'w');
  let buf = HEADER.join(',') + '\n';
  for (let i = 0; i < rows; i++) {
    const line = Math.floor(i / 1000);
    const k = i % 1000;
    const lat = -30 - line * 0.01;
    const lon = -131 + k * 0.0005;
    buf += [`Bench feeder ${line}`, 'Harrow Vale Power Cooperative', '12.47', '60', '3', '180', '60', '260', `BF${line}-${k}`, lat, lon, 'pole', '11', `BF${line}-${k + 1}`, lat, lon + 0.0005, 'pole', '11', 'Penguin', '7.9', '7.5', 'open-field', '2026-10-02', ''].join(',') + '\n';
    if (buf.length > 1 << 20) {
      fs.writeSync(out, buf);
      buf = '';
    }
  }
  fs.writeSync(out, buf);
  fs.closeSync(out);
}

async function measured<T>(work: () => Promise<T>): Promise<{ value: T; ms: number; heapPeakMb: number }> {
  (globalThis as { gc?: () => void }).gc?.();
  const base = process.memoryUsage().heapUsed;
  let peak = base;
  const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage().heapUsed)), 50);
  const started = performance.now();
  try {
    const value = await work();
    peak = Math.max(peak, process.memoryUsage().heapUsed);
    return { value, ms: performance.now() - started, heapPeakMb: (peak - base) / 1024 / 1024 };
  } finally {
    clearInterval(timer);
  }
}

export interface ImportFigures {
  rows: number;
  fileMb: number;
  raw: { ms: number; heapPeakMb: number };
  dry: { ms: number; heapPeakMb: number };
  commit: { ms: number; heapPeakMb: number; parts: number };
}

/**
 * Times a generated CSV of `rows` new spans: the raw prepared insert of the file's cells (baseline), the streamed dry
 * run and the streamed commit, into the given database (an empty one, or a seeded inventory for the scale bench).
 * Checks the dry run planned every row and the commit stored every span.
 */
export async function measureImport(orm: MikroORM, surveyorId: string, rows: number): Promise<ImportFigures> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-import-bench-'));
  const file = path.join(dir, 'inventory.csv');
  try {
    writeFile(file, rows);
    const em = orm.em.fork();
    const user = await em.findOneOrFail(User, { id: surveyorId });
    const [{ n: before }] = await sql.all<{ n: number }>(em, 'select count(*) as n from spans');

    // Baseline: the same rows read by csv-parse's stream and inserted raw (prepared, bound) in one transaction.
    await sql.run(em, `create table bench_raw_rows (${HEADER.map((h) => `"${h}" text`).join(', ')})`);
    const raw = await measured(async () => {
      const cells: unknown[][] = [];
      for await (const r of fs.createReadStream(file).pipe(parse({ from_line: 2 })) as AsyncIterable<string[]>) cells.push(r);
      await bulkInsert(em, 'bench_raw_rows', HEADER, cells);
    });
    await sql.run(em, 'drop table bench_raw_rows');

    const dry = await measured(() => planCsvStream(orm.em.fork(), fs.createReadStream(file)));
    if (dry.value.report.summary.create !== rows) throw new Error(`dry run planned ${dry.value.report.summary.create} creates of ${rows}`);
    const commit = await measured(async () => {
      const cem = orm.em.fork();
      const planned = await planCsvStream(cem, fs.createReadStream(file));
      return applyPlanInParts(cem, user, planned.plan);
    });
    const [{ n }] = await sql.all<{ n: number }>(orm.em.fork(), 'select count(*) as n from spans');
    if (Number(n) - Number(before) !== rows) throw new Error(`commit stored ${Number(n) - Number(before)} spans of ${rows}`);
    return {
      rows,
      fileMb: fs.statSync(file).size / 1024 / 1024,
      raw: { ms: raw.ms, heapPeakMb: raw.heapPeakMb },
      dry: { ms: dry.ms, heapPeakMb: dry.heapPeakMb },
      commit: { ms: commit.ms, heapPeakMb: commit.heapPeakMb, parts: commit.value.parts },
    };
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

export async function run(): Promise<BenchRow[]> {
  const rows = Number(process.env.BENCH_IMPORT_ROWS ?? 100_000);
  const db = await openBenchDatabase('import');
  try {
    const f = await measureImport(db.orm, db.surveyorId, rows);
    const rate = (ms: number) => Math.round(rows / (ms / 1000));
    const base = rate(f.raw.ms);
    const fileMb = Number(f.fileMb.toFixed(1));
    const row = (step: string, s: { ms: number; heapPeakMb: number }) => ({ step, rows, fileMb, seconds: Number((s.ms / 1000).toFixed(1)), rowsPerS: rate(s.ms), ofRaw: `${Math.round((100 * rate(s.ms)) / base)} %`, heapPeakMb: Math.round(s.heapPeakMb) });
    console.log(`  ${os.cpus().length} cores, load ${os.loadavg().map((l) => l.toFixed(1)).join(' / ')}; goal: import ≥ 25 % of the raw insert rate`);
    return [row('raw prepared insert (baseline)', f.raw), row('import dry run (streamed)', f.dry), row(`import commit (streamed, ${f.commit.parts} parts)`, f.commit)];
  } finally {
    await db.close();
  }
}
