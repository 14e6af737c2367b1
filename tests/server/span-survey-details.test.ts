// The lowest-clearance location on a span (validated against the span, exported, imported) and photo links of removed hazards.
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { buildLine } from './inventory-fixtures.ts';
import { Photo } from '../../server/modules/photos/photo.entity.ts';

let t: TestApp;
let surveyor: Client;
let built: Awaited<ReturnType<typeof buildLine>>;

beforeAll(async () => {
  t = await makeTestApp();
  surveyor = await t.as('surveyor');
  built = await buildLine(surveyor, 3);
});
afterAll(() => t.close());

describe('lowest-clearance location', () => {
  it('when a location within the span is saved, then it comes back on the span and in the CSV export', async () => {
    const span = built.spans[0];
    const res = await surveyor.patch(`/api/spans/${span.id}`, { version: span.version, lowestClearanceAlongM: 61.5 });
    expect(res.status).toBe(200);
    expect(res.body.lowestClearanceAlongM).toBe(61.5);
    expect((await surveyor.get(`/api/spans/${span.id}`)).body.lowestClearanceAlongM).toBe(61.5);
    const csv = (await surveyor.get(`/api/spans/export.csv?lineId=${built.line.id}`)).text;
    const [header, ...rows] = csv.trim().split('\r\n');
    const col = header.split(',').indexOf('lowest_clearance_along_m');
    expect(col).toBeGreaterThan(-1);
    expect(rows.map((r) => r.split(',')[col])).toContain('61.5');
    const template = (await surveyor.get('/api/import/template.csv')).text;
    expect(template.split('\r\n')[0].split(',')).toContain('lowest_clearance_along_m');
  });

  it('when the location is beyond the span or negative, then 400 names the field and nothing changes', async () => {
    const span = (await surveyor.get(`/api/spans/${built.spans[1].id}`)).body;
    // Structures 0.002° of longitude apart at 30.2° S: about 193 m (direct computation), so 400 m is past the end.
    const beyond = await surveyor.patch(`/api/spans/${span.id}`, { version: span.version, lowestClearanceAlongM: 400 });
    expect(beyond.status).toBe(400);
    expect(beyond.body.error.issues.map((i: { path: string }) => i.path)).toEqual(['lowestClearanceAlongM']);
    const negative = await surveyor.patch(`/api/spans/${span.id}`, { version: span.version, lowestClearanceAlongM: -1 });
    expect(negative.status).toBe(400);
    expect(negative.body.error.issues.map((i: { path: string }) => i.path)).toEqual(['lowestClearanceAlongM']);
    const after = (await surveyor.get(`/api/spans/${span.id}`)).body;
    expect(after.version).toBe(span.version);
    expect(after.lowestClearanceAlongM).toBeNull();
  });
});

describe('photos of a removed hazard', () => {
  it('when the hazard a photo shows is removed from the span, then the photo stays on the span without the hazard link', async () => {
    const span = (await surveyor.get(`/api/spans/${built.spans[1].id}`)).body;
    const hazardId = span.hazards[0].id;
    const png = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#6a8' } }).png().toBuffer();
    const up = await surveyor.upload('/api/photos').attach('photo', png, { filename: 'trees.png', contentType: 'image/png' });
    expect(up.status).toBe(201);
    const linked = await surveyor.patch(`/api/photos/${up.body.id}`, { hazardId });
    expect(linked.status).toBe(200);
    const res = await surveyor.patch(`/api/spans/${span.id}`, { version: span.version, hazards: [] });
    expect(res.status).toBe(200);
    const photo = await t.orm.em.fork().findOneOrFail(Photo, { id: up.body.id });
    expect(photo.hazardId).toBeNull();
    expect(photo.spanId).toBe(span.id);
  });
});
