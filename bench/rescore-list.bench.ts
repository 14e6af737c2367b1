// Rescoring and span-list bench (`npm run bench -- rescore-list`): a network of BENCH_RL_SPANS spans (default
// 20 000; the scale bench does the 100 k / 1 M runs), a full bulk rescore (wall time and process CPU time, since
// the machine is shared), then the list API under 10 concurrent clients — repeated pages, distinct pages, and
// pages while a full rescore runs — beside the bare prepared SQL for the same page.
import os from 'node:os';
import type { AddressInfo } from 'node:net';
import { createApp } from '../server/app.ts';
import { testConfig } from '../server/env.ts';
import { DEMO_PASSWORD } from '../server/seeders/demo-users.ts';
import { seedScaleInventory } from '../server/seeders/scale-inventory.ts';
import { assessSpans, assessSpansBulk } from '../server/modules/assessment/assessment.service.ts';
import type { BenchRow } from './run.ts';
import { concurrent } from './measure.ts';
import { openBenchDatabase } from './bench-db.ts';

const SPANS = Number(process.env.BENCH_RL_SPANS ?? 20_000);
const pct = (list: number[], p: number) => [...list].sort((a, b) => a - b)[Math.min(list.length - 1, Math.floor((p / 100) * list.length))] ?? 0;
const ms = (v: number) => (v >= 100 ? Math.round(v).toLocaleString('en-GB') : v.toFixed(1));
const rate = (v: number) => Math.round(v).toLocaleString('en-GB');

/** Latencies of `total` calls by `clients` concurrent callers; `cpuMs` is the process CPU time per call (server and client). */
async function timedWithCpu(clients: number, total: number, call: (i: number) => Promise<unknown>) {
  const c0 = process.cpuUsage();
  const times: number[] & { cpuMs?: number } = await concurrent(clients, total, call);
  const c = process.cpuUsage(c0);
  times.cpuMs = (c.user + c.system) / 1000 / total;
  return times;
}

export async function run(): Promise<BenchRow[]> {
  const db = await openBenchDatabase('rescore-list');
  const rows: BenchRow[] = [];
  const add = (figure: string, value: string, baseline = '') => rows.push({ figure, value, baseline });
  try {
    const { orm } = db;
    await seedScaleInventory(orm.em.fork(), { spans: SPANS, surveyorIds: [db.surveyorId] });
    const conn = orm.em.fork().getConnection();

    const sample = (await conn.execute<{ id: string }[]>('select id from spans order by id limit 1000')).map((r) => r.id);
    let t = performance.now();
    await assessSpans(orm.em.fork(), sample);
    const plainRate = (sample.length * 4) / ((performance.now() - t) / 1000);
    t = performance.now();
    const cpu0 = process.cpuUsage();
    const assessed = await assessSpansBulk(orm.em.fork(), undefined, { clearBetweenBatches: true });
    const cpu = process.cpuUsage(cpu0);
    const wall = (performance.now() - t) / 1000;
    const [{ pairs, bytes }] = await conn.execute<{ pairs: number; bytes: number }[]>('select count(*) as pairs, avg(length(result) + length(inputs)) as bytes from assessments');
    add(
      `rescore ${assessed.toLocaleString('en-GB')} spans × ${Math.round(Number(pairs) / assessed)} pairs`,
      `${rate(Number(pairs) / wall)} span·pairs/s (${ms(wall)} s); ${rate(Number(pairs) / ((cpu.user + cpu.system) / 1e6))} per CPU-second; ${Math.round(Number(bytes))} B of JSON per row`,
      `${rate(plainRate)} span·pairs/s per-span path (1 000-span sample)`,
    );

    const { app, close } = createApp({ orm, config: testConfig({ databasePath: db.file }) });
    const server = app.listen(0);
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const signIn = await fetch(`${base}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json', origin: base }, body: JSON.stringify({ email: 'planner@roostline.test', password: DEMO_PASSWORD }) });
    const cookie = (signIn.headers.get('set-cookie') ?? '').split(';')[0];
    const get = (q: string) => fetch(`${base}/api/spans?${q}`, { headers: { cookie } }).then((r) => r.json());
    const pages = [1, 2, 3, 5, 8, 13, 21, 34];
    const bare = await timedWithCpu(10, 200, (i) => conn.execute('select s.id from spans s where s.status = ? order by s.updated_at desc limit 50 offset ?', ['approved', (pages[i % pages.length] - 1) * 50]));
    const bareLine = `bare SQL p50 ${ms(pct(bare, 50))} / p95 ${ms(pct(bare, 95))} ms; ${ms(bare.cpuMs!)} ms CPU per query`;
    const same = await timedWithCpu(10, 200, (i) => get(`status=approved&sort=-updatedAt&pageSize=50&page=${pages[i % pages.length]}`));
    add('list, 10 clients, 8 pages asked 25 times each', `p50 ${ms(pct(same, 50))} / p95 ${ms(pct(same, 95))} ms; ${ms(same.cpuMs!)} ms CPU per request`, bareLine);
    const distinct = await timedWithCpu(10, 100, (i) => get(`status=approved&sort=-updatedAt&pageSize=50&page=${40 + i}`));
    add('list, 10 clients, 100 distinct pages', `p50 ${ms(pct(distinct, 50))} / p95 ${ms(pct(distinct, 95))} ms; ${ms(distinct.cpuMs!)} ms CPU per request`, bareLine);

    let rescoring = true;
    const during: number[] = [];
    const again = assessSpansBulk(orm.em.fork(), undefined, { clearBetweenBatches: true }).finally(() => (rescoring = false));
    while (rescoring) {
      const s0 = performance.now();
      await get(`status=approved&sort=-updatedAt&pageSize=50&page=${pages[during.length % pages.length]}`);
      during.push(performance.now() - s0);
    }
    await again;
    add('list during a full rescore (one client)', `p50 ${ms(pct(during, 50))} / p95 ${ms(pct(during, 95))} ms (${during.length} pages)`);
    server.close();
    await close();
  } finally {
    await db.close();
  }
  rows.push({ figure: 'machine', value: `${os.cpus().length} cores, load average ${os.loadavg()[0].toFixed(1)} at the end (shared: loaded figures)`, baseline: '' });
  return rows;
}
