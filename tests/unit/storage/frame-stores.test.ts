/**
 * Both frame stores through one contract suite: the local folder, and the S3 store against
 * s3rver (a local S3-compatible server started here); then what only S3 has (prefix, bad keys,
 * bad bucket).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createLocalStore } from '../../../server/storage/local-store.ts';
import type { FrameStore } from '../../../server/storage/frame-store.ts';
import { createS3Store, type S3FrameStore } from '../../../server/storage/s3-store.ts';
import { describeFrameStoreContract, sha256Hex } from '../../support/frame-store-contract.ts';
import { startS3Fake, type S3Fake } from '../../support/s3-fake.ts';

let localDir: string;
let local: FrameStore;
let fake: S3Fake;
let store: S3FrameStore;
beforeAll(async () => {
  localDir = mkdtempSync(join(tmpdir(), 'orderly-local-store-'));
  local = createLocalStore(localDir);
  fake = await startS3Fake();
  store = createS3Store({ ...fake.options, prefix: 'frames/' });
});
afterAll(async () => {
  store.client.destroy();
  await fake.close();
  rmSync(localDir, { recursive: true, force: true });
});

describeFrameStoreContract('local folder', () => local);
describeFrameStoreContract('s3 (s3rver)', () => store);

describe('S3 store specifics', () => {
  it('keeps objects under the prefix, sharded ab/cd/<sha256>', async () => {
    const { ListObjectsV2Command } = await import('@aws-sdk/client-s3');
    const bytes = new TextEncoder().encode('sharding check');
    const key = sha256Hex(bytes);
    await store.put(key, bytes);
    const listed = await store.client.send(new ListObjectsV2Command({ Bucket: fake.options.bucket, Prefix: 'frames/' }));
    expect(listed.Contents?.map((o) => o.Key)).toContain(`frames/${key.slice(0, 2)}/${key.slice(2, 4)}/${key}`);
  });

  it('refuses a key that is not a sha256', async () => {
    await expect(store.put('../etc/passwd', new Uint8Array(1))).rejects.toThrow('must be a lowercase sha256 hex string');
  });

  it('a missing bucket is an error, not "not stored"', async () => {
    const other = createS3Store({ ...fake.options, bucket: 'no-such-bucket' });
    await expect(other.get(sha256Hex(new Uint8Array(1)))).rejects.toThrow(/bucket/i);
    other.client.destroy();
  });
});
