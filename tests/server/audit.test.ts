import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from './helpers.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
  const em = t.orm.em.fork();
  const day = (d: string) => new Date(`${d}T12:00:00Z`);
  for (let i = 0; i < 7; i++) {
    em.persist(em.create(AuditEntry, { at: day(`2026-10-0${i + 1}`), actorId: null, action: i % 2 ? 'crew.update' : 'crew.create', recordType: 'crew', recordId: `c${i}`, before: null, after: { name: `Crew ${i}` } }));
  }
  em.persist(em.create(AuditEntry, { at: day('2026-10-03'), actorId: null, action: 'line.update', recordType: 'line', recordId: 'l1', before: { name: 'A' }, after: { name: 'B' } }));
  await em.flush();
});
afterAll(() => t.close());

describe('audit log queries', () => {
  it('when the log is paged, then pages hold the newest entries first and the total counts them all', async () => {
    const admin = await t.as('admin');
    const p1 = await admin.get('/api/audit?recordType=crew&pageSize=3');
    expect(p1.body.total).toBe(7);
    expect(p1.body.items.map((e: { recordId: string }) => e.recordId)).toEqual(['c6', 'c5', 'c4']);
    const p3 = await admin.get('/api/audit?recordType=crew&pageSize=3&page=3');
    expect(p3.body.items.map((e: { recordId: string }) => e.recordId)).toEqual(['c0']);
  });

  it('when the filter names a date range or an action family, then only those entries come back', async () => {
    const admin = await t.as('admin');
    const range = await admin.get('/api/audit?recordType=crew&from=2026-10-02&to=2026-10-04');
    expect(range.body.items.map((e: { recordId: string }) => e.recordId)).toEqual(['c3', 'c2', 'c1']);
    const family = await admin.get('/api/audit?action=crew.');
    expect(family.body.total).toBe(7);
    const exact = await admin.get('/api/audit?action=crew.update');
    expect(exact.body.total).toBe(3);
    expect((await admin.get('/api/audit?page=0')).status).toBe(400);
  });

  it('when safety reads the log, then line entries show and crew entries do not; the facets follow the same rule', async () => {
    const safety = await t.as('safety');
    const res = await safety.get('/api/audit');
    expect(res.body.items.map((e: { recordType: string }) => e.recordType)).toEqual(['line']);
    const facets = (await safety.get('/api/audit/facets')).body;
    expect(facets.recordTypes).toEqual(['line']);
    expect(facets.actions).toEqual(['line.update']);
  });
});
