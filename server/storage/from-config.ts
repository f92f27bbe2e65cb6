/** The frame store chosen by config FRAME_STORAGE: the local folder (default) or S3. */
import type { S3Config } from '../config.ts';
import type { FrameStore } from './frame-store.ts';
import { createLocalStore } from './local-store.ts';
import { createS3Store } from './s3-store.ts';

export interface FrameStoreConfig {
  frameStorage: 'local' | 's3';
  s3: S3Config | null;
  /** The local folder (used when frameStorage is local). */
  localDir: string;
}

/** Returns the store and a `close` that releases its connections. */
export function frameStoreFromConfig(config: FrameStoreConfig): { store: FrameStore; close(): void } {
  if (config.frameStorage === 's3') {
    if (!config.s3) throw new Error('FRAME_STORAGE=s3 needs the S3_* settings');
    const store = createS3Store(config.s3);
    return { store, close: () => store.client.destroy() };
  }
  return { store: createLocalStore(config.localDir), close: () => undefined };
}
