// The one store of uploaded files a running app uses, from its configuration: the local folder by default,
// an S3-compatible bucket with STORAGE_URL=s3://bucket/prefix.
import type { AppConfig } from '../../env.ts';
import { localDiskStorage, type PhotoStorage } from './photo.storage.ts';
import { parseS3Url, s3Storage } from './photo.storage.s3.ts';

export type StorageConfig = Pick<AppConfig, 'uploadsDir' | 'storageUrl' | 's3Endpoint' | 's3Region' | 's3ForcePathStyle' | 's3Credentials'>;

export interface AppStorage extends PhotoStorage {
  /** For logs and messages: the folder or s3://bucket/prefix. */
  describe: string;
  kind: 'local' | 's3';
  /** Throws when the store cannot be reached (used by health and at start-up). */
  check: () => Promise<void>;
}

export function storageFromConfig(config: StorageConfig): AppStorage {
  if (!config.storageUrl) {
    return { ...localDiskStorage(config.uploadsDir), describe: config.uploadsDir, kind: 'local', check: async () => undefined };
  }
  const s3 = s3Storage({
    ...parseS3Url(config.storageUrl),
    endpoint: config.s3Endpoint,
    region: config.s3Region,
    forcePathStyle: config.s3ForcePathStyle ?? undefined,
    credentials: config.s3Credentials,
  });
  return { put: s3.put, get: s3.get, delete: s3.delete, list: s3.list, describe: s3.describe, kind: 's3', check: s3.check };
}
