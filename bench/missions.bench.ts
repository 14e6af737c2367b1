// Missions bench: `npm run bench -- missions` builds an invented network of BENCH_MISSION_SPANS approved spans
// (default 100 000) with the scale seeder, marks them perchable for the demo pair (the planner reads the stored
// assessments; rescoring has its own bench), then plans 60 km missions between random points and reports planning
// time (p50 / p95, goal p95 ≤ 2 s) and memory. Writes its section of bench/RESULTS.md.
import { seedScaleInventory } from '../server/seeders/scale-inventory.ts';
import { planContext, planMission } from '../server/modules/missions/plan.service.ts';
import { METHOD_VERSION } from '../shared/engineering/assessment.ts';
import { CLAMP_S, LIGHT_QUAD } from '../shared/engineering/demo-profiles.ts';
import { impliedCurrentA } from '../shared/engineering/implied-current.ts';
import { prng } from '../shared/prng.ts';
import type { BenchRow } from './run.ts';
import { machineLine, writeResultsSection } from './results.ts';
import { openBenchDatabase } from './bench-db.ts';

const SPANS = Number(process.env.BENCH_MISSION_SPANS ?? 100_000);
const MISSIONS = Number(process.env.BENCH_MISSIONS ?? 30);
const DISTANCE_M = 60_000;
const pct = (list: number[], p: number) => [...list].sort((a, b) => a - b)[Math.min(list.length - 1, Math.floor((p / 100) * list.length))]!;
const f1 = (v: number) => (v >= 100 ? Math.round(v).toLocaleString('en-GB') : v.toFixed(1));
const mb = (b: number) => Math.round(b / 1048576);

/** The point `m` metres from (lat, lon) on a bearing (spherical; the geodesic leg is measured by the planner itself). */
function offset(lat: number, lon: number, m: number, bearingDeg: number) {
  const R = 6_371_008.8;
  const d = m / R;
  const b = (bearingDeg * Math.PI) / 180;
  const p1 = (lat * Math.PI) / 180;
  const l1 = (lon * Math.PI) / 180;
  const p2 = Math.asin(Math.sin(p1) * Math.cos(d) + Math.cos(p1) * Math.sin(d) * Math.cos(b));
  const l2 = l1 + Math.atan2(Math.sin(b) * Math.sin(d) * Math.cos(p1), Math.cos(d) - Math.sin(p1) * Math.sin(p2));
  return { lat: (p2 * 180) / Math.PI, lon: (l2 * 180) / Math.PI };
}

export async function run(): Promise<BenchRow[]> {
  const db = await openBenchDatabase('missions');
  const { orm } = db;
  const out: Record<string, string> = {};
  try {
    console.log(`  building ${SPANS.toLocaleString('en-GB')} spans…`);
    let t = performance.now();
    const seeded = await seedScaleInventory(orm.em.fork(), { spans: SPANS, surveyorIds: [db.surveyorId] });
    const conn = orm.em.fork().getConnection();
    await conn.execute("update spans set status = 'approved'");
    // One row per span for the demo pair, as a rescore would leave it on the useful-harvest gate alone: perchable when
    // the span's typical current gives the harvester its useful minimum (harvest rises with current, so one threshold
    // current per frequency; the other gates are the assessment's and have their own bench).
    const [{ n: lines60 }] = (await conn.execute('select count(*) as n from lines where frequency_hz = 60')) as { n: number }[];
    const threshold = (f: number) => impliedCurrentA(CLAMP_S, f, CLAMP_S.usefulMinHarvestW / CLAMP_S.converterEfficiency);
    await conn.execute(
      'insert into assessments (span_id, harvester_profile_id, drone_profile_id, perchable, score, harvest_w, charge_time_min, conductor_temp_c, ampacity_a, result, inputs, method_version, settings_version, harvester_version, drone_version, computed_at) ' +
        "select s.id, ?, ?, case when coalesce(s.load_current_a, l.load_typical_a) >= (case when l.frequency_hz = 60 then ? else ? end) then 1 else 0 end, 70, 60, 60, 40, 900, '{\"gates\":[]}', '{}', ?, 1, 1, 1, ? from spans s join lines l on l.id = s.line_id",
      [CLAMP_S.id, LIGHT_QUAD.id, threshold(60), threshold(50), METHOD_VERSION, new Date().toISOString()],
    );
    const [{ n: perchable }] = (await conn.execute('select count(*) as n from assessments where perchable = 1')) as { n: number }[];
    console.log(`  seeded in ${f1((performance.now() - t) / 1000)} s`);
    out.seed = `${f1((performance.now() - t) / 1000)} s (${seeded.spans.toLocaleString('en-GB')} approved spans on ${seeded.lines} lines (${lines60} at 60 Hz), ${Number(perchable).toLocaleString('en-GB')} perchable for the demo pair, region ${f1((seeded.bbox.east - seeded.bbox.west) * 96)} × ${f1((seeded.bbox.north - seeded.bbox.south) * 111)} km)`;

    const rand = prng(7);
    const times: number[] = [];
    const considered: number[] = [];
    const searched: number[] = [];
    let feasible = 0;
    let perches = 0;
    let peakRss = process.memoryUsage().rss;
    const [clon, clat] = seeded.densest;
    for (let i = 0; i < MISSIONS; i++) {
      // Base within 15 km of the densest centre, the job site 60 km away on a random bearing, mild random wind.
      const base = offset(clat, clon, rand() * 15_000, rand() * 360);
      const target = offset(base.lat, base.lon, DISTANCE_M, rand() * 360);
      const req = {
        droneProfileId: LIGHT_QUAD.id,
        harvesterProfileId: CLAMP_S.id,
        base,
        target,
        departAt: '2026-06-01T08:00:00+00:00',
        wind: { speedMps: Math.round(rand() * 6), fromDeg: Math.round(rand() * 359) },
        returnToBase: false,
        objective: 'time' as const,
      };
      const fork = orm.em.fork();
      t = performance.now();
      const ctx = await planContext(fork, req);
      const { result } = await planMission(fork, req, ctx);
      times.push(performance.now() - t);
      if (process.env.BENCH_VERBOSE) console.log(`  mission ${i + 1}: ${f1(times[times.length - 1]!)} ms, ${String(result.perchesNearRoute)} near, ${String(result.perchesConsidered)} searched, feasible ${String(result.feasible)} ${String(result.reason ?? '')}`);
      considered.push(Number(result.perchesNearRoute ?? 0));
      searched.push(Number(result.perchesConsidered ?? 0));
      if (result.feasible) {
        feasible++;
        perches += (result.perches as unknown[]).length;
      }
      peakRss = Math.max(peakRss, process.memoryUsage().rss);
    }
    out[`plan 60 km (${MISSIONS} missions)`] = `p50 ${f1(pct(times, 50))} / p95 ${f1(pct(times, 95))} / max ${f1(Math.max(...times))} ms (goal p95 ≤ 2 000 ms)`;
    out['routes found'] = `${feasible} of ${MISSIONS} (${feasible ? f1(perches / feasible) : '—'} perches on average)`;
    out['perches near the route'] = `median ${f1(pct(considered, 50))} approved perchable spans in the search box, ${f1(pct(searched, 50))} searched after thinning`;
    out['RSS peak'] = `${mb(peakRss)} MB (bench and planner in one process)`;
  } finally {
    await db.close();
  }
  const rows: BenchRow[] = Object.entries(out).map(([figure, value]) => ({ figure, value }));
  writeResultsSection(
    'missions',
    `# Missions bench\n\n${machineLine()} ` +
      '`npm run bench -- missions` (`BENCH_MISSION_SPANS`, `BENCH_MISSIONS`).\n\n| figure | value |\n|---|---|\n' +
      rows.map((r) => `| ${r.figure} | ${r.value} |`).join('\n'),
  );
  return rows;
}
