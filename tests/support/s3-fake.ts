/**
 * A local S3-compatible server for tests: s3rver 3.7.1 (speaks the S3 REST protocol, checks
 * SigV4 signatures) on a free loopback port, storing into a temp folder removed at close.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import S3rver from 's3rver';
import type { S3StoreOptions } from '../../server/storage/s3-store.ts';

export interface S3Fake {
  options: S3StoreOptions;
  close(): Promise<void>;
}

/** s3rver accepts only its fixed default credentials. */
const ACCESS_KEY = 'S3RVER';

export async function startS3Fake(bucket = 'orderly-frames'): Promise<S3Fake> {
  const directory = mkdtempSync(join(tmpdir(), 'orderly-s3-'));
  const server = new S3rver({ address: '127.0.0.1', port: 0, silent: true, directory, configureBuckets: [{ name: bucket, configs: [] }] });
  const { port } = await server.run();
  return {
    options: { endpoint: `http://127.0.0.1:${port}`, bucket, region: 'us-east-1', accessKeyId: ACCESS_KEY, secretAccessKey: ACCESS_KEY, forcePathStyle: true },
    async close() {
      await server.close();
      rmSync(directory, { recursive: true, force: true });
    },
  };
}
