// A local S3-compatible server for tests (s3rver: an in-process HTTP server keeping objects in a temp folder), so
// the object-store path runs with no hosted service and no network beyond loopback.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import S3rver from 's3rver';
import { freePort } from '../../scripts/free-port.ts';

/** s3rver's fixed credentials: it checks every request's signature against them. */
export const S3_FAKE_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' };
export const S3_FAKE_BUCKET = 'roostline-test';

export interface S3Fake {
  endpoint: string;
  bucket: string;
  dir: string;
  close: () => Promise<void>;
}

export async function startS3Fake(bucket = S3_FAKE_BUCKET): Promise<S3Fake> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'roostline-s3-'));
  const port = await freePort();
  const server = new S3rver({ address: '127.0.0.1', port, silent: true, directory: dir, configureBuckets: [{ name: bucket, configs: [] }] });
  await server.run();
  return {
    endpoint: `http://127.0.0.1:${port}`,
    bucket,
    dir,
    close: async () => {
      await server.close();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
