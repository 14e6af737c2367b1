import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { buildLine, completeSpan } from './inventory-fixtures.ts';
import { ROLES, type Role } from '../../shared/roles.ts';
import sharp from 'sharp';
import { Span } from '../../server/modules/inventory/span.entity.ts';

// The review desk's server side: the queue it reads, the decisions it sends, and the history they leave.
let t: TestApp;
let as: Record<Role, Client>;
let lineId: string;
let nextStructure = 0;

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  as = Object.fromEntries(await Promise.all(ROLES.map(async (r) => [r, await t.as(r)] as const))) as Record<Role, Client>;
  const built = await buildLine(as.surveyor, 2);
  lineId = built.line.id;
});
afterAll(() => t.close());

async function submittedSpan(): Promise<string> {
  const ids: string[] = [];
  for (const k of [0, 1]) {
    const r = await as.surveyor.post('/api/structures', { lineId, lat: -30.3 - nextStructure * 0.001, lon: -130.45 + k * 0.002, kind: 'pole', attachmentHeightM: 13 });
    expect(r.status).toBe(201);
    ids.push(r.body.id);
  }
  nextStructure++;
  const created = await as.surveyor.post('/api/spans', completeSpan(lineId, ids[0], ids[1]));
  expect(created.status).toBe(201);
  expect((await as.surveyor.post(`/api/spans/${created.body.id}/submit`)).status).toBe(200);
  return created.body.id;
}

async function history(c: Client, spanId: string) {
  const res = await c.get(`/api/audit/spans/${spanId}`);
  expect(res.status).toBe(200);
  return res.body.items as { action: string; actorName: string; before: any; after: any }[];
}

describe('review queue', () => {
  it('when spans are submitted, then the queue lists them with their submission time, for the desk to show oldest first', async () => {
    const first = await submittedSpan();
    const second = await submittedSpan();
    const em = t.orm.em.fork();
    // The first one has waited three days.
    await em.nativeUpdate(Span, { id: first }, { submittedAt: new Date(Date.now() - 3 * 86_400_000) });
    const res = await as.safety.get('/api/spans?status=submitted&pageSize=200');
    expect(res.status).toBe(200);
    const queue = res.body.items as { id: string; status: string; submittedAt: string }[];
    expect(queue.every((s) => s.status === 'submitted')).toBe(true);
    const mine = queue.filter((s) => s.id === first || s.id === second).sort((a, b) => a.submittedAt.localeCompare(b.submittedAt));
    expect(mine.map((s) => s.id)).toEqual([first, second]);
    expect(Date.now() - new Date(mine[0].submittedAt).getTime()).toBeGreaterThan(3 * 86_400_000 - 60_000);
  });
});

describe('review decisions', () => {
  it('when safety approves, then the span is approved and its history names the officer with status before → after', async () => {
    const id = await submittedSpan();
    const res = await as.safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(200);
    expect(res.body.status).toBe('approved');
    const entries = await history(as.planner, id);
    const approve = entries.find((e) => e.action === 'span.approve')!;
    expect(approve.actorName).toBe('Bram Okonkwo-Reyes');
    expect(approve.before.status).toBe('submitted');
    expect(approve.after.status).toBe('approved');
    expect(entries.map((e) => e.action)).toEqual(expect.arrayContaining(['span.create', 'span.submit', 'span.approve']));
    // Newest first.
    expect(entries[0].action).toBe('span.approve');
  });

  it('when safety returns a span with a reason, then the surveyor sees the reason, fixes it and submits again', async () => {
    const id = await submittedSpan();
    const noReason = await as.safety.post(`/api/spans/${id}/return`, { reason: '   ' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.issues[0].path).toBe('reason');
    const res = await as.safety.post(`/api/spans/${id}/return`, { reason: 'The clearance photo shows the wrong span' });
    expect(res.status).toBe(200);
    const seen = await as.surveyor.get(`/api/spans/${id}`);
    expect(seen.body).toMatchObject({ status: 'returned', returnReason: 'The clearance photo shows the wrong span' });
    const ret = (await history(as.surveyor, id)).find((e) => e.action === 'span.return')!;
    expect(ret.after.reason).toBe('The clearance photo shows the wrong span');
    expect(ret.before.status).toBe('submitted');
    expect(ret.after.status).toBe('returned');
    // The fix and the resubmission.
    const fixed = await as.surveyor.patch(`/api/spans/${id}`, { version: seen.body.version, clearanceM: 9.8 });
    expect(fixed.status).toBe(200);
    const again = await as.surveyor.post(`/api/spans/${id}/submit`, {});
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ status: 'submitted', returnReason: null });
  });

  it('when safety suspends an approved span with a reason and reinstates it, then both land in its history', async () => {
    const id = await submittedSpan();
    await as.safety.post(`/api/spans/${id}/approve`, {});
    expect((await as.safety.post(`/api/spans/${id}/suspend`, {})).status).toBe(400);
    const suspended = await as.safety.post(`/api/spans/${id}/suspend`, { reason: 'Crossing circuit being rebuilt in spring' });
    expect(suspended.status).toBe(200);
    expect(suspended.body).toMatchObject({ status: 'suspended', suspendReason: 'Crossing circuit being rebuilt in spring' });
    const back = await as.safety.post(`/api/spans/${id}/reinstate`, {});
    expect(back.body.status).toBe('approved');
    const actions = (await history(as.safety, id)).map((e) => e.action);
    expect(actions.slice(0, 2)).toEqual(['span.reinstate', 'span.suspend']);
    // The safety officer's audit log shows the same span entries.
    const log = await as.safety.get(`/api/audit?recordType=span&recordId=${id}`);
    expect(log.status).toBe(200);
    expect(log.body.items.map((e: { action: string }) => e.action)).toEqual(actions.filter((a) => !a.startsWith('hazard') && !a.startsWith('photo')));
  });

  it('when a decision does not fit the state or comes from another role, then 409 or 403 and no history entry', async () => {
    const id = await submittedSpan();
    const before = (await history(as.safety, id)).length;
    expect((await as.safety.post(`/api/spans/${id}/suspend`, { reason: 'Not approved yet' })).status).toBe(409);
    expect((await as.safety.post(`/api/spans/${id}/reinstate`, {})).status).toBe(409);
    expect((await as.surveyor.post(`/api/spans/${id}/approve`, {})).status).toBe(403);
    expect((await as.planner.post(`/api/spans/${id}/return`, { reason: 'x' })).status).toBe(403);
    expect((await as.admin.post(`/api/spans/${id}/approve`, {})).status).toBe(403);
    expect((await history(as.safety, id)).length).toBe(before);
    // Two reviewers on the same span: the second decision, on the stale version, is refused.
    const span = (await as.safety.get(`/api/spans/${id}`)).body;
    expect((await as.safety.post(`/api/spans/${id}/approve`, { version: span.version })).status).toBe(200);
    expect((await as.safety.post(`/api/spans/${id}/return`, { version: span.version, reason: 'Too late' })).status).toBe(409);
  });

  it('when the span crosses an active exclude zone, then approval is refused with 409 naming the zone', async () => {
    const id = await submittedSpan();
    const span = (await as.safety.get(`/api/spans/${id}`)).body;
    const pts = (await as.safety.get(`/api/structures?lineId=${lineId}`)).body.items.filter((s: { id: string }) => s.id === span.fromStructureId || s.id === span.toStructureId);
    const lon = (pts[0].lon + pts[1].lon) / 2;
    const lat = (pts[0].lat + pts[1].lat) / 2;
    const d = 0.0005;
    const zone = await as.safety.post('/api/zones', {
      name: 'Weir pool nesting site',
      reason: 'Protected nesting season',
      severity: 'exclude',
      geometry: { type: 'Polygon', coordinates: [[[lon - d, lat - d], [lon + d, lat - d], [lon + d, lat + d], [lon - d, lat + d], [lon - d, lat - d]]] },
    });
    expect(zone.status).toBe(201);
    const res = await as.safety.post(`/api/spans/${id}/approve`, {});
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('Weir pool nesting site');
    expect((await as.safety.get(`/api/spans/${id}`)).body.status).toBe('submitted');
    // Returning it to the surveyor is still possible.
    expect((await as.safety.post(`/api/spans/${id}/return`, { reason: 'Inside the nesting-season exclude zone; pick another span' })).status).toBe(200);
  });

  it('when a photo is added to the span, then the span history shows it next to the span changes', async () => {
    const id = await submittedSpan();
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#7a8f6a' } }).jpeg().toBuffer();
    const up = await as.surveyor.upload('/api/photos').field('spanId', id).attach('photo', jpeg, { filename: 'perch.jpg', contentType: 'image/jpeg' });
    expect(up.status).toBe(201);
    const entries = await history(as.safety, id);
    expect(entries[0].action).toBe('photo.upload');
    expect(entries[0].after.spanId).toBe(id);
    expect(entries.map((e) => e.action)).toContain('span.submit');
  });

  it('when any signed-in role asks for a span history, then it gets it; an unknown span is 404; anonymous 401', async () => {
    const id = await submittedSpan();
    for (const role of ROLES) expect((await as[role].get(`/api/audit/spans/${id}`)).status).toBe(200);
    expect((await as.planner.get('/api/audit/spans/no-such-span')).status).toBe(404);
    expect((await t.client().get(`/api/audit/spans/${id}`)).status).toBe(401);
  });
});
