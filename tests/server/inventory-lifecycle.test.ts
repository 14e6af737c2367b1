import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { buildLine, completeSpan } from './inventory-fixtures.ts';
import { ROLES, type Role } from '../../shared/roles.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';

let t: TestApp;
let as: Record<Role, Client>;
let lineId: string;
let next = 0;

beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
  as = Object.fromEntries(await Promise.all(ROLES.map(async (r) => [r, await t.as(r)] as const))) as Record<Role, Client>;
  const built = await buildLine(as.surveyor, 2);
  lineId = built.line.id;
});

/** Two fresh structures about 190 m apart for each new span. */
async function structurePair(): Promise<[string, string]> {
  const i = next++;
  const ids: string[] = [];
  for (const k of [0, 1]) {
    const r = await as.surveyor.post('/api/structures', { lineId, lat: -30.25 - i * 0.001, lon: -130.4 + k * 0.002, kind: 'pole', attachmentHeightM: 13 });
    expect(r.status).toBe(201);
    ids.push(r.body.id);
  }
  return ids as [string, string];
}
afterAll(() => t.close());

type State = 'draft' | 'submitted' | 'approved' | 'returned' | 'suspended';

/** A fresh span walked to the state through the API by the right roles. */
async function spanIn(state: State) {
  const [a, b] = await structurePair();
  const created = await as.surveyor.post('/api/spans', completeSpan(lineId, a, b));
  expect(created.status).toBe(201);
  const id = created.body.id as string;
  if (state === 'draft') return created.body;
  expect((await as.surveyor.post(`/api/spans/${id}/submit`)).status).toBe(200);
  if (state === 'returned') return (await as.safety.post(`/api/spans/${id}/return`, { reason: 'Photo of the clearance is missing' })).body;
  if (state === 'submitted') return (await as.surveyor.get(`/api/spans/${id}`)).body;
  expect((await as.safety.post(`/api/spans/${id}/approve`)).status).toBe(200);
  if (state === 'approved') return (await as.surveyor.get(`/api/spans/${id}`)).body;
  return (await as.safety.post(`/api/spans/${id}/suspend`, { reason: 'Vegetation reported touching phase B' })).body;
}

const LEGAL: { name: string; from: State; to: State; role: Role; body?: object }[] = [
  { name: 'submit', from: 'draft', to: 'submitted', role: 'surveyor' },
  { name: 'submit', from: 'returned', to: 'submitted', role: 'surveyor' },
  { name: 'approve', from: 'submitted', to: 'approved', role: 'safety' },
  { name: 'return', from: 'submitted', to: 'returned', role: 'safety', body: { reason: 'Clearance reading looks wrong' } },
  { name: 'suspend', from: 'approved', to: 'suspended', role: 'safety', body: { reason: 'Crossing circuit being rebuilt' } },
  { name: 'reinstate', from: 'suspended', to: 'approved', role: 'safety' },
];

describe('span lifecycle: legal transitions', () => {
  it.each(LEGAL)('when the $role sends $name on a $from span, then 200 and the span is $to', async ({ name, from, to, role, body }) => {
    const span = await spanIn(from);
    const res = await as[role].post(`/api/spans/${span.id}/${name}`, body ?? {});
    expect(res.status).toBe(200);
    expect(res.body.status).toBe(to);
    expect(res.body.version).toBe(span.version + 1);
    if (name === 'return') expect(res.body.returnReason).toBe('Clearance reading looks wrong');
    if (name === 'suspend') expect(res.body.suspendReason).toBe('Crossing circuit being rebuilt');
    if (name === 'approve' || name === 'reinstate') expect(res.body.approvedById).toEqual(expect.any(String));
    const entries = await t.orm.em.fork().find(AuditEntry, { recordType: 'span', recordId: span.id, action: `span.${name}` }, { orderBy: { id: 'desc' } });
    expect(entries[0]!.actorId).toEqual(expect.any(String));
    expect((entries[0]!.before as any).status).toBe(from);
    expect((entries[0]!.after as any).status).toBe(to);
  });
});

describe('span lifecycle: wrong role → 403, record unchanged', () => {
  const cases = LEGAL.flatMap((l) => ROLES.filter((r) => r !== l.role).map((role) => ({ ...l, wrong: role })));
  it.each(cases)('when the $wrong role sends $name on a $from span, then 403', async ({ name, from, wrong, body }) => {
    const span = await spanIn(from);
    const res = await as[wrong].post(`/api/spans/${span.id}/${name}`, body ?? {});
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
    const after = await as.planner.get(`/api/spans/${span.id}`);
    expect(after.body.status).toBe(from);
    expect(after.body.version).toBe(span.version);
  });

  it('when nobody is signed in, then 401', async () => {
    const span = await spanIn('submitted');
    expect((await t.client().post(`/api/spans/${span.id}/approve`)).status).toBe(401);
  });
});

describe('span lifecycle: illegal state → 409', () => {
  const ILLEGAL: { name: string; from: State; role: Role; body?: object }[] = [
    { name: 'submit', from: 'submitted', role: 'surveyor' },
    { name: 'submit', from: 'approved', role: 'surveyor' },
    { name: 'submit', from: 'suspended', role: 'surveyor' },
    { name: 'approve', from: 'draft', role: 'safety' },
    { name: 'approve', from: 'returned', role: 'safety' },
    { name: 'approve', from: 'approved', role: 'safety' },
    { name: 'approve', from: 'suspended', role: 'safety' },
    { name: 'return', from: 'draft', role: 'safety', body: { reason: 'x' } },
    { name: 'return', from: 'approved', role: 'safety', body: { reason: 'x' } },
    { name: 'suspend', from: 'submitted', role: 'safety', body: { reason: 'x' } },
    { name: 'suspend', from: 'draft', role: 'safety', body: { reason: 'x' } },
    { name: 'suspend', from: 'suspended', role: 'safety', body: { reason: 'x' } },
    { name: 'reinstate', from: 'approved', role: 'safety' },
    { name: 'reinstate', from: 'returned', role: 'safety' },
  ];
  it.each(ILLEGAL)('when the $role sends $name on a $from span, then 409 and nothing changes', async ({ name, from, role, body }) => {
    const span = await spanIn(from);
    const res = await as[role].post(`/api/spans/${span.id}/${name}`, body ?? {});
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('conflict');
    const after = await as.planner.get(`/api/spans/${span.id}`);
    expect(after.body.status).toBe(from);
    expect(after.body.version).toBe(span.version);
  });
});

describe('span lifecycle: reasons and completeness', () => {
  it.each(['return', 'suspend'])('when safety sends %s without a reason, then 400 names reason', async (name) => {
    const span = await spanIn(name === 'return' ? 'submitted' : 'approved');
    for (const body of [{}, { reason: '   ' }]) {
      const res = await as.safety.post(`/api/spans/${span.id}/${name}`, body);
      expect(res.status).toBe(400);
      expect(res.body.error.issues.map((i: any) => i.path)).toContain('reason');
    }
  });

  it('when a draft lacks clearance, terrain and survey date, then submit is 400 naming each', async () => {
    const [a, b] = await structurePair();
    const created = await as.surveyor.post('/api/spans', { lineId, fromStructureId: a, toStructureId: b, conductor: { codeWord: 'Linnet' } });
    expect(created.status).toBe(201);
    const res = await as.surveyor.post(`/api/spans/${created.body.id}/submit`);
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((x: any) => x.path).sort()).toEqual(['clearanceM', 'surveyDate', 'terrain']);
    expect((await as.surveyor.get(`/api/spans/${created.body.id}`)).body.status).toBe('draft');
  });

  it('when a returned span is resubmitted, then the reason is cleared but stays in the history', async () => {
    const span = await spanIn('returned');
    expect(span.returnReason).toBe('Photo of the clearance is missing');
    const res = await as.surveyor.post(`/api/spans/${span.id}/submit`);
    expect(res.body.returnReason).toBeNull();
    const entries = await t.orm.em.fork().find(AuditEntry, { recordId: span.id, action: 'span.return' });
    expect((entries[0]!.after as any).reason).toBe('Photo of the clearance is missing');
  });

  it('when a transition carries a stale version, then 409 with the saved record', async () => {
    const span = await spanIn('submitted');
    const res = await as.safety.post(`/api/spans/${span.id}/approve`, { version: span.version - 1 });
    expect(res.status).toBe(409);
    expect(res.body.error.current).toMatchObject({ id: span.id, status: 'submitted', version: span.version });
  });
});

describe('approval blocked by an active exclude zone', () => {
  it('when the span crosses an exclude zone, then approve is 409 naming the zone; outside a caution zone it passes', async () => {
    const span = await spanIn('submitted');
    const got = await as.safety.get(`/api/structures/${span.fromStructureId}`);
    const { lat, lon } = got.body;
    const square = (d: number) => ({ type: 'Polygon', coordinates: [[[lon - d, lat - d], [lon + d, lat - d], [lon + d, lat + d], [lon - d, lat + d], [lon - d, lat - d]]] });
    const zone = await as.safety.post('/api/zones', { name: 'Nesting season cliff', reason: 'Raptor nest under the span', severity: 'exclude', geometry: square(0.001) });
    expect(zone.status).toBe(201);
    const res = await as.safety.post(`/api/spans/${span.id}/approve`);
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain('Nesting season cliff');
    expect(res.body.error.issues[0].path).toBe('zones');
    expect((await as.safety.get(`/api/spans/${span.id}`)).body.status).toBe('submitted');
    // The same zone as caution does not block.
    const zoneId = zone.body.id ?? zone.body.properties?.id;
    const upd = await as.safety.patch(`/api/zones/${zoneId}`, { severity: 'caution', version: zone.body.version ?? zone.body.properties?.version ?? 1 });
    expect(upd.status).toBe(200);
    expect((await as.safety.post(`/api/spans/${span.id}/approve`)).status).toBe(200);
  });
});
