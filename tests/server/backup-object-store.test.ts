// Backup and restore when the files live in an S3 bucket (STORAGE_URL) and the database is the SQLite file: the
// backup folder gets the database and every photo and document file from the bucket; a restore puts them back
// into a bucket and the restored app serves them byte for byte. The store is a local S3 fake (s3rver).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type TestApp } from './helpers.ts';
import { startS3Fake, S3_FAKE_CREDENTIALS, type S3Fake } from './s3-fake.ts';
import { LINE_69 } from './inventory-fixtures.ts';
import { createBackup, restoreBackup, verifyBackup } from '../../server/backup/backup.ts';
import { storageFromConfig } from '../../server/modules/photos/storage.ts';

let fake: S3Fake;
let dir: string;
const bucketAt = (prefix: string) => ({ storageUrl: `s3://${fake.bucket}/${prefix}`, s3Endpoint: fake.endpoint, s3Credentials: S3_FAKE_CREDENTIALS });
const bytesOf = (res: { body: Buffer }) => Buffer.from(res.body);

beforeAll(async () => {
  fake = await startS3Fake();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-backup-s3-'));
});
afterAll(async () => {
  await fake?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('backup and restore with an object store', () => {
  let t: TestApp;
  afterAll(async () => t?.close());

  it('when the files are in a bucket, then the backup holds them, verifies, and a restore into a bucket serves them byte for byte', async () => {
    const databasePath = path.join(dir, 'live.sqlite');
    t = await makeTestApp({ databasePath, databaseUrl: null, ...bucketAt('live') });
    const [surveyor, safety] = await Promise.all([t.as('surveyor'), t.as('safety')]);
    const jpegs = await Promise.all([30, 150].map((g) => sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 200, g, b: 40 } } }).jpeg().toBuffer()));
    const ids: string[] = [];
    for (const jpeg of jpegs) ids.push((await surveyor.upload('/api/photos').attach('photo', jpeg, { filename: 'p.jpg', contentType: 'image/jpeg' })).body.id);
    const line = await surveyor.post('/api/lines', LINE_69);
    const permission = await safety.post(`/api/lines/${line.body.id}/permissions`, { reference: 'HV-BK-1', validFrom: '2026-01-01', validTo: '2027-12-31' });
    const scan = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#c8a24a' } }).png().toBuffer();
    const doc = await safety.upload(`/api/lines/${line.body.id}/permissions/${permission.body.id}/document`).attach('document', scan, 'scan.png');
    expect(doc.status).toBe(200);
    const originals = await Promise.all(ids.map(async (id) => bytesOf(await surveyor.get(`/api/photos/${id}/original`).buffer(true))));
    // Nothing of it is in the uploads folder: the bucket is the only copy.
    expect(fs.existsSync(path.join(t.config.uploadsDir, 'photos', `${ids[0]}.original`))).toBe(false);

    const out = path.join(dir, 'backup-1');
    const manifest = await createBackup({ databasePath, storage: t.storage, outDir: out });
    expect(manifest.database.rows.photos).toBe(2);
    const keys = manifest.files.map((f) => f.key);
    for (const id of ids) expect(keys).toEqual(expect.arrayContaining([`photos/${id}.original`, `photos/${id}.display.jpg`, `photos/${id}.thumb.jpg`]));
    expect(keys.filter((k) => k.startsWith('documents/'))).toHaveLength(1);
    expect((await verifyBackup(out)).problems).toEqual([]);
    await t.close();

    const restoredPath = path.join(dir, 'restored.sqlite');
    const target = bucketAt('restored');
    await restoreBackup({ from: out, databasePath: restoredPath, uploadsDir: path.join(dir, 'unused-uploads'), storage: storageFromConfig({ ...target, uploadsDir: '', s3Region: null, s3ForcePathStyle: null }) });
    expect(fs.existsSync(path.join(dir, 'unused-uploads'))).toBe(false);

    t = await makeTestApp({ databasePath: restoredPath, databaseUrl: null, ...target }, { demoUsers: false });
    const planner = await t.as('planner');
    for (const [i, id] of ids.entries()) {
      const res = await planner.get(`/api/photos/${id}/original`).buffer(true);
      expect(res.status).toBe(200);
      expect(bytesOf(res).equals(originals[i])).toBe(true);
      expect((await planner.get(`/api/photos/${id}/thumbnail`)).status).toBe(200);
    }
    const restoredDoc = await planner.get(`/api/lines/${line.body.id}/permissions/${permission.body.id}/document`).buffer(true);
    expect(restoredDoc.status).toBe(200);
    expect(bytesOf(restoredDoc).equals(scan)).toBe(true);
  }, 120_000);
});
