// Writes that may be retried: the Idempotency-Key contract on creating POSTs.
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { LINE_69, completeSpan } from './inventory-fixtures.ts';
import { Structure } from '../../server/modules/inventory/structure.entity.ts';
import { Span } from '../../server/modules/inventory/span.entity.ts';
import { Photo } from '../../server/modules/photos/photo.entity.ts';
import { IdempotencyKey } from '../../server/modules/idempotency/idempotency-key.entity.ts';
import { sweepIdempotencyKeys } from '../../server/http/idempotency.ts';

let t: TestApp;
let surveyor: Client;
let lineId: string;

const structureBody = (lon: number) => ({ lineId, lat: -30.2, lon, kind: 'pole', attachmentHeightM: 14 });
const count = (entity: any, where: object) => t.orm.em.fork().count(entity, where);

beforeAll(async () => {
  t = await makeTestApp({ uploadsDir: `tmp/test-uploads/idem-${process.pid}` });
  surveyor = await t.as('surveyor');
  const line = await surveyor.post('/api/lines', { ...LINE_69, name: 'Retry Ridge 69 kV' });
  expect(line.status).toBe(201);
  lineId = line.body.id;
});
afterAll(() => t.close());

describe('Idempotency-Key on creating POSTs', () => {
  it('when the same key and body are sent twice, then one structure exists and both answers are the same', async () => {
    const body = structureBody(-130.31);
    const a = await surveyor.post('/api/structures', body).set('Idempotency-Key', 'structure-once-1');
    const b = await surveyor.post('/api/structures', body).set('Idempotency-Key', 'structure-once-1');
    expect(a.status).toBe(201);
    expect(b.status).toBe(201);
    expect(b.body).toEqual(a.body);
    expect(b.headers['idempotent-replayed']).toBe('true');
    expect(await count(Structure, { lineId, lon: -130.31 })).toBe(1);
  });

  it('when the body keys come in another order, then it is still the same request', async () => {
    const body = structureBody(-130.315);
    const reordered = Object.fromEntries(Object.entries(body).reverse());
    const a = await surveyor.post('/api/structures', body).set('Idempotency-Key', 'structure-order');
    const b = await surveyor.post('/api/structures', reordered).set('Idempotency-Key', 'structure-order');
    expect(b.body.id).toBe(a.body.id);
    expect(await count(Structure, { lineId, lon: -130.315 })).toBe(1);
  });

  it('when eight requests with one key arrive at the same moment, then one span is created and all get its answer', async () => {
    const s1 = await surveyor.post('/api/structures', structureBody(-130.32));
    const s2 = await surveyor.post('/api/structures', structureBody(-130.322));
    const body = completeSpan(lineId, s1.body.id, s2.body.id);
    const answers = await Promise.all(Array.from({ length: 8 }, () => surveyor.post('/api/spans', body).set('Idempotency-Key', 'span-parallel-1')));
    expect(answers.map((r) => r.status)).toEqual(Array(8).fill(201));
    expect(new Set(answers.map((r) => r.body.id)).size).toBe(1);
    expect(await count(Span, { fromStructureId: s1.body.id })).toBe(1);
  });

  it('when the same key comes with another body, then 409 names the header and nothing new is created', async () => {
    await surveyor.post('/api/structures', structureBody(-130.33)).set('Idempotency-Key', 'structure-other-body');
    const res = await surveyor.post('/api/structures', structureBody(-130.331)).set('Idempotency-Key', 'structure-other-body');
    expect(res.status).toBe(409);
    expect(res.body.error.issues[0].path).toBe('Idempotency-Key');
    expect(await count(Structure, { lineId, lon: -130.331 })).toBe(0);
  });

  it('when the same key is sent to another endpoint, then 409', async () => {
    await surveyor.post('/api/structures', structureBody(-130.335)).set('Idempotency-Key', 'structure-other-path');
    const res = await surveyor.post('/api/lines', { ...LINE_69, name: 'Other path line' }).set('Idempotency-Key', 'structure-other-path');
    expect(res.status).toBe(409);
  });

  it('when two users send the same key, then each gets a record of their own', async () => {
    const admin = await t.as('admin');
    const body = { ...LINE_69, name: 'Per user line' };
    const a = await surveyor.post('/api/lines', body).set('Idempotency-Key', 'line-per-user');
    const b = await admin.post('/api/lines', { ...body, name: 'Per user line 2' }).set('Idempotency-Key', 'line-per-user');
    expect(a.status).toBe(201);
    expect(b.status).toBe(201);
    expect(b.body.id).not.toBe(a.body.id);
  });

  it('when the key is empty, too long or not printable ASCII, then 400 names the header', async () => {
    for (const key of ['', 'k'.repeat(201), 'clé-é']) {
      const res = await surveyor.post('/api/structures', structureBody(-130.34)).set('Idempotency-Key', key);
      expect(res.status).toBe(400);
      expect(res.body.error.issues[0].path).toBe('Idempotency-Key');
    }
    const ok = await surveyor.post('/api/structures', structureBody(-130.34)).set('Idempotency-Key', 'k'.repeat(200));
    expect(ok.status).toBe(201);
    expect(await count(Structure, { lineId, lon: -130.34 })).toBe(1);
  });

  it('when the first request was refused (400), then the key is free and the corrected retry creates the record', async () => {
    const bad = await surveyor.post('/api/structures', { ...structureBody(-130.35), lat: 123 }).set('Idempotency-Key', 'structure-after-400');
    expect(bad.status).toBe(400);
    expect(await count(IdempotencyKey, { key: 'structure-after-400' })).toBe(0);
    const good = await surveyor.post('/api/structures', { ...structureBody(-130.35), lat: 123 }).set('Idempotency-Key', 'structure-after-400');
    expect(good.status).toBe(400);
  });

  it('when a key is older than 24 h, then the sweep removes it and the key may be used again', async () => {
    const body = structureBody(-130.36);
    const a = await surveyor.post('/api/structures', body).set('Idempotency-Key', 'structure-expired');
    const em = t.orm.em.fork();
    await em.nativeUpdate(IdempotencyKey, { key: 'structure-expired' }, { expiresAt: new Date(Date.now() - 1000) });
    expect(await sweepIdempotencyKeys(t.orm.em)).toBeGreaterThanOrEqual(1);
    expect(await count(IdempotencyKey, { key: 'structure-expired' })).toBe(0);
    // Keys younger than 24 h are kept by the sweep.
    expect(await count(IdempotencyKey, { key: 'structure-once-1' })).toBe(1);
    const b = await surveyor.post('/api/structures', body).set('Idempotency-Key', 'structure-expired');
    expect(b.status).toBe(201);
    expect(b.body.id).not.toBe(a.body.id);
  });

  it('when a submit is retried with its key, then the second answer is the first one instead of a 409', async () => {
    const s1 = await surveyor.post('/api/structures', structureBody(-130.37));
    const s2 = await surveyor.post('/api/structures', structureBody(-130.372));
    const span = await surveyor.post('/api/spans', completeSpan(lineId, s1.body.id, s2.body.id));
    const a = await surveyor.post(`/api/spans/${span.body.id}/submit`, {}).set('Idempotency-Key', 'submit-once');
    const b = await surveyor.post(`/api/spans/${span.body.id}/submit`, {}).set('Idempotency-Key', 'submit-once');
    expect(a.status).toBe(200);
    expect(b.status).toBe(200);
    expect(b.body.version).toBe(a.body.version);
  });
});

describe('Idempotency-Key on photo uploads', () => {
  let jpeg: Buffer;
  beforeAll(async () => {
    jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 90, g: 140, b: 60 } } }).jpeg().toBuffer();
  });

  it('when an upload is retried with the same key (new multipart boundary), then one photo exists', async () => {
    const send = () => surveyor.upload('/api/photos').set('Idempotency-Key', 'photo-once-1').attach('photo', jpeg, 'field.jpg');
    const a = await send();
    const b = await send();
    expect(a.status).toBe(201);
    expect(b.status).toBe(201);
    expect(b.body.id).toBe(a.body.id);
    expect(await count(Photo, { id: a.body.id })).toBe(1);
  });

  it('when four uploads with one key arrive together, then one photo is stored', async () => {
    const before = await count(Photo, {});
    const answers = await Promise.all(
      Array.from({ length: 4 }, () => surveyor.upload('/api/photos').set('Idempotency-Key', 'photo-parallel').attach('photo', jpeg, 'field.jpg')),
    );
    expect(answers.map((r) => r.status)).toEqual([201, 201, 201, 201]);
    expect(new Set(answers.map((r) => r.body.id)).size).toBe(1);
    expect(await count(Photo, {})).toBe(before + 1);
    // One original, display and thumbnail in the store for the one photo, whichever store the app uses.
    const keys = (await t.storage.list!('photos/')).map((k) => k.key).filter((k) => k.startsWith(`photos/${answers[0].body.id}.`));
    expect(keys.sort()).toEqual([`photos/${answers[0].body.id}.display.jpg`, `photos/${answers[0].body.id}.original`, `photos/${answers[0].body.id}.thumb.jpg`]);
  });

  it('when the same key comes with another file, then 409 and no second photo', async () => {
    const other = await sharp({ create: { width: 32, height: 32, channels: 3, background: { r: 10, g: 10, b: 200 } } }).jpeg().toBuffer();
    await surveyor.upload('/api/photos').set('Idempotency-Key', 'photo-other').attach('photo', jpeg, 'field.jpg');
    const before = await count(Photo, {});
    const res = await surveyor.upload('/api/photos').set('Idempotency-Key', 'photo-other').attach('photo', other, 'field.jpg');
    expect(res.status).toBe(409);
    expect(await count(Photo, {})).toBe(before);
  });
});
