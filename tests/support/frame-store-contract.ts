/**
 * The FrameStore contract (API contract, issue 4: put/get/has/delete keyed by sha256 hex), as a
 * test suite any implementation runs: the local folder and the S3 store must behave the same.
 */
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import type { FrameStore } from '../../server/storage/frame-store.ts';

export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export function describeFrameStoreContract(name: string, store: () => FrameStore) {
  describe(`FrameStore contract: ${name}`, () => {
    it('stores bytes under their sha256 and returns them unchanged', async () => {
      const bytes = new Uint8Array(70_000);
      for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 7919) & 255;
      const key = sha256Hex(bytes);
      expect(await store().has(key)).toBe(false);
      await store().put(key, bytes);
      expect(await store().has(key)).toBe(true);
      const back = await store().get(key);
      expect(back.byteLength).toBe(bytes.byteLength);
      expect(sha256Hex(back)).toBe(key);
    });

    it('putting the same content twice is harmless', async () => {
      const bytes = new TextEncoder().encode(`same content ${name}`);
      const key = sha256Hex(bytes);
      await store().put(key, bytes);
      await store().put(key, bytes);
      expect(sha256Hex(await store().get(key))).toBe(key);
    });

    it('get of a missing key rejects naming the key; delete removes and tolerates missing', async () => {
      const bytes = new TextEncoder().encode(`to delete ${name}`);
      const key = sha256Hex(bytes);
      await expect(store().get(key)).rejects.toThrow(key);
      await store().put(key, bytes);
      await store().delete(key);
      expect(await store().has(key)).toBe(false);
      await store().delete(key);
    });

    it('stores an empty file', async () => {
      const empty = new Uint8Array(0);
      const key = sha256Hex(empty);
      await store().put(key, empty);
      expect((await store().get(key)).byteLength).toBe(0);
    });
  });
}
