/**
 * Frame files in a local folder, sharded `ab/cd/<sha256>` so no directory grows huge. Writes go
 * to a temporary name in the same folder and are renamed into place, so a reader never sees half
 * a file and a crash leaves at most a `.tmp-*` file, never a wrong one under a real key.
 */
import { randomBytes } from 'node:crypto';
import { mkdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import type { FrameStore } from './frame-store.ts';

const SHA256_HEX = /^[0-9a-f]{64}$/;

export function createLocalStore(folder: string): FrameStore & { readonly folder: string; pathOf(key: string): string } {
  const root = resolve(folder);
  const pathOf = (key: string) => {
    if (!SHA256_HEX.test(key)) throw new Error(`frame store key must be a lowercase sha256 hex string, got "${key}"`);
    return join(root, key.slice(0, 2), key.slice(2, 4), key);
  };
  return {
    folder: root,
    pathOf,
    async put(key, bytes) {
      const target = pathOf(key);
      await mkdir(dirname(target), { recursive: true });
      const tmp = `${target}.tmp-${randomBytes(6).toString('hex')}`;
      try {
        await writeFile(tmp, bytes, { flag: 'wx' });
        await rename(tmp, target);
      } catch (error) {
        await rm(tmp, { force: true });
        throw error;
      }
    },
    async get(key) {
      try {
        const buf = await readFile(pathOf(key));
        return new Uint8Array(buf.buffer, buf.byteOffset, buf.byteLength);
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') throw new Error(`no stored frame file ${key}`);
        throw error;
      }
    },
    async has(key) {
      try {
        return (await stat(pathOf(key))).isFile();
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') return false;
        throw error;
      }
    },
    async delete(key) {
      await rm(pathOf(key), { force: true });
    },
  };
}
