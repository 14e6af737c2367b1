// The real server (`npm start`'s entry, a child process) with STORAGE_URL naming a bucket on a local S3 fake: photos
// go to the bucket, health says the store answers, the start-up sweep removes files an interrupted upload left in the
// bucket, and a server whose store cannot be reached refuses to start and says why.
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { newDataDir, signIn, startServer, type ChildServer } from './child-server.ts';
import { startS3Fake, S3_FAKE_CREDENTIALS, type S3Fake } from './s3-fake.ts';
import { storageFromConfig } from '../../server/modules/photos/storage.ts';
import { freePort } from '../../scripts/free-port.ts';

let fake: S3Fake;
const dirs: string[] = [];
const running: ChildServer[] = [];
const s3Env = (endpoint: string) => ({
  STORAGE_URL: `s3://${fake.bucket}/server`,
  S3_ENDPOINT: endpoint,
  AWS_ACCESS_KEY_ID: S3_FAKE_CREDENTIALS.accessKeyId,
  AWS_SECRET_ACCESS_KEY: S3_FAKE_CREDENTIALS.secretAccessKey,
  AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true',
});
const bucket = () =>
  storageFromConfig({ uploadsDir: '', storageUrl: `s3://${fake.bucket}/server`, s3Endpoint: fake.endpoint, s3Region: null, s3ForcePathStyle: null, s3Credentials: S3_FAKE_CREDENTIALS });

beforeAll(async () => {
  fake = await startS3Fake();
});
afterAll(async () => {
  for (const s of running) if (s.proc.exitCode === null) s.proc.kill('SIGKILL');
  for (const d of dirs) fs.rmSync(d, { recursive: true, force: true });
  await fake?.close();
});

describe('a server with its files in a bucket', () => {
  it('when photos are uploaded and the server restarts after a crash, then the photos are served from the bucket and only the left-over files are swept', async () => {
    const dir = newDataDir();
    dirs.push(dir);
    let s = await startServer(dir, s3Env(fake.endpoint));
    running.push(s);
    expect(s.log()).toMatch(/files in s3:\/\/roostline-test\/server/);
    const headers = await signIn(s.baseUrl, 'surveyor');
    const jpeg = await sharp({ create: { width: 320, height: 240, channels: 3, background: { r: 40, g: 90, b: 160 } } }).jpeg().toBuffer();
    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'p.jpg');
    const up = await fetch(`${s.baseUrl}/api/photos`, { method: 'POST', headers, body: form });
    expect(up.status).toBe(201);
    const { id } = (await up.json()) as { id: string };
    expect(fs.existsSync(path.join(dir, 'uploads', 'photos'))).toBe(false);
    const details = await (await fetch(`${s.baseUrl}/api/health/details`)).json();
    expect(details.storage).toEqual({ kind: 's3', reachable: true });

    // A crash between writing an upload's files and committing its row leaves files no row names.
    await bucket().put('photos/leftover.original', jpeg, 'image/jpeg');
    s.proc.kill('SIGKILL');
    await s.exited;
    s = await startServer(dir, s3Env(fake.endpoint));
    running.push(s);
    const keys = (await bucket().list!('photos/')).map((k) => k.key).sort();
    expect(keys).toEqual([`photos/${id}.display.jpg`, `photos/${id}.original`, `photos/${id}.thumb.jpg`]);
    const h2 = await signIn(s.baseUrl, 'planner');
    const original = await fetch(`${s.baseUrl}/api/photos/${id}/original`, { headers: h2 });
    expect(original.status).toBe(200);
    expect(Buffer.from(await original.arrayBuffer()).equals(jpeg)).toBe(true);
    s.proc.kill('SIGTERM');
    expect(await s.exited).toBe(0);
  }, 180_000);

  it('when the store cannot be reached, then the server does not start and says which store and what to check', async () => {
    const dir = newDataDir();
    dirs.push(dir);
    const nobody = `http://127.0.0.1:${await freePort()}`;
    const err = await startServer(dir, s3Env(nobody)).then(
      () => null,
      (e: Error) => e,
    );
    expect(err?.message).toMatch(/server exited early/);
    expect(err?.message).toMatch(/file store s3:\/\/roostline-test\/server cannot be reached.*STORAGE_URL, S3_ENDPOINT and the credentials/);
  }, 120_000);
});
