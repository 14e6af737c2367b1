import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { seedDemoInventory, DEMO_LINES, demoLoadProfile } from '../../server/seeders/demo-inventory.ts';
import { DEMO_BBOX } from '../../shared/demo-region.ts';
import { codeGroundClearanceM } from '../../shared/engineering/clearance.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { Structure } from '../../server/modules/inventory/structure.entity.ts';
import { Hazard } from '../../server/modules/inventory/hazard.entity.ts';
import { HazardKind } from '../../server/modules/inventory/hazard-kind.entity.ts';
import { Line } from '../../server/modules/inventory/line.entity.ts';

let t: TestApp;
let planner: Client;
let seedMs = 0;
let result: Awaited<ReturnType<typeof seedDemoInventory>>;

beforeAll(async () => {
  t = await makeTestApp(
    { signInBurst: 1000 },
    {
      seed: async (orm) => {
        const started = performance.now();
        result = await seedDemoInventory(orm.em.fork());
        seedMs = performance.now() - started;
      },
    },
  );
  planner = await t.as('planner');
});
afterAll(() => t.close());

describe('demo inventory', () => {
  it('when seeded, then there are at least 3 lines of different voltage classes, 300 structures and 300 spans', async () => {
    const em = t.orm.em.fork();
    const lines = await em.find(Line, {});
    expect(lines.length).toBeGreaterThanOrEqual(3);
    expect(new Set(lines.map((l) => l.voltageKv))).toEqual(new Set([12.47, 69, 138]));
    expect(lines.every((l) => l.owner === 'Harrow Vale Power Cooperative' && l.loadProfileA?.length === 24)).toBe(true);
    expect(await em.count(Structure, {})).toBeGreaterThanOrEqual(300);
    expect(await em.count(Span, {})).toBeGreaterThanOrEqual(300);
    expect(result.spans).toBe(await em.count(Span, {}));
    console.log(`demo inventory: ${result.lines} lines, ${result.structures} structures, ${result.spans} spans, ${result.hazards} hazards in ${seedMs.toFixed(0)} ms`, result.byStatus);
    expect(seedMs).toBeLessThan(3000);
  });

  it('when seeded, then every structure lies inside the demo box', async () => {
    const structures = await t.orm.em.fork().find(Structure, {});
    for (const s of structures) {
      expect(s.lon).toBeGreaterThanOrEqual(DEMO_BBOX.west);
      expect(s.lon).toBeLessThanOrEqual(DEMO_BBOX.east);
      expect(s.lat).toBeGreaterThanOrEqual(DEMO_BBOX.south);
      expect(s.lat).toBeLessThanOrEqual(DEMO_BBOX.north);
    }
  });

  it('when seeded, then every status occurs, and returned / suspended spans carry their reasons', async () => {
    const spans = await t.orm.em.fork().find(Span, {});
    for (const status of ['draft', 'submitted', 'approved', 'returned', 'suspended'] as const) expect(spans.filter((s) => s.status === status).length).toBeGreaterThan(5);
    expect(spans.filter((s) => s.status === 'returned').every((s) => !!s.returnReason)).toBe(true);
    expect(spans.filter((s) => s.status === 'suspended').every((s) => !!s.suspendReason)).toBe(true);
    expect(spans.filter((s) => s.status === 'approved').every((s) => s.approvedById && s.approvedAt)).toBe(true);
  });

  it('when seeded, then conductors fit the voltage class and some clearances are below the code minimum', async () => {
    const em = t.orm.em.fork();
    const lines = new Map((await em.find(Line, {})).map((l) => [l.id, l]));
    const spans = await em.find(Span, {});
    const codeWordsByKv = new Map<number, Set<string>>();
    for (const s of spans) {
      const kv = lines.get(s.lineId)!.voltageKv;
      codeWordsByKv.set(kv, (codeWordsByKv.get(kv) ?? new Set()).add(s.conductorCodeWord!));
    }
    expect([...codeWordsByKv.get(12.47)!].sort()).toEqual(['Partridge', 'Penguin']);
    expect([...codeWordsByKv.get(69)!].sort()).toEqual(['Dove', 'Hawk', 'Linnet']);
    expect([...codeWordsByKv.get(138)!]).toEqual(['Drake']);
    // NESC Table 232-1 minimum via codeGroundClearanceM (18.5 ft ≤ 22 kV to ground; adder from memory, engineering.md §5).
    const below = spans.filter((s) => s.clearanceM !== null && s.clearanceM < codeGroundClearanceM(lines.get(s.lineId)!.voltageKv));
    expect(below.length).toBeGreaterThan(5);
    expect(below.length).toBeLessThan(spans.length / 5);
  });

  it('when seeded, then hazards use the catalogue and the load profiles stay within min and peak', async () => {
    const em = t.orm.em.fork();
    const kinds = new Set((await em.find(HazardKind, {})).map((k) => k.id));
    const hazards = await em.find(Hazard, {});
    expect(hazards.length).toBeGreaterThan(100);
    expect(hazards.every((h) => kinds.has(h.kindId))).toBe(true);
    expect(new Set(hazards.map((h) => h.kindId)).size).toBeGreaterThanOrEqual(8);
    for (const spec of DEMO_LINES) {
      const p = demoLoadProfile(spec.load);
      expect(Math.min(...p)).toBeGreaterThanOrEqual(spec.load.minA);
      expect(Math.max(...p)).toBeLessThanOrEqual(spec.load.peakA);
    }
  });

  it('when seeded twice with the same seed, then the data is identical (deterministic)', async () => {
    const other = await makeTestApp({}, { seed: async (orm) => void (await seedDemoInventory(orm.em.fork())) });
    try {
      const pick = async (app: TestApp) =>
        (await app.orm.em.fork().find(Span, {}, { orderBy: { id: 'asc' } })).map((s) => [s.id, s.status, s.lengthM, s.clearanceM, s.conductorCodeWord]);
      expect(await pick(other)).toEqual(await pick(t));
    } finally {
      await other.close();
    }
  });
});

describe('listing the demo inventory', () => {
  it('when filtered by status and line, then only those spans come back, with the total', async () => {
    const lines = (await planner.get('/api/lines')).body.items;
    const line69 = lines.find((l: any) => l.voltageKv === 69);
    expect(line69.spanCount).toBeGreaterThan(50);
    const res = await planner.get(`/api/spans?status=approved&lineId=${line69.id}&pageSize=200`);
    expect(res.status).toBe(200);
    expect(res.body.items.length).toBe(res.body.total);
    expect(res.body.items.every((s: any) => s.status === 'approved' && s.lineId === line69.id)).toBe(true);
    const multi = await planner.get(`/api/spans?status=returned,suspended&pageSize=200`);
    expect(new Set(multi.body.items.map((s: any) => s.status))).toEqual(new Set(['returned', 'suspended']));
  });

  it('when sorted by length, then pages follow each other in order without overlap', async () => {
    const p1 = await planner.get('/api/spans?sort=-lengthM&page=1&pageSize=25');
    const p2 = await planner.get('/api/spans?sort=-lengthM&page=2&pageSize=25');
    expect(p1.body).toMatchObject({ page: 1, pageSize: 25 });
    expect(p1.body.total).toBeGreaterThanOrEqual(300);
    const lengths = [...p1.body.items, ...p2.body.items].map((s: any) => s.lengthM);
    expect(lengths).toEqual([...lengths].sort((a, b) => b - a));
    const ids = new Set([...p1.body.items, ...p2.body.items].map((s: any) => s.id));
    expect(ids.size).toBe(50);
    const asc = await planner.get('/api/spans?sort=lengthM&pageSize=5');
    expect(asc.body.items[0].lengthM).toBeLessThanOrEqual(asc.body.items[4].lengthM);
  });

  it('when searching text, then structure labels and line names match', async () => {
    const byLabel = await planner.get('/api/spans?q=VR138-010');
    expect(byLabel.body.total).toBe(2);
    expect(byLabel.body.items.every((s: any) => s.fromStructureLabel === 'VR138-010' || s.toStructureLabel === 'VR138-010')).toBe(true);
    const byName = await planner.get('/api/spans?q=feeder 4&pageSize=1');
    expect(byName.body.total).toBeGreaterThan(50);
    expect(byName.body.items[0].lineName).toBe('Wendlecross Feeder 4');
    const byCode = await planner.get('/api/spans?q=drake&pageSize=1');
    expect(byCode.body.items[0].conductor.codeWord).toBe('Drake');
    const none = await planner.get('/api/spans?q=%25_nothing');
    expect(none.body.total).toBe(0);
  });

  it('when the query is out of range, then 400 names the parameter', async () => {
    const res = await planner.get('/api/spans?pageSize=500&status=bogus&sort=height');
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: any) => i.path)).toEqual(expect.arrayContaining(['pageSize', 'status.0', 'sort']));
  });

  it('when the surveyor asks for their own spans, then all demo spans are theirs', async () => {
    const surveyor = await t.as('surveyor');
    const mine = await surveyor.get('/api/spans?mine=true&status=returned&pageSize=5');
    expect(mine.body.total).toBeGreaterThan(5);
    expect(mine.body.items[0].returnReason).toEqual(expect.any(String));
  });
});
