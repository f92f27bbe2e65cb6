/**
 * Content-addressed storage of frame files: key = sha256 hex of the bytes (API contract, issue 4).
 * Implementations: the local folder (`local-store.ts`) and an S3-compatible object store
 * (`s3-store.ts`), chosen by config FRAME_STORAGE=local|s3.
 */
export interface FrameStore {
  put(key: string, bytes: Uint8Array): Promise<void>;
  get(key: string): Promise<Uint8Array>;
  has(key: string): Promise<boolean>;
  delete(key: string): Promise<void>;
}
