// Photo bytes in an S3-compatible object store (AWS S3, MinIO, Ceph RGW, Garage, a provider's "S3 API"), chosen by
// STORAGE_URL=s3://bucket/prefix. The same four calls as the local folder; downloads still go through the server
// (streamed from the store to the client), so every file keeps the API's permission check, ETag and headers.
import type { Readable } from 'node:stream';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  ListObjectsV2Command,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { checkKey, type PhotoStorage, type StoredKey } from './photo.storage.ts';

export interface S3Location {
  bucket: string;
  /** Folder-like prefix inside the bucket, without slashes at either end; '' for the bucket's root. */
  prefix: string;
}

/** `s3://bucket` or `s3://bucket/some/prefix` → bucket and prefix; anything else throws with the reason. */
export function parseS3Url(url: string): S3Location {
  const m = /^s3:\/\/([a-z0-9][a-z0-9.-]{1,61}[a-z0-9])(\/.*)?$/.exec(url);
  if (!m) throw new Error(`STORAGE_URL must look like s3://bucket/prefix (bucket: 3–63 lower-case letters, digits, dots, hyphens); got ${url}`);
  const prefix = (m[2] ?? '').replace(/^\/+|\/+$/g, '');
  if (prefix && !/^[A-Za-z0-9._\-/]+$/.test(prefix)) throw new Error(`STORAGE_URL prefix may hold letters, digits, . _ - and /; got ${prefix}`);
  return { bucket: m[1], prefix };
}

export interface S3Options extends S3Location {
  /** S3_ENDPOINT, e.g. http://127.0.0.1:9000; unset = the AWS endpoint of the region. */
  endpoint?: string | null;
  /** S3_REGION (else AWS_REGION); most non-AWS stores accept any, 'us-east-1' when unset. */
  region?: string | null;
  /** S3_FORCE_PATH_STYLE: bucket in the path (http://host/bucket/key), which most self-hosted stores need. */
  forcePathStyle?: boolean;
  /** Explicit keys; unset = the SDK's own chain (AWS_ACCESS_KEY_ID/AWS_SECRET_ACCESS_KEY, a profile, an instance role). */
  credentials?: { accessKeyId: string; secretAccessKey: string } | null;
}

/** Objects at or above this size go up as a multipart upload in parts of this size (S3's smallest part is 5 MiB). */
const PART_BYTES = 8 * 1024 * 1024;

/**
 * The store could not be reached or refused the bucket (network error, 5xx, access denied, no such bucket): one
 * error with a code the error handler turns into 503 in words, the SDK's text kept as the cause for the log.
 */
export class StoreUnavailable extends Error {
  readonly code = 'ESTOREUNAVAILABLE';
  constructor(
    readonly write: boolean,
    cause: unknown,
  ) {
    super(`the object store did not answer: ${cause instanceof Error ? cause.message : String(cause)}`, { cause });
  }
}

const NETWORK = new Set(['ECONNREFUSED', 'ECONNRESET', 'ENOTFOUND', 'EAI_AGAIN', 'ETIMEDOUT', 'EPIPE', 'EHOSTUNREACH', 'ENETUNREACH']);
function unavailable(err: unknown): boolean {
  const code = String((err as { code?: unknown })?.code ?? '');
  if (NETWORK.has(code) || err instanceof AggregateError) return true;
  if (!(err instanceof S3ServiceException)) return (err as Error)?.name === 'TimeoutError';
  const status = err.$metadata?.httpStatusCode ?? 0;
  return status >= 500 || status === 403 || err.name === 'NoSuchBucket' || err.name === 'AccessDenied' || err.name === 'InvalidAccessKeyId' || err.name === 'SignatureDoesNotMatch';
}
const guard = async <T>(write: boolean, fn: () => Promise<T>): Promise<T> => {
  try {
    return await fn();
  } catch (err) {
    if (unavailable(err)) throw new StoreUnavailable(write, err);
    throw err;
  }
};

const notFound = (err: unknown) =>
  err instanceof S3ServiceException && (err.name === 'NoSuchKey' || err.name === 'NotFound' || err.$metadata?.httpStatusCode === 404);

export function s3Storage(opts: S3Options): PhotoStorage & { client: S3Client; describe: string; check: () => Promise<void> } {
  const client = new S3Client({
    endpoint: opts.endpoint || undefined,
    region: opts.region || 'us-east-1',
    forcePathStyle: opts.forcePathStyle ?? Boolean(opts.endpoint),
    credentials: opts.credentials ?? undefined,
    // Checksums only where S3 requires them: several S3-compatible stores reject the newer default CRC headers.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
  const Bucket = opts.bucket;
  const base = opts.prefix ? `${opts.prefix}/` : '';
  const objectKey = (key: string) => {
    checkKey(key);
    return base + key;
  };
  return {
    client,
    describe: `s3://${Bucket}${opts.prefix ? `/${opts.prefix}` : ''}`,
    /** Reachable and allowed: HeadBucket answers 200 (used by the health check). */
    async check() {
      await client.send(new HeadBucketCommand({ Bucket }));
    },
    put: (key, data, contentType) => guard(true, async () => {
      // lib-storage sends one PutObject when the body is smaller than a part, else a multipart upload, streaming a
      // Readable without holding it whole; S3 answers only once the object is stored durably.
      const upload = new Upload({
        client,
        params: { Bucket, Key: objectKey(key), Body: data, ContentType: contentType },
        partSize: PART_BYTES,
        queueSize: 2,
        leavePartsOnError: false,
      });
      await upload.done();
    }),
    get: (key) => guard(false, async () => {
      try {
        const res = await client.send(new GetObjectCommand({ Bucket, Key: objectKey(key) }));
        if (!res.Body) return null;
        return { body: res.Body as Readable, bytes: Number(res.ContentLength ?? 0) };
      } catch (err) {
        if (notFound(err)) return null;
        throw err;
      }
    }),
    // S3 answers 204 for a key that is not there.
    delete: (key) => guard(true, async () => void (await client.send(new DeleteObjectCommand({ Bucket, Key: objectKey(key) })))),
    list: (prefix) => guard(false, async () => {
      const folder = prefix.replace(/\/?$/, '/');
      const out: StoredKey[] = [];
      let token: string | undefined;
      do {
        const page = await client.send(new ListObjectsV2Command({ Bucket, Prefix: base + folder, ContinuationToken: token, MaxKeys: 1000 }));
        for (const o of page.Contents ?? []) {
          if (!o.Key) continue;
          const key = o.Key.slice(base.length);
          // Only direct children, as the local folder lists them.
          if (key.slice(folder.length).includes('/')) continue;
          out.push({ key, modifiedAt: o.LastModified ?? new Date(0) });
        }
        token = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (token);
      return out;
    }),
  };
}
