// The demo scenario's approvals agree with the assessment: every approved span passes its blocking gates for at
// least one active harvester × drone pair, except the deliberate "needs a decision" cases (approved, then caught
// by the demo's nest zone), which the review desk shows.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { seedDemoInventory } from '../../server/seeders/demo-inventory.ts';
import { seedDemoLoadSeries } from '../../server/seeders/demo-load-series.ts';
import { seedDemoDecisions, DEMO_NEST_ZONE, type DemoDecisionsResult } from '../../server/seeders/demo-decisions.ts';
import { assessSpans, perchableSpanIds, perchStandings } from '../../server/modules/assessment/index.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { Zone } from '../../server/modules/zones/zone.entity.ts';

let t: TestApp;
let safety: Client;
let planner: Client;
let result: DemoDecisionsResult;

beforeAll(async () => {
  t = await makeTestApp(
    { signInBurst: 1000 },
    {
      seed: async (orm) => {
        const em = orm.em.fork();
        await seedDemoInventory(em);
        await seedDemoLoadSeries(em);
        result = await seedDemoDecisions(orm.em.fork());
      },
    },
  );
  safety = await t.as('safety');
  planner = await t.as('planner');
}, 120_000);
afterAll(() => t.close());

describe('demo approvals', () => {
  it('when the demo is seeded, then every approved span that is not flagged passes its blocking gates for at least one active pair', async () => {
    const em = t.orm.em.fork();
    const approved = (await em.find(Span, { status: 'approved' })).map((s) => s.id);
    const perchable = new Set(await perchableSpanIds(em, { status: ['approved'] }));
    const failing = approved.filter((id) => !perchable.has(id));
    expect(failing.sort()).toEqual(result.flaggedSpanIds);
    expect(approved.length).toBeGreaterThan(150);
    // Some approvals had to be settled: the inventory has clearances below the code minimum by design.
    expect(result.settled).toBeGreaterThan(0);
  });

  it('when the assessment is run again from scratch, then the same spans pass (the seeded rows are not stale)', async () => {
    const em = t.orm.em.fork();
    const before = await perchableSpanIds(em, { status: ['approved'] });
    await assessSpans(em, undefined, { clearBetweenBatches: true });
    expect(await perchableSpanIds(t.orm.em.fork(), { status: ['approved'] })).toEqual(before);
  });

  it('when the demo is seeded, then one or two approved spans need a decision, each failing only the no-perch zone gate of the nest zone', async () => {
    expect(result.flaggedSpanIds.length).toBeGreaterThanOrEqual(1);
    expect(result.flaggedSpanIds.length).toBeLessThanOrEqual(2);
    const em = t.orm.em.fork();
    const zone = await em.findOneOrFail(Zone, { id: result.zoneId! });
    expect(zone.name).toBe(DEMO_NEST_ZONE.name);
    expect(zone.severity).toBe('exclude');
    const standings = await perchStandings(em, result.flaggedSpanIds);
    for (const id of result.flaggedSpanIds) expect(standings.get(id)!.failing.map((f) => f.id)).toEqual(['no-perch-zone']);
    for (const id of result.flaggedSpanIds) {
      const view = await safety.get(`/api/spans/${id}`);
      expect(view.status).toBe(200);
      expect(view.body.status).toBe('approved');
      expect(view.body.needsDecision).toBe(true);
    }
    // Never offered to planners.
    const offered = await planner.get('/api/spans?status=approved&perchable=true&pageSize=200');
    const offeredIds = offered.body.items.map((s: { id: string }) => s.id);
    for (const id of result.flaggedSpanIds) expect(offeredIds).not.toContain(id);
  });

  it('when an approval was settled, then the span is back with the surveyor with the failing gate in words, or waits in the review queue', async () => {
    const spans = await t.orm.em.fork().find(Span, { status: { $in: ['returned', 'submitted'] } });
    const settledReturns = spans.filter((s) => s.status === 'returned' && /^Fails the /.test(s.returnReason ?? ''));
    expect(settledReturns.length).toBeGreaterThan(0);
    expect(spans.filter((s) => s.status === 'returned').every((s) => !!s.returnReason)).toBe(true);
    expect(spans.filter((s) => s.status === 'submitted').every((s) => s.approvedAt === null && s.approvedById === null)).toBe(true);
  });
});
