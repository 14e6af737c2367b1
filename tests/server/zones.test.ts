import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from './helpers.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';
import { activeZonesForGeometry, registerZoneListener, type ZoneChange } from '../../server/modules/zones/zone.service.ts';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signInBurst: 1000 });
});
afterAll(() => t.close());

// A square of ~1.9 km × 2.2 km in the invented demo region.
const SQUARE = {
  type: 'Polygon',
  coordinates: [
    [
      [-130.32, -30.22],
      [-130.3, -30.22],
      [-130.3, -30.2],
      [-130.32, -30.2],
      [-130.32, -30.22],
    ],
  ],
};

const zoneBody = (over: Record<string, unknown> = {}) => ({ name: 'Substation yard', reason: 'Switching works near the yard', severity: 'exclude', geometry: SQUARE, ...over });

function issuePaths(res: { body: { error: { issues?: { path: string }[] } } }) {
  return (res.body.error.issues ?? []).map((i) => i.path);
}

describe('no-perch zones: roles', () => {
  it('when a safety officer posts a valid zone, then 201 returns a GeoJSON feature and GET lists it for every role', async () => {
    const safety = await t.as('safety');
    const res = await safety.post('/api/zones', zoneBody({ validFrom: '2026-01-01', validTo: '2030-12-31' }));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ type: 'Feature', geometry: SQUARE, properties: { name: 'Substation yard', severity: 'exclude', version: 1, active: true, validFrom: '2026-01-01', validTo: '2030-12-31' } });
    for (const role of ['surveyor', 'planner', 'admin', 'safety'] as const) {
      const list = await (await t.as(role)).get('/api/zones');
      expect(list.status).toBe(200);
      expect(list.body.type).toBe('FeatureCollection');
      expect(list.body.features.map((f: { id: string }) => f.id)).toContain(res.body.id);
    }
  });

  it.each(['surveyor', 'planner', 'admin'] as const)('when a %s tries to create, edit or delete a zone, then 403', async (role) => {
    const safety = await t.as('safety');
    const created = await safety.post('/api/zones', zoneBody({ name: `Zone kept from ${role}` }));
    const c = await t.as(role);
    expect((await c.post('/api/zones', zoneBody())).status).toBe(403);
    expect((await c.patch(`/api/zones/${created.body.id}`, { version: 1, name: 'x' })).status).toBe(403);
    expect((await c.delete(`/api/zones/${created.body.id}`)).status).toBe(403);
  });

  it('when nobody is signed in, then reading zones gives 401', async () => {
    expect((await t.client().get('/api/zones')).status).toBe(401);
  });
});

describe('no-perch zones: validation', () => {
  it('when the ring is not closed, then 400 names geometry.coordinates.0 and says so', async () => {
    const safety = await t.as('safety');
    const open = { type: 'Polygon', coordinates: [SQUARE.coordinates[0].slice(0, 4).concat([[-130.33, -30.21]])] };
    const res = await safety.post('/api/zones', zoneBody({ geometry: open }));
    expect(res.status).toBe(400);
    expect(issuePaths(res)).toContain('geometry.coordinates.0');
    expect(JSON.stringify(res.body.error.issues)).toMatch(/not closed/);
  });

  it('when the ring has fewer than 4 positions, then 400 says it needs at least 4', async () => {
    const safety = await t.as('safety');
    const res = await safety.post('/api/zones', zoneBody({ geometry: { type: 'Polygon', coordinates: [[[-130.32, -30.22], [-130.3, -30.2], [-130.32, -30.22]]] } }));
    expect(res.status).toBe(400);
    expect(issuePaths(res)).toContain('geometry.coordinates.0');
    expect(JSON.stringify(res.body.error.issues)).toMatch(/at least 4 positions/);
  });

  it('when the polygon crosses itself (a bow tie), then 400 says it crosses itself', async () => {
    const safety = await t.as('safety');
    const bowTie = { type: 'Polygon', coordinates: [[[-130.32, -30.22], [-130.3, -30.2], [-130.3, -30.22], [-130.32, -30.2], [-130.32, -30.22]]] };
    const res = await safety.post('/api/zones', zoneBody({ geometry: bowTie }));
    expect(res.status).toBe(400);
    expect(issuePaths(res)).toContain('geometry.coordinates');
    expect(res.body.error.issues[0].message).toMatch(/crosses itself/);
  });

  it('when a longitude is out of range, the severity unknown, the name empty and the dates reversed, then 400 names each field', async () => {
    const safety = await t.as('safety');
    const bad = { type: 'Polygon', coordinates: [[[-190, -30.22], [-130.3, -30.22], [-130.3, -30.2], [-190, -30.22]]] };
    const res = await safety.post('/api/zones', zoneBody({ geometry: bad, severity: 'forbidden', name: ' ', validFrom: '2026-05-02', validTo: '2026-05-01' }));
    expect(res.status).toBe(400);
    expect(issuePaths(res)).toEqual(expect.arrayContaining(['geometry.coordinates.0.0.0', 'geometry.coordinates.0.3.0', 'severity', 'name']));
    const dates = await safety.post('/api/zones', zoneBody({ validFrom: '2026-05-02', validTo: '2026-05-01' }));
    expect(dates.status).toBe(400);
    expect(issuePaths(dates)).toEqual(['validTo']);
    expect(dates.body.error.issues[0].message).toMatch(/on or after/);
  });

  it('when the geometry is not a polygon at all, then 400 and nothing is saved', async () => {
    const safety = await t.as('safety');
    const before = (await safety.get('/api/zones')).body.features.length;
    for (const geometry of [null, 'square', { type: 'LineString', coordinates: [[0, 0], [1, 1]] }, { type: 'Polygon', coordinates: [] }]) {
      const res = await safety.post('/api/zones', zoneBody({ geometry }));
      expect(res.status).toBe(400);
      expect(issuePaths(res).some((p) => p.startsWith('geometry'))).toBe(true);
    }
    expect((await safety.get('/api/zones')).body.features.length).toBe(before);
  });
});

describe('no-perch zones: edits, audit and the service', () => {
  it('when a zone is edited with its version, then 200 and version 2; a stale version gives 409; delete gives 204; each change is audited', async () => {
    const safety = await t.as('safety');
    const created = (await safety.post('/api/zones', zoneBody({ name: 'Heron colony', severity: 'caution' }))).body;
    const edited = await safety.patch(`/api/zones/${created.id}`, { version: 1, severity: 'exclude', validTo: '2031-01-01' });
    expect(edited.status).toBe(200);
    expect(edited.body.properties).toMatchObject({ version: 2, severity: 'exclude', validTo: '2031-01-01', name: 'Heron colony' });
    const stale = await safety.patch(`/api/zones/${created.id}`, { version: 1, name: 'Late edit' });
    expect(stale.status).toBe(409);
    const reversed = await safety.patch(`/api/zones/${created.id}`, { version: 2, validFrom: '2032-01-01' });
    expect(reversed.status).toBe(400);
    expect(issuePaths(reversed)).toEqual(['validTo']);
    expect((await safety.delete(`/api/zones/${created.id}?version=1`)).status).toBe(409);
    expect((await safety.delete(`/api/zones/${created.id}`)).status).toBe(204);
    expect((await safety.get(`/api/zones/${created.id}`)).status).toBe(404);
    const em = t.orm.em.fork();
    const entries = await em.find(AuditEntry, { recordType: 'zone', recordId: created.id }, { orderBy: { id: 'asc' } });
    expect(entries.map((e) => e.action)).toEqual(['zone.create', 'zone.update', 'zone.delete']);
    expect(entries[1].before).toMatchObject({ severity: 'caution', version: 1 });
    expect(entries[1].after).toMatchObject({ severity: 'exclude', version: 2 });
  });

  it('when a zone changes, then registered listeners hear of it with the old and new polygons', async () => {
    const heard: ZoneChange[] = [];
    const off = registerZoneListener((_em, change) => {
      heard.push(change);
    });
    const safety = await t.as('safety');
    const created = (await safety.post('/api/zones', zoneBody({ name: 'Listener check' }))).body;
    await safety.delete(`/api/zones/${created.id}`);
    off();
    expect(heard.map((h) => [h.action, h.zoneId])).toEqual([
      ['create', created.id],
      ['delete', created.id],
    ]);
    expect(heard[1].before).toEqual(SQUARE);
  });

  it('when a line crosses an active zone, then activeZonesForGeometry finds it; outside its dates or away from it, not', async () => {
    const safety = await t.as('safety');
    const far = { type: 'Polygon', coordinates: [[[-130.1, -30.1], [-130.09, -30.1], [-130.09, -30.09], [-130.1, -30.1]]] };
    const a = (await safety.post('/api/zones', zoneBody({ name: 'Service check A', geometry: far }))).body;
    const b = (await safety.post('/api/zones', zoneBody({ name: 'Service check B', geometry: far, severity: 'caution', validFrom: '2027-03-01', validTo: '2027-03-31' }))).body;
    const crossing = { type: 'LineString' as const, coordinates: [[-130.095, -30.105], [-130.095, -30.08]] };
    const away = { type: 'LineString' as const, coordinates: [[-130.2, -30.3], [-130.19, -30.3]] };
    const em = t.orm.em.fork();
    const now = (await activeZonesForGeometry(em, crossing, new Date('2026-06-01T12:00:00Z'))).map((z) => z.id);
    expect(now).toContain(a.id);
    expect(now).not.toContain(b.id);
    const march = (await activeZonesForGeometry(em, crossing, new Date('2027-03-31T23:00:00Z'))).map((z) => z.id);
    expect(march).toEqual(expect.arrayContaining([a.id, b.id]));
    const excludeOnly = (await activeZonesForGeometry(em, crossing, new Date('2027-03-15T00:00:00Z'), { severity: 'exclude' })).map((z) => z.id);
    expect(excludeOnly).toContain(a.id);
    expect(excludeOnly).not.toContain(b.id);
    expect((await activeZonesForGeometry(em, away)).map((z) => z.id)).not.toContain(a.id);
  });
});
