// The span list's fast paths against the plain queries on the same data: cached totals equal a fresh count (also
// right after an edit and during a rescore), the index-friendly order equals the full order, and the views read
// without the identity map equal the entity-based ones.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { seedScaleInventory } from '../../server/seeders/scale-inventory.ts';
import { ensureAssessmentDefaults, defaultPair } from '../../server/modules/assessment/profiles.service.ts';
import { assessmentForSpans, assessmentView, assessSpansBulk } from '../../server/modules/assessment/assessment.service.ts';
import { Assessment } from '../../server/modules/assessment/assessment.entity.ts';
import { sql } from '../../server/sql/query.ts';
import { activePairs, perchStandings, standingOf } from '../../server/modules/assessment/perchable.ts';
import { listSpans, type SpanFilter } from '../../server/modules/inventory/spans.query.ts';
import { spanViewOf } from '../../server/modules/inventory/inventory.service.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';

let t: TestApp;
let planner: Client;
const PAIR = "left join assessments a on a.span_id = s.id and a.harvester_profile_id = ? and a.drone_profile_id = ? ";
const FROM = 'from spans s join lines l on l.id = s.line_id left join structures fs on fs.id = s.from_structure_id left join structures ts on ts.id = s.to_structure_id ' + PAIR;
let pair: [string, string];

/** The plain count with every join, as the list made it before. */
async function plainCount(where: string, params: unknown[] = []) {
  const row = await sql.get<{ n: number }>(t.orm.em.fork(), `select count(*) as n ${FROM}${where ? `where ${where}` : ''}`, [...pair, ...params]);
  return Number(row!.n);
}

beforeAll(async () => {
  // Seeded before the app starts, so its own start-up work finds everything in place.
  t = await makeTestApp({}, {
    seed: async (orm) => {
      await ensureAssessmentDefaults(orm.em.fork());
      await seedScaleInventory(orm.em.fork(), { spans: 600, seed: 11 });
      await assessSpansBulk(orm.em.fork());
    },
  });
  const p = (await defaultPair(t.orm.em.fork()))!;
  pair = [p.harvester.id, p.drone.id];
  planner = await t.as('planner');
}, 120_000);
afterAll(async () => t?.close());

describe('span list totals', () => {
  it('when the same filters are asked twice and after edits and a rescore, then every total equals a fresh full count', async () => {
    const cases: [string, string, unknown[]][] = [
      ['status=approved', "s.status = 'approved'", []],
      ['status=submitted,returned', "s.status in ('submitted','returned')", []],
      ['q=C00002', "(fs.label like '%C00002%' or ts.label like '%C00002%' or l.name like '%C00002%' or s.conductor_code_word like '%C00002%' or s.id = 'C00002')", []],
      ['minHarvestW=5', 'a.harvest_w >= 5', []],
      ['', '', []],
    ];
    const check = async () => {
      for (const [query, where, params] of cases) {
        const res = await planner.get(`/api/spans?${query}&pageSize=5`);
        expect(res.status).toBe(200);
        expect(res.body.total).toBe(await plainCount(where, params));
      }
    };
    await check();
    await check(); // served from the cache, same answers
    // An edit that moves spans between statuses: the cached totals must not be served.
    await sql.run(t.orm.em.fork(), "update spans set status = 'approved' where id in (select id from spans where status = 'submitted' order by id limit 7)");
    await check();
    // A rescore with a higher useful minimum changes the harvest filter's total, not the status totals.
    await sql.run(t.orm.em.fork(), 'update assessments set harvest_w = harvest_w / 10 where id % 3 = 0');
    await check();
    await assessSpansBulk(t.orm.em.fork());
    await check();
  }, 120_000);

  it('when pages are listed with the date and length sorts, then the order equals the full order with its nulls-last terms', async () => {
    for (const [sort, expr] of [['-updatedAt', 's.updated_at desc'], ['createdAt', 's.created_at asc'], ['lengthM', 's.length_m asc'], ['-lengthM', 's.length_m desc']] as const) {
      const col = expr.split(' ')[0];
      const full = await sql.all<{ id: string }>(t.orm.em.fork(), `select s.id as id ${FROM}where s.status = 'approved' order by ${col} is null, ${expr}, l.name, fs.label, s.id limit 40 offset 20`, pair);
      const res = await planner.get(`/api/spans?status=approved&sort=${sort}&page=2&pageSize=20`);
      expect(res.body.items.map((s: { id: string }) => s.id)).toEqual(full.slice(0, 20).map((r) => r.id));
    }
  });
});

describe('span views', () => {
  it('when the default assessments are read without the identity map, then they equal the entity-based views', async () => {
    const em = t.orm.em.fork();
    const ids = (await sql.all<{ id: string }>(em, 'select id from spans order by random() limit 80')).map((r) => r.id);
    const rows = await em.find(Assessment, { spanId: { $in: ids }, harvesterProfileId: pair[0], droneProfileId: pair[1] });
    const expected = new Map(ids.map((id) => [id, null as unknown]));
    for (const r of rows) expected.set(r.spanId, assessmentView(r));
    expect(await assessmentForSpans(t.orm.em.fork(), ids)).toEqual(expected);
  });
});

describe('span list pages', () => {
  const filter = (over: Partial<SpanFilter> = {}): SpanFilter => ({ status: ['approved'], sort: '-updatedAt', page: 2, pageSize: 20, ...over });
  const fresh = async (f: SpanFilter) => JSON.parse(JSON.stringify(await listSpans(t.orm.em.fork(), f)));

  it('when a page is asked again and after writes, then it always equals the page read fresh from the database', async () => {
    const url = '/api/spans?status=approved&sort=-updatedAt&page=2&pageSize=20';
    const first = await planner.get(url);
    expect(first.status).toBe(200);
    expect(first.body).toEqual(await fresh(filter()));
    expect((await planner.get(url)).body).toEqual(first.body); // served again, same answer
    // A span of the page changes: the page read next shows it.
    const id = first.body.items[3].id as string;
    await sql.run(t.orm.em.fork(), 'update spans set clearance_m = 42.5 where id = ?', [id]);
    const edited = await planner.get(url);
    expect(edited.body.items.find((s: { id: string }) => s.id === id).clearanceM).toBe(42.5);
    expect(edited.body).toEqual(await fresh(filter()));
    // Assessments only change (a rescore batch): the page's figures follow.
    await sql.run(t.orm.em.fork(), 'update assessments set score = score / 2 where span_id = ?', [id]);
    const rescored = await planner.get(url);
    expect(rescored.body).toEqual(await fresh(filter()));
    expect(rescored.body.items.find((s: { id: string }) => s.id === id).assessment.score).not.toBe(edited.body.items.find((s: { id: string }) => s.id === id).assessment.score);
    await assessSpansBulk(t.orm.em.fork(), [id]);
    expect((await planner.get(url)).body).toEqual(await fresh(filter()));
  });

  it('when a page is served again from the kept bytes, then its type, ETag and 304 are those of the body as sent fresh', async () => {
    const url = '/api/spans?status=submitted,returned&sort=-updatedAt&page=1&pageSize=10';
    const etagOf = t.app.get('etag fn') as (body: Buffer) => string;
    const first = await planner.get(url);
    expect(first.status).toBe(200);
    expect(first.headers['content-type']).toBe('application/json; charset=utf-8');
    expect(first.headers.etag).toBe(etagOf(Buffer.from(first.text, 'utf8')));
    const again = await planner.get(url);
    expect(again.text).toBe(first.text);
    expect(again.headers.etag).toBe(first.headers.etag);
    expect(Number(again.headers['content-length'])).toBe(Buffer.byteLength(first.text, 'utf8'));
    expect((await planner.get(url).set('If-None-Match', first.headers.etag)).status).toBe(304);
    // A span of the page changes: a new body with its own ETag, and the old ETag no longer answers 304.
    await sql.run(t.orm.em.fork(), 'update spans set clearance_m = clearance_m + 0.5 where id = ?', [first.body.items[0].id]);
    const changed = await planner.get(url).set('If-None-Match', first.headers.etag);
    expect(changed.status).toBe(200);
    expect(changed.headers.etag).not.toBe(first.headers.etag);
    expect(changed.headers.etag).toBe(etagOf(Buffer.from(changed.text, 'utf8')));
    expect(changed.body).toEqual(await fresh(filter({ status: ['submitted', 'returned'], page: 1, pageSize: 10 })));
  });

  it('when ten clients ask for pages at once, then each gets the page read fresh', async () => {
    const asked = Array.from({ length: 10 }, (_, i) => filter({ page: 1 + (i % 4), status: i % 2 ? ['approved'] : ['submitted', 'returned'] }));
    const bodies = await Promise.all(asked.map((f) => planner.get(`/api/spans?status=${f.status!.join(',')}&sort=-updatedAt&page=${f.page}&pageSize=20`).then((r) => r.body)));
    for (let i = 0; i < asked.length; i++) expect(bodies[i]).toEqual(await fresh(asked[i]));
  });

  it('when standings are read the lean way, then they equal the rule applied to every stored row', async () => {
    const em = t.orm.em.fork();
    const ids = (await sql.all<{ id: string }>(em, 'select id from spans order by random() limit 200')).map((r) => r.id);
    const { harvesterIds, droneIds, names } = await activePairs(em);
    const rows = await em.find(Assessment, { spanId: { $in: ids }, harvesterProfileId: { $in: harvesterIds }, droneProfileId: { $in: droneIds } }, { orderBy: { id: 'asc' } });
    const lean = await perchStandings(t.orm.em.fork(), ids);
    let blocked = 0;
    for (const id of ids) {
      const own = rows.filter((r) => r.spanId === id);
      if (!own.length) {
        expect(lean.has(id)).toBe(false);
        continue;
      }
      const plain = standingOf(own, names);
      if (!plain.perchable) blocked++;
      // A perchable span lists no failing gates (nothing reads them); otherwise every failing gate and pair.
      expect(lean.get(id)).toEqual(plain.perchable ? { ...plain, failing: [] } : plain);
    }
    expect(blocked).toBeGreaterThan(0); // both kinds are in the sample
  });
});

describe('span list keyset pages', () => {
  it('when deep pages are asked with several statuses, a harvest filter and many equal sort values, then each page equals the plain full-order query', async () => {
    // Ties across page boundaries: 90 spans share one update time and 40 one length.
    await sql.run(t.orm.em.fork(), 'update spans set updated_at = (select max(updated_at) from spans) where id in (select id from spans order by id limit 90)');
    await sql.run(t.orm.em.fork(), 'update spans set length_m = 150 where id in (select id from spans order by id desc limit 40)');
    const cases: [string, string, string, unknown[]][] = [
      ['status=approved,submitted&sort=-updatedAt', "s.status in ('approved','submitted')", 's.updated_at desc', []],
      ['sort=-updatedAt', '', 's.updated_at desc', []],
      ['status=approved,returned&sort=createdAt', "s.status in ('approved','returned')", 's.created_at asc', []],
      ['minHarvestW=2&sort=lengthM', 'a.harvest_w >= ?', 's.length_m asc', [2]],
      ['status=draft,approved&sort=-lengthM', "s.status in ('draft','approved')", 's.length_m desc', []],
    ];
    for (const [query, where, order, params] of cases) {
      const full = await sql.all<{ id: string }>(t.orm.em.fork(), `select s.id as id ${FROM}${where ? `where ${where} ` : ''}order by ${order}, l.name, fs.label, s.id`, [...pair, ...params]);
      for (const page of [1, 2, 4, 7, Math.ceil(full.length / 25), Math.ceil(full.length / 25) + 1]) {
        const res = await planner.get(`/api/spans?${query}&page=${page}&pageSize=25`);
        expect(res.status).toBe(200);
        expect(res.body.items.map((x: { id: string }) => x.id)).toEqual(full.slice((page - 1) * 25, page * 25).map((r) => r.id));
      }
    }
  });
});

describe('span list with several active pairs', () => {
  /** The page as the plain path gives it: the default pair and every active pair read as entities, each span's view on its own. */
  async function plainPage(where: string, order: string, params: unknown[], page: number, pageSize: number) {
    const em = t.orm.em.fork();
    const p = (await defaultPair(em))!;
    const ids = await sql.all<{ id: string }>(em, `select s.id as id ${FROM}${where ? `where ${where} ` : ''}order by ${order}, l.name, fs.label, s.id limit ? offset ?`, [p.harvester.id, p.drone.id, ...params, pageSize, (page - 1) * pageSize]);
    const count = await sql.get<{ n: number }>(em, `select count(*) as n ${FROM}${where ? `where ${where}` : ''}`, [p.harvester.id, p.drone.id, ...params]);
    const items = [];
    for (const { id } of ids) items.push(await spanViewOf(t.orm.em.fork(), (await t.orm.em.fork().findOne(Span, { id }))!));
    return { pair: p, body: JSON.parse(JSON.stringify({ items, total: Number(count!.n), page, pageSize })) };
  }
  const cases: [string, string, string, unknown[]][] = [
    ['minHarvestW=1&sort=-score', 'a.harvest_w >= ?', 'a.score is null, a.score desc', [1]],
    ['status=approved&sort=-updatedAt', "s.status = 'approved'", 's.updated_at desc', []],
    ['sort=harvestW', '', 'a.harvest_w is null, a.harvest_w asc', []],
  ];
  const check = async () => {
    for (const [query, where, order, params] of cases) {
      for (const page of [1, 3]) {
        const res = await planner.get(`/api/spans?${query}&page=${page}&pageSize=15`);
        expect(res.status).toBe(200);
        const plain = await plainPage(where, order, params, page, 15);
        expect(res.body).toEqual(plain.body);
      }
    }
  };
  const active = async () => {
    const { harvesterIds, droneIds } = await activePairs(t.orm.em.fork());
    return { harvesterIds, droneIds };
  };

  it('when the default pair changes (a profile reordered, the default one deactivated), then every page equals the plain path for the new pair', async () => {
    const em = t.orm.em.fork();
    const start = await active();
    expect(start.harvesterIds.length * start.droneIds.length).toBeGreaterThan(1);
    const before = (await defaultPair(em))!;
    const saved = await sql.all<{ id: string; sort_order: number; active: unknown }>(em, 'select id, sort_order, active from drone_profiles');
    const savedH = await sql.all<{ id: string; sort_order: number; active: unknown }>(em, 'select id, sort_order, active from harvester_profiles');
    try {
      await check();
      // Another active drone comes first: the default pair's drone changes.
      const otherDrone = start.droneIds.find((id) => id !== before.drone.id);
      const otherHarvester = start.harvesterIds.find((id) => id !== before.harvester.id);
      if (otherDrone) {
        await sql.run(t.orm.em.fork(), 'update drone_profiles set sort_order = ? where id = ?', [-1, otherDrone]);
        expect((await defaultPair(t.orm.em.fork()))!.drone.id).toBe(otherDrone);
        const res = await planner.get('/api/spans?minHarvestW=1&sort=-score&pageSize=15');
        expect(res.body.items.length).toBeGreaterThan(0);
        expect(res.body.items.every((s: { assessment: { droneProfileId: string } | null }) => s.assessment?.droneProfileId === otherDrone)).toBe(true);
        await check();
      }
      // The default harvester is deactivated: the next active one is the default, and the standings count one pair fewer.
      if (otherHarvester) {
        await sql.run(t.orm.em.fork(), 'update harvester_profiles set active = ? where id = ?', [false, before.harvester.id]);
        expect((await defaultPair(t.orm.em.fork()))!.harvester.id).not.toBe(before.harvester.id);
        await check();
      }
      expect(otherDrone ?? otherHarvester).toBeDefined();
    } finally {
      for (const r of saved) await sql.run(t.orm.em.fork(), 'update drone_profiles set sort_order = ?, active = ? where id = ?', [r.sort_order, r.active, r.id]);
      for (const r of savedH) await sql.run(t.orm.em.fork(), 'update harvester_profiles set sort_order = ?, active = ? where id = ?', [r.sort_order, r.active, r.id]);
    }
    expect(await active()).toEqual(start);
  }, 120_000);
});
