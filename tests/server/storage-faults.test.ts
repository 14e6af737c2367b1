import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { makeTestApp, type TestApp } from './helpers.ts';
import { startS3Fake, S3_FAKE_CREDENTIALS, type S3Fake } from './s3-fake.ts';
import { Photo } from '../../server/modules/photos/photo.entity.ts';

// An uploads folder the server cannot write to. Permission bits do not bind root (who runs CI containers), so
// there the folder is one the kernel refuses to anyone: a new entry under /sys (EPERM).
const asRoot = process.getuid?.() === 0;
const base = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-ro-'));
const uploadsDir = asRoot ? '/sys/roostline-no-uploads' : path.join(base, 'uploads');
let t: TestApp;
beforeAll(async () => {
  if (!asRoot) {
    fs.mkdirSync(uploadsDir);
    fs.chmodSync(uploadsDir, 0o555);
  }
  t = await makeTestApp({ uploadsDir });
});
afterAll(async () => {
  await t?.close();
  if (!asRoot) fs.chmodSync(uploadsDir, 0o755);
  fs.rmSync(base, { recursive: true, force: true });
});

describe('storage faults', () => {
  // The uploads folder is the local store's; the PostgreSQL run keeps photos in the S3 fake, which has no folder to refuse.
  it.skipIf(process.env.ROOSTLINE_TEST_STORAGE === 's3')('when the uploads folder cannot be written, then the uploader gets 503 in words, no photo row is saved and reads go on', async () => {
    const surveyor = await t.as('surveyor');
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 1, g: 2, b: 3 } } }).jpeg().toBuffer();
    const res = await surveyor.upload('/api/photos').attach('photo', jpeg, { filename: 'a.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('unavailable');
    expect(res.body.error.message).toMatch(/cannot write to its storage.*not saved/);
    expect(res.body.error.message).not.toMatch(/EPERM|EACCES|EROFS/);
    expect(await t.orm.em.fork().count(Photo)).toBe(0);
    expect((await surveyor.get('/api/spans')).status).toBe(200);
    expect((await surveyor.get('/api/photos')).status).toBe(200);
    const health = await t.client().get('/api/health');
    expect(health.status).toBe(200);
    expect(health.body.status).toBe('ok');
  });
});

describe('object store faults', () => {
  let s: TestApp;
  let fake: S3Fake;
  beforeAll(async () => {
    // A bucket on a local S3 fake that is then stopped: every call to the store meets a refused connection.
    fake = await startS3Fake();
    s = await makeTestApp({ storageUrl: `s3://${fake.bucket}/faults`, s3Endpoint: fake.endpoint, s3Credentials: S3_FAKE_CREDENTIALS });
    await fake.close();
  });
  afterAll(async () => {
    await s?.close();
  });

  it('when the object store cannot be reached, then an upload answers 503 in words, no photo row is saved and reads go on', async () => {
    const surveyor = await s.as('surveyor');
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 1, g: 2, b: 3 } } }).jpeg().toBuffer();
    const res = await surveyor.upload('/api/photos').attach('photo', jpeg, { filename: 'a.jpg', contentType: 'image/jpeg' });
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('unavailable');
    expect(res.body.error.message).toMatch(/cannot write to its storage.*not saved/);
    expect(res.body.error.message).not.toMatch(/ECONNREFUSED|S3|127\.0\.0\.1/);
    expect(await s.orm.em.fork().count(Photo)).toBe(0);
    expect((await surveyor.get('/api/photos')).status).toBe(200);
    expect((await surveyor.get('/api/spans')).status).toBe(200);
    // Health stays 200 (the database answers; a load balancer should keep the process) and says what is wrong.
    const health = await s.client().get('/api/health');
    expect(health.status).toBe(200);
    expect(health.body.status).toBe('ok');
    expect(health.body.warnings).toEqual([expect.stringMatching(/photo store cannot be reached/)]);
    const details = await s.client().get('/api/health/details');
    expect(details.body.storage).toEqual({ kind: 's3', reachable: false });
  });
});
