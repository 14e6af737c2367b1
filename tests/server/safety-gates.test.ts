import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Client, TestApp } from './helpers.ts';
import { openReviewFixture, type ReviewFixture } from './review-fixtures.ts';
import { waitForAllJobs } from './assessment-helpers.ts';
import { perchableSpanIds } from '../../server/modules/assessment/index.ts';

// Approval is refused while no active harvester × drone pair passes every blocking gate; planners only see perchable spans.
let t: TestApp;
let surveyor: Client;
let safety: Client;
let planner: Client;
let lineId: string;
let submitted: ReviewFixture['submitted'];

beforeAll(async () => {
  ({ t, surveyor, safety, planner, lineId, submitted } = await openReviewFixture());
});
afterAll(() => t.close());

describe('approval refused on failing blocking gates', () => {
  it('when the clearance is below the code minimum, then approval answers 409 naming the clearance gate and the span stays submitted', async () => {
    // 69 kV line: NESC Table 232-1, 18.5 ft plus 0.4 in per kV over 22 kV to ground (adder from memory) ≈ 5.8 m; 4 m is below it.
    const { id } = await submitted({ clearanceM: 4, lowestClearanceM: 4 });
    const res = await safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('clearance');
    expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain('gates.clearance');
    expect((await safety.get(`/api/spans/${id}`)).body.status).toBe('submitted');
  });

  it('when the conductor runs hotter than every gripper contact limit, then approval names contact temperature', async () => {
    // 1500 A typical on Hawk ACSR in the IEEE 738 hot still design weather is far beyond 100 °C (common practice).
    const { id } = await submitted({ loadCurrentA: 1500 });
    const res = await safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('contact temperature');
  });

  it('when the conductor is thinner than every gripper, then approval names gripper fit', async () => {
    const { id } = await submitted({ conductor: { material: 'ACSR', diameterMm: 8, size: 'small' } });
    const res = await safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('gripper fit');
  });

  it('when the line carries too little current, then approval names useful harvest', async () => {
    const { id } = await submitted({ loadCurrentA: 5 });
    const res = await safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('useful harvest');
  });

  it('when the stored assessment is stale (a new exclude zone), then approval still judges it afresh and names the zone', async () => {
    const { id, lat } = await submitted();
    // Written straight into the table so no listener rescored the span: only a fresh check can see it.
    const em = t.orm.em.fork();
    const square = JSON.stringify({ type: 'Polygon', coordinates: [[[-130.451, lat - 0.001], [-130.447, lat - 0.001], [-130.447, lat + 0.001], [-130.451, lat + 0.001], [-130.451, lat - 0.001]]] });
    const zone = await safety.post('/api/zones', { name: 'Quarry blasting', reason: 'Blasting', severity: 'exclude', geometry: JSON.parse(square) });
    expect(zone.status).toBe(201);
    await waitForAllJobs(safety);
    await em.getConnection().execute('update assessments set perchable = ? where span_id = ?', [true, id]);
    const res = await safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('no-perch zone');
    expect(res.body.error.message).toContain('Quarry blasting');
  });

  it('when every gate passes for a pair, then approval succeeds', async () => {
    const { id } = await submitted();
    const res = await safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(200);
    expect(res.body.perchable).toBe(true);
    expect(res.body.needsDecision).toBe(false);
  });
});

describe('perchable filter and the "needs a decision" flag', () => {
  it('when an approved span falls inside a new exclude zone, then it stays approved, is flagged with the zone gate and leaves perchable=true', async () => {
    const { id, lat } = await submitted();
    expect((await safety.post(`/api/spans/${id}/approve`, {})).status).toBe(200);
    const before = await planner.get('/api/spans?status=approved&perchable=true&pageSize=200');
    expect(before.body.items.map((s: { id: string }) => s.id)).toContain(id);
    expect(before.body.items.every((s: { perchable: boolean }) => s.perchable === true)).toBe(true);

    const zone = await safety.post('/api/zones', {
      name: 'Nesting raptors',
      reason: 'Breeding season',
      severity: 'exclude',
      geometry: { type: 'Polygon', coordinates: [[[-130.451, lat - 0.001], [-130.447, lat - 0.001], [-130.447, lat + 0.001], [-130.451, lat + 0.001], [-130.451, lat - 0.001]]] },
    });
    expect(zone.status).toBe(201);
    await waitForAllJobs(safety);

    const span = (await safety.get(`/api/spans/${id}`)).body;
    expect(span.status).toBe('approved');
    expect(span.perchable).toBe(false);
    expect(span.needsDecision).toBe(true);
    expect(span.failingGates.map((g: { label: string }) => g.label)).toContain('no-perch zone');

    const after = await planner.get('/api/spans?status=approved&perchable=true&pageSize=200');
    expect(after.body.items.map((s: { id: string }) => s.id)).not.toContain(id);
    expect(after.body.total).toBe(after.body.items.length);
    const flagged = await safety.get('/api/spans?status=approved&perchable=false&pageSize=200');
    expect(flagged.body.items.map((s: { id: string }) => s.id)).toContain(id);
    // The helper the mission planner reuses agrees with the list.
    expect(await perchableSpanIds(t.orm.em.fork(), { status: ['approved'], spanIds: [id] })).toEqual([]);
  });

  it('when perchable is not true or false, then 400 names the field', async () => {
    const res = await planner.get('/api/spans?perchable=maybe');
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('perchable');
  });
});

describe('control characters in search text', () => {
  it('when the search text holds a control character, then 400 names q instead of a server error', async () => {
    for (const q of ['%00', 'a%01b', '%7F', 'x%0Ay']) {
      const res = await planner.get(`/api/spans?q=${q}`);
      expect(res.status).toBe(400);
      expect(res.body.error.issues[0].path).toBe('q');
    }
    expect((await planner.get("/api/spans?q=it's%20a%20%25_\\")).status).toBe(200);
  });
});

describe('structure numbering under parallel requests', () => {
  it('when six structures are created on one line at the same moment, then all six land with distinct labels', async () => {
    const line = await surveyor.post('/api/lines', { name: 'Parallel Test 33 kV', owner: 'Harrow Vale Power Cooperative', voltageKv: 33, frequencyHz: 60, phases: 3, loadTypicalA: 200, loadMinA: 80, loadPeakA: 320 });
    expect(line.status).toBe(201);
    const results = await Promise.all(
      Array.from({ length: 6 }, (_, i) => surveyor.post('/api/structures', { lineId: line.body.id, lat: -30.5, lon: -130.5 + i * 0.002, kind: 'pole', attachmentHeightM: 12 })),
    );
    expect(results.map((r) => r.status)).toEqual([201, 201, 201, 201, 201, 201]);
    const labels = results.map((r) => r.body.label as string);
    expect(new Set(labels).size).toBe(6);
    const listed = await surveyor.get(`/api/structures?lineId=${line.body.id}`);
    expect(listed.body.items).toHaveLength(6);
  });
});
