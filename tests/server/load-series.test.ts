// Load series: a line's metered currents imported (dry run / all-or-nothing commit) and the monthly profile they yield.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { quantile } from 'd3-array';
import { makeTestApp, type TestApp, type Client } from './helpers.ts';
import { makeLine, makeSpan } from './assessment-helpers.ts';
import { LoadSeriesDay } from '../../server/modules/evidence/load-series.entity.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';
import { harvest } from '../../shared/engineering/ct-harvester.ts';

let t: TestApp;
let admin: Client;
let safety: Client;

beforeAll(async () => {
  t = await makeTestApp();
  admin = await t.as('admin');
  safety = await t.as('safety');
});
afterAll(() => t.close());

/** 15-minute readings for `days` days from 2026-03-01 at +12:00, current = 400 + 10·hour (+ a small ripple). */
function series(days = 3, from = '2026-03-01T00:00:00+12:00') {
  const start = Date.parse(from);
  const lines = ['timestamp,current_a'];
  for (let i = 0; i < days * 96; i++) {
    const at = new Date(start + i * 900_000 + 12 * 3_600_000);
    const hour = at.getUTCHours();
    lines.push(`${at.toISOString().slice(0, 19)}+12:00,${(400 + 10 * hour + (i % 4)).toFixed(1)}`);
  }
  return lines.join('\n') + '\n';
}

const post = (c: Client, lineId: string, body: string, mode: 'dry-run' | 'commit', extra = '') =>
  c.agent
    .post(`/api/lines/${lineId}/load-series?mode=${mode}${extra}`)
    .set('Host', 'roostline.test:3000')
    .set('Origin', 'http://roostline.test:3000')
    .set('Content-Type', 'text/csv')
    .send(body);

describe('load series import', () => {
  it('when a clean file is dry-run, then every row is accepted and nothing is stored', async () => {
    const line = await makeLine(t.orm);
    const res = await post(admin, line.id, series(2), 'dry-run');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ rows: 192, accepted: 192, problems: [], committed: false, intervalS: 900, days: 2 });
    expect(await t.orm.em.fork().count(LoadSeriesDay, { lineId: line.id })).toBe(0);
  });

  it('when each kind of bad row is present, then each is reported by its row and a commit stores nothing', async () => {
    const line = await makeLine(t.orm);
    const body = [
      'timestamp,current_a',
      '2026-03-01T00:00:00+12:00,410', // 1
      '2026-03-01T00:15:00+12:00,abc', // 2 unparseable current
      'yesterday,400', // 3 unparseable time
      '2026-03-01T00:30:00+12:00,-5', // 4 negative
      '2026-03-01T00:45:00+12:00,99000', // 5 implausible
      '2026-03-01T00:15:00+12:00,420', // 6 accepted (00:15 was not accepted before)
      '2026-03-01T00:15:00+12:00,421', // 7 duplicate
      '2026-03-01T00:05:00+12:00,405', // 8 out of order
      '2026-03-01T00:30:00+12:00,430', // 9
      '2026-03-01T03:30:00+12:00,430', // 10 gap of 3 h
      '2026-03-01T03:45:00+12:00,431', // 11
      '2026-03-01T04:00:00,431', // 12 no offset, no time zone: unparseable
    ].join('\n');
    const dry = await post(admin, line.id, body, 'dry-run');
    expect(dry.status).toBe(200);
    const kinds = Object.fromEntries(dry.body.problems.map((p: { row: number; kind: string }) => [p.row, p.kind]));
    expect(kinds).toEqual({ 2: 'unparseable', 3: 'unparseable', 4: 'negative', 5: 'implausible', 7: 'duplicate', 8: 'out-of-order', 10: 'gap', 12: 'unparseable' });
    for (const p of dry.body.problems) expect(p.message.length).toBeGreaterThan(5);
    expect(dry.body).toMatchObject({ rows: 12, accepted: 5 });

    const commit = await post(admin, line.id, body, 'commit');
    expect(commit.status).toBe(400);
    expect(commit.body.error.message).toMatch(/nothing was stored/);
    expect(commit.body.problems).toEqual(dry.body.problems);
    expect(await t.orm.em.fork().count(LoadSeriesDay, { lineId: line.id })).toBe(0);
  });

  it('when local times come with a stated time zone, then the repeated hour after the clocks go back is read in order and a skipped hour is refused', async () => {
    const line = await makeLine(t.orm);
    // Pacific/Auckland, 2026-04-05: clocks go back from 03:00 NZDT (+13) to 02:00 NZST (+12) (IANA tz database).
    const rows = ['timestamp,current_a'];
    for (const hm of ['01:30', '01:45', '02:00', '02:15', '02:30', '02:45', '02:00', '02:15', '02:30', '02:45', '03:00']) rows.push(`2026-04-05 ${hm},500`);
    const dry = await post(admin, line.id, rows.join('\n'), 'dry-run', '&timeZone=Pacific/Auckland');
    expect(dry.status).toBe(200);
    expect(dry.body.accepted).toBe(11);
    expect(dry.body.problems.map((p: { row: number; kind: string }) => [p.row, p.kind])).toEqual([[7, 'dst-repeat'], [8, 'dst-repeat'], [9, 'dst-repeat'], [10, 'dst-repeat']]);
    expect(dry.body.intervalS).toBe(900);
    expect(dry.body.firstAt).toBe('2026-04-05T01:30:00+13:00');
    expect(dry.body.lastAt).toBe('2026-04-05T03:00:00+12:00');
    // 2026-09-27: clocks go forward from 02:00 NZST to 03:00 NZDT, so 02:30 never happens there (IANA tz database).
    const gap = await post(admin, line.id, 'timestamp,current_a\n2026-09-27 01:45,500\n2026-09-27 02:30,500\n2026-09-27 03:00,500\n', 'dry-run', '&timeZone=Pacific/Auckland');
    expect(gap.body.problems).toEqual([{ row: 2, kind: 'unparseable', message: expect.stringMatching(/does not exist/) }]);
  });

  it('when a clean file is committed, then the month profile comes from the series with P10/P50/P90 per hour as written', async () => {
    const line = await makeLine(t.orm);
    const res = await post(admin, line.id, series(3), 'commit');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ committed: true, accepted: 288 });
    const audit = await t.orm.em.fork().find(AuditEntry, { recordId: line.id, action: 'line.load-series' });
    expect(audit).toHaveLength(1);

    const prof = await admin.get(`/api/lines/${line.id}/load-profile?month=2026-03`);
    expect(prof.status).toBe(200);
    expect(prof.body.source).toBe('series');
    expect(prof.body.hours).toHaveLength(24);
    // hour 7 holds 3 days × 4 readings: 470 + (0,1,2,3) — reference percentiles from d3-array (definition 7)
    const h7 = prof.body.hours[7];
    const values = [470, 471, 472, 473, 470, 471, 472, 473, 470, 471, 472, 473].sort((a, b) => a - b);
    expect(h7.n).toBe(12);
    expect(h7.p10A).toBeCloseTo(quantile(values, 0.1)!, 4);
    expect(h7.p50A).toBeCloseTo(quantile(values, 0.5)!, 4);
    expect(h7.p90A).toBeCloseTo(quantile(values, 0.9)!, 4);

    const other = await admin.get(`/api/lines/${line.id}/load-profile?month=2026-07`);
    expect(other.body.source).toBe('estimate');
    expect(other.body.hours[7].p50A).toBe(line.loadProfileA![7]);
  });

  it('when a second file covers some of the same days, then those days are replaced and the others kept', async () => {
    const line = await makeLine(t.orm);
    expect((await post(admin, line.id, series(3), 'commit')).status).toBe(200);
    expect((await post(safety, line.id, series(1, '2026-03-03T00:00:00+12:00').replace(/,(\d+\.\d)/g, ',100.0'), 'commit')).status).toBe(200);
    const em = t.orm.em.fork();
    expect(await em.count(LoadSeriesDay, { lineId: line.id })).toBe(3);
    const ev = await admin.get(`/api/lines/${line.id}/load-evidence?month=2026-03`);
    expect(ev.body.series).toMatchObject({ readingCount: 288, dayCount: 3 });
    expect(ev.body.months).toHaveLength(1);
    expect(ev.body.months[0].hoursP50A).toHaveLength(24);
  });

  it('when the line page is asked for, then harvest percentiles per hour follow the model at the current percentiles', async () => {
    const line = await makeLine(t.orm);
    await makeSpan(t.orm, line);
    await post(admin, line.id, series(2), 'commit');
    const ev = await admin.get(`/api/lines/${line.id}/load-evidence?month=2026-03`);
    expect(ev.status).toBe(200);
    expect(ev.body.ampacityA).toBeGreaterThan(0);
    expect(ev.body.harvest.length).toBeGreaterThan(0);
    const h = ev.body.harvest[0];
    const profiles = await admin.get('/api/profiles/harvesters');
    const hp = profiles.body.items.find((x: { id: string }) => x.id === h.harvesterId);
    const p50 = ev.body.profile.hours[10].p50A;
    // harvest at the hour's median current, after the converter (split-core CT model with saturation, magnetic-circuit theory; self-consistency)
    const expected = harvest({ currentA: p50, frequencyHz: 60, harvester: hp }).powerW * hp.converterEfficiency;
    expect(h.hours[10].p50W).toBeCloseTo(expected, 6);
    expect(h.hours[10].p10W).toBeLessThanOrEqual(h.hours[10].p50W);
    expect(h.hours[10].p90W).toBeGreaterThanOrEqual(h.hours[10].p50W);
    expect(h.energyPerDayP50Wh).toBeCloseTo(h.hours.reduce((s: number, x: { p50W: number }) => s + x.p50W, 0), 6);
  });

  it('when a surveyor or planner imports, then 403; a missing header, wrong type or bad month → 4xx naming the field', async () => {
    const line = await makeLine(t.orm);
    expect((await post(await t.as('surveyor'), line.id, series(1), 'dry-run')).status).toBe(403);
    expect((await post(await t.as('planner'), line.id, series(1), 'dry-run')).status).toBe(403);
    const noHeader = await post(admin, line.id, '2026-03-01T00:00:00+12:00,400\n', 'dry-run');
    expect(noHeader.status).toBe(400);
    expect(noHeader.body.error.issues[0].path).toBe('timestamp');
    const json = await admin.post(`/api/lines/${line.id}/load-series?mode=dry-run`, { a: 1 });
    expect(json.status).toBe(415);
    const badMode = await post(admin, line.id, series(1), 'dry-run', '&timeZone=Mars/Olympus');
    expect(badMode.status).toBe(400);
    expect(badMode.body.error.issues[0].path).toBe('timeZone');
    const badMonth = await admin.get(`/api/lines/${line.id}/load-profile?month=2026-13`);
    expect(badMonth.status).toBe(400);
    expect(badMonth.body.error.issues[0].path).toBe('month');
    expect((await admin.get('/api/lines/nope/load-profile?month=2026-03')).status).toBe(404);
  });
});

describe('implied current calculator', () => {
  const harvester = { turns: 480, coreAreaMm2: 260, pathLengthMm: 240, relativePermeability: 20000, airGapMm: 0.05, saturationT: 1.2, windingResistanceOhm: 3.2 };

  it('when a power from the model is given, then the current that gives it comes back', async () => {
    const c = await t.as('planner');
    const powerW = harvest({ currentA: 650, frequencyHz: 60, harvester }).powerW;
    const res = await c.post('/api/calc/implied-current', { frequencyHz: 60, harvester, powerW });
    expect(res.status).toBe(200);
    expect(res.body.currentA).toBeCloseTo(650, 0); // round trip of the model (0.1 %)
  });

  it('when the power is above the model ceiling, then 400 names the ceiling', async () => {
    const c = await t.as('planner');
    const res = await c.post('/api/calc/implied-current', { frequencyHz: 60, harvester, powerW: 1e6 });
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('powerW');
    expect(res.body.error.message).toMatch(/ceiling of \d+\.\d\d W/);
  });
});

describe('demo load series', () => {
  it('when the demo scenario is seeded, then its first line has a year of 15-minute readings whose hours follow its estimate', async () => {
    const { seedDemoInventory, DEMO_LINES } = await import('../../server/seeders/demo-inventory.ts');
    const { seedDemoLoadSeries } = await import('../../server/seeders/demo-load-series.ts');
    const demo = await makeTestApp({}, { seed: async (orm) => {
      await seedDemoInventory(orm.em.fork());
      await seedDemoLoadSeries(orm.em.fork());
    } });
    try {
      const c = await demo.as('planner');
      const lines = (await c.get('/api/lines')).body.items as { id: string; name: string; loadProfileA: number[] }[];
      const first = lines.find((l) => l.name === DEMO_LINES[0].name)!;
      const ev = await c.get(`/api/lines/${first.id}/load-evidence?month=2026-04`);
      expect(ev.status).toBe(200);
      expect(ev.body.series).toMatchObject({ readingCount: 365 * 96, dayCount: 365, firstAt: '2026-01-01T00:00:00-09:00', lastAt: '2026-12-31T23:45:00-09:00' });
      expect(ev.body.months).toHaveLength(12);
      expect(ev.body.profile.source).toBe('series');
      // The generator scales the estimate by season × day noise × reading noise, each within ±15 %, ±8 %, ±4 %.
      for (const h of ev.body.profile.hours) {
        expect(h.n).toBe(30 * 4);
        expect(h.p50A / first.loadProfileA[h.hour]).toBeGreaterThan(0.75);
        expect(h.p50A / first.loadProfileA[h.hour]).toBeLessThan(1.3);
      }
    } finally {
      await demo.close();
    }
  });
});

describe('load estimate from evidence', () => {
  it('when an admin applies the series estimate, then the line takes its percentiles, the change is audited and its spans are rescored', async () => {
    const { Assessment } = await import('../../server/modules/assessment/assessment.entity.ts');
    const line = await makeLine(t.orm);
    const span = await makeSpan(t.orm, line);
    await post(admin, line.id, series(3), 'commit');
    const before = await t.orm.em.fork().findOneOrFail(Assessment, { spanId: span.id }, { orderBy: { id: 'asc' } });
    expect((await safety.post(`/api/lines/${line.id}/load-estimate/from-evidence`, { source: 'series', version: line.version })).status).toBe(403);
    const res = await admin.post(`/api/lines/${line.id}/load-estimate/from-evidence`, { source: 'series', version: line.version });
    expect(res.status).toBe(200);
    // readings are 400 + 10·hour + (0…3): the median over the day is 400 + 10·11.5 + 1.5 (direct computation)
    expect(res.body.loadTypicalA).toBeCloseTo(516.5, 1);
    expect(res.body.loadPeakA).toBeCloseTo(633, 1);
    expect(res.body.loadProfileA[7]).toBeCloseTo(471.5, 1);
    expect(await t.orm.em.fork().count(AuditEntry, { recordId: line.id, action: 'line.update' })).toBe(1);
    await expect
      .poll(async () => (await t.orm.em.fork().findOne(Assessment, { spanId: span.id }, { orderBy: { id: 'desc' } }))?.computedAt.getTime() ?? 0, { timeout: 15_000 })
      .toBeGreaterThan(before.computedAt.getTime());
    const stale = await admin.post(`/api/lines/${line.id}/load-estimate/from-evidence`, { source: 'series', version: line.version });
    expect(stale.status).toBe(409);
    const none = await admin.post(`/api/lines/${(await makeLine(t.orm)).id}/load-estimate/from-evidence`, { source: 'flights', version: 1 });
    expect(none.status).toBe(400);
    expect(none.body.error.issues[0].path).toBe('source');
  });
});

describe('the assessment on measured load', () => {
  it('when a line has a series for this month, then its spans are assessed on it and say so; other months keep the estimate', async () => {
    const { Assessment } = await import('../../server/modules/assessment/assessment.entity.ts');
    const { assessSpans } = await import('../../server/modules/assessment/assessment.service.ts');
    const line = await makeLine(t.orm);
    const span = await makeSpan(t.orm, line);
    const month = new Date().toISOString().slice(0, 7);
    // Two days of this month at a flat 250 A (well below the 700 A estimate), at UTC.
    const rows = ['timestamp,current_a'];
    for (let i = 0; i < 2 * 96; i++) rows.push(`${new Date(Date.parse(`${month}-01T00:00:00Z`) + i * 900_000).toISOString().slice(0, 19)}Z,250`);
    expect((await post(admin, line.id, rows.join('\n'), 'commit')).status).toBe(200);
    await assessSpans(t.orm.em.fork(), [span.id]);
    const row = await t.orm.em.fork().findOneOrFail(Assessment, { spanId: span.id }, { orderBy: { id: 'desc' } });
    expect((row.inputs as { loadSource: string }).loadSource).toBe(`series ${month}`);
    expect((row.inputs as { span: { loadCurrentA: { typical: number } } }).span.loadCurrentA.typical).toBeCloseTo(250, 3);
    const curve = await admin.get(`/api/spans/${span.id}/harvest-curve`);
    expect(curve.status).toBe(200);
    expect(curve.body.loadSource).toBe('series');
    expect(curve.body.daily[5].currentA).toBeCloseTo(250, 3);
    expect(curve.body.loadMonth).toBe(month);
    // Every harvest figure of the span's assessments names the metered month it rests on.
    const pairs = await admin.get(`/api/spans/${span.id}/assessments`);
    expect(pairs.body.items.length).toBeGreaterThan(0);
    for (const p of pairs.body.items) expect(p.loadSource).toEqual({ kind: 'measured', month });
    expect((await admin.get(`/api/spans/${span.id}`)).body.assessment.loadSource).toEqual({ kind: 'measured', month });
  });

  it('when a line has no series, then the assessment says it rests on the typed estimate (the line\'s, or the span\'s own)', async () => {
    const { assessSpans } = await import('../../server/modules/assessment/assessment.service.ts');
    const line = await makeLine(t.orm);
    const onLine = await makeSpan(t.orm, line);
    const own = await makeSpan(t.orm, line, { lat: -30.9 });
    const em = t.orm.em.fork();
    await em.nativeUpdate((await import('../../server/modules/inventory/span.entity.ts')).Span, { id: own.id }, { loadCurrentA: 320 });
    await assessSpans(t.orm.em.fork(), [onLine.id, own.id]);
    const a = await admin.get(`/api/spans/${onLine.id}/assessments`);
    const b = await admin.get(`/api/spans/${own.id}/assessments`);
    expect(a.body.items[0].loadSource).toEqual({ kind: 'line-estimate', month: null });
    expect(b.body.items[0].loadSource).toEqual({ kind: 'span-estimate', month: null });
    const curve = await admin.get(`/api/spans/${onLine.id}/harvest-curve`);
    expect(curve.body.loadSource).toBe('estimate');
    expect(curve.body.loadMonth).toBeNull();
  });
});
