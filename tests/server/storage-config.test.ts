// The settings that choose the file store and the trusted proxies, read from the environment as `npm start` reads them.
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/env.ts';
import { parseS3Url } from '../../server/modules/photos/photo.storage.s3.ts';
import { storageFromConfig } from '../../server/modules/photos/storage.ts';

describe('file store settings', () => {
  it('when STORAGE_URL and the S3 variables are set, then the app uses that bucket and prefix with those keys', () => {
    const c = loadConfig({ STORAGE_URL: 's3://roostline-photos/harrow-vale/', S3_ENDPOINT: 'http://127.0.0.1:9000', S3_REGION: 'eu-west-1', AWS_ACCESS_KEY_ID: 'k', AWS_SECRET_ACCESS_KEY: 's' });
    expect(c).toMatchObject({ storageUrl: 's3://roostline-photos/harrow-vale/', s3Endpoint: 'http://127.0.0.1:9000', s3Region: 'eu-west-1', s3ForcePathStyle: null, s3Credentials: { accessKeyId: 'k', secretAccessKey: 's' } });
    const store = storageFromConfig(c);
    expect(store.kind).toBe('s3');
    expect(store.describe).toBe('s3://roostline-photos/harrow-vale');
    expect(parseS3Url('s3://roostline-photos')).toEqual({ bucket: 'roostline-photos', prefix: '' });
  });

  it('when STORAGE_URL is unset, then files stay in UPLOADS_DIR; a STORAGE_URL that is not s3:// is refused with the reason', () => {
    const c = loadConfig({ UPLOADS_DIR: '/srv/roostline/uploads' });
    expect(storageFromConfig(c)).toMatchObject({ kind: 'local', describe: '/srv/roostline/uploads' });
    expect(() => loadConfig({ STORAGE_URL: 'https://bucket.example/photos' })).toThrow(/STORAGE_URL must be an s3:\/\/bucket\/prefix address/);
    expect(() => parseS3Url('s3://A_Bad_Bucket/x')).toThrow(/bucket: 3–63 lower-case letters/);
  });

  it('when TRUST_PROXY is given as subnets, a hop count or a word, then Express gets it in its own form', () => {
    expect(loadConfig({}).trustProxy).toBe('loopback');
    expect(loadConfig({ TRUST_PROXY: '10.0.0.0/8,fd00::/8' }).trustProxy).toBe('10.0.0.0/8,fd00::/8');
    expect(loadConfig({ TRUST_PROXY: '2' }).trustProxy).toBe(2);
    expect(loadConfig({ TRUST_PROXY: 'false' }).trustProxy).toBe(false);
  });
});
