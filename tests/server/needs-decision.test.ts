// "Needs a decision": an approved span whose fresh assessment stops passing (here a new exclude zone) stays approved,
// is listed for the review desk with the gate that now fails, can be suspended or returned to the surveyor, and is
// never offered to planners. An approved span that still passes cannot be returned (it is suspended instead).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Client, TestApp } from './helpers.ts';
import { openReviewFixture, type ReviewFixture } from './review-fixtures.ts';
import { waitForAllJobs } from './assessment-helpers.ts';

let t: TestApp;
let surveyor: Client;
let safety: Client;
let planner: Client;
let submitted: ReviewFixture['submitted'];

beforeAll(async () => {
  ({ t, surveyor, safety, planner, submitted } = await openReviewFixture());
});
afterAll(() => t.close());

/** An approved span on its own pair of structures, at its own latitude. */
async function approvedSpan(): Promise<{ id: string; lat: number }> {
  const span = await submitted();
  expect((await safety.post(`/api/spans/${span.id}/approve`, {})).status).toBe(200);
  return span;
}

async function excludeZoneAt(lat: number, name: string) {
  const zone = await safety.post('/api/zones', {
    name,
    reason: 'Nest found on the structure',
    severity: 'exclude',
    geometry: { type: 'Polygon', coordinates: [[[-130.451, lat - 0.001], [-130.447, lat - 0.001], [-130.447, lat + 0.001], [-130.451, lat + 0.001], [-130.451, lat - 0.001]]] },
  });
  expect(zone.status).toBe(201);
  await waitForAllJobs(safety);
}

const decisionQueue = async () => (await safety.get('/api/spans?status=approved&perchable=false&pageSize=200')).body.items as { id: string; needsDecision: boolean; failingGates: { id: string; label: string; detail: string }[] }[];

describe('needs a decision', () => {
  it('when a new exclude zone covers an approved span, then the desk queue lists it flagged with the zone gate in words, and planners never see it', async () => {
    const { id, lat } = await approvedSpan();
    expect((await decisionQueue()).map((s) => s.id)).not.toContain(id);
    await excludeZoneAt(lat, 'Owl nest');
    const listed = (await decisionQueue()).find((s) => s.id === id);
    expect(listed).toBeDefined();
    expect(listed!.needsDecision).toBe(true);
    expect(listed!.failingGates.map((g) => g.label)).toEqual(['no-perch zone']);
    expect(listed!.failingGates[0]!.detail).toContain('no-perch zone');
    const offered = await planner.get('/api/spans?status=approved&perchable=true&pageSize=200');
    expect(offered.body.items.map((s: { id: string }) => s.id)).not.toContain(id);
  });

  it('when the officer returns a flagged span to the surveyor, then it is returned with the reason, out of the queue, and the surveyor can resubmit it', async () => {
    const { id, lat } = await approvedSpan();
    await excludeZoneAt(lat, 'Blasting at the quarry');
    const span = (await safety.get(`/api/spans/${id}`)).body;
    const res = await safety.post(`/api/spans/${id}/return`, { version: span.version, reason: 'Inside the quarry blasting zone; move the perch to the next span' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('returned');
    expect(res.body.returnReason).toBe('Inside the quarry blasting zone; move the perch to the next span');
    expect(res.body.approvedAt).toBeNull();
    expect((await decisionQueue()).map((s) => s.id)).not.toContain(id);
    expect((await surveyor.post(`/api/spans/${id}/submit`)).status).toBe(200);
  });

  it('when the officer suspends a flagged span, then it is suspended with the reason and out of the queue', async () => {
    const { id, lat } = await approvedSpan();
    await excludeZoneAt(lat, 'Crane works');
    const res = await safety.post(`/api/spans/${id}/suspend`, { reason: 'Crane works below until the end of the month' });
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('suspended');
    expect((await decisionQueue()).map((s) => s.id)).not.toContain(id);
  });

  it('when an approved span still passes its gates, then returning it answers 409 in words and it stays approved', async () => {
    const { id } = await approvedSpan();
    const res = await safety.post(`/api/spans/${id}/return`, { reason: 'Just checking' });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('suspend');
    expect((await safety.get(`/api/spans/${id}`)).body.status).toBe('approved');
  });
});
