/** The local frame folder against the FrameStore contract, plus its on-disk layout. */
import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { createLocalStore } from '../../../server/storage/local-store.ts';
import { describeFrameStoreContract, sha256Hex } from '../../support/frame-store-contract.ts';

const store = createLocalStore(mkdtempSync(join(tmpdir(), 'orderly-local-store-')));
describeFrameStoreContract('local folder', () => store);

describe('local folder layout', () => {
  it('shards files as ab/cd/<sha256> and leaves no temporary file behind', async () => {
    const bytes = new TextEncoder().encode('layout check');
    const key = sha256Hex(bytes);
    await store.put(key, bytes);
    const dir = join(store.folder, key.slice(0, 2), key.slice(2, 4));
    expect(readdirSync(dir)).toEqual([key]);
  });

  it('refuses a key that is not a sha256 hex string (no path tricks)', async () => {
    await expect(store.put('../../etc/passwd', new Uint8Array(1))).rejects.toThrow(/sha256/);
    await expect(store.has('ABC')).rejects.toThrow(/sha256/);
  });
});
