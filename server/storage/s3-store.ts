/**
 * Frame storage in an S3-compatible object store (AWS S3, MinIO, Ceph, Garage…), for several
 * machines sharing one set of frames. Keys are the sha256 of the bytes, sharded like the local
 * store (`ab/cd/<sha256>`) under an optional prefix, so a bucket can be copied to a folder and back.
 */
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  NoSuchKey,
  NotFound,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import type { FrameStore } from './frame-store.ts';

export interface S3StoreOptions {
  /** e.g. `http://127.0.0.1:9000`; omit for AWS itself. */
  endpoint?: string;
  bucket: string;
  region: string;
  accessKeyId: string;
  secretAccessKey: string;
  /** Path-style URLs (`endpoint/bucket/key`), which most self-hosted stores need. @default true */
  forcePathStyle?: boolean;
  /** Prepended to every object key, e.g. `frames/`. @default '' */
  prefix?: string;
}

const SHA256_HEX = /^[0-9a-f]{64}$/;

function objectKey(prefix: string, key: string): string {
  if (!SHA256_HEX.test(key)) throw new Error(`frame store key must be a lowercase sha256 hex string, got "${key}"`);
  return `${prefix}${key.slice(0, 2)}/${key.slice(2, 4)}/${key}`;
}

/** True for the "object is not there" answers of GET (NoSuchKey) and HEAD (404 without a body; HEAD cannot tell a missing bucket). */
function isMissing(error: unknown): boolean {
  if (error instanceof NoSuchKey || error instanceof NotFound) return true;
  // A wrong bucket is also a 404, but a configuration error that must not read as "not stored".
  return error instanceof S3ServiceException && error.$metadata.httpStatusCode === 404 && error.name !== 'NoSuchBucket';
}

/** Thrown by `get` for a key that is not stored, with the same message as the local store's. */
export class FrameNotStoredError extends Error {
  constructor(key: string) {
    super(`no stored frame file with sha256 ${key}`);
    this.name = 'FrameNotStoredError';
  }
}

export interface S3FrameStore extends FrameStore {
  /** The SDK client, for the caller to `destroy()` at shutdown. */
  readonly client: S3Client;
}

export function createS3Store(options: S3StoreOptions): S3FrameStore {
  const prefix = options.prefix ?? '';
  const client = new S3Client({
    endpoint: options.endpoint,
    region: options.region,
    forcePathStyle: options.forcePathStyle ?? true,
    credentials: { accessKeyId: options.accessKeyId, secretAccessKey: options.secretAccessKey },
    // Checksums on every PUT/GET (the SDK default since 3.729) are refused by some older
    // S3-compatible servers; the key is already the sha256 of the content and `get` checks length.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
  const bucket = options.bucket;
  return {
    client,
    async put(key, bytes) {
      await client.send(
        new PutObjectCommand({
          Bucket: bucket,
          Key: objectKey(prefix, key),
          Body: bytes,
          ContentLength: bytes.byteLength,
          ContentType: 'application/octet-stream',
        }),
      );
    },
    async get(key) {
      try {
        const out = await client.send(new GetObjectCommand({ Bucket: bucket, Key: objectKey(prefix, key) }));
        if (!out.Body) throw new FrameNotStoredError(key);
        return await out.Body.transformToByteArray();
      } catch (error) {
        if (isMissing(error)) throw new FrameNotStoredError(key);
        throw error;
      }
    },
    async has(key) {
      try {
        await client.send(new HeadObjectCommand({ Bucket: bucket, Key: objectKey(prefix, key) }));
        return true;
      } catch (error) {
        if (isMissing(error)) return false;
        throw error;
      }
    },
    async delete(key) {
      // S3 DELETE of a missing key succeeds, like the local store's delete.
      await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: objectKey(prefix, key) }));
    },
  };
}
