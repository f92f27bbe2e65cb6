/**
 * The page's side of the frame worker: one worker for the tab, requests matched to answers by id.
 * A refused frame rejects with {@link FrameWorkerError} carrying the engine's code and message.
 */
import type { RenderOptions } from './colour-maps.ts';
import type { DecodedFrame, LineoutRequestOptions, LineoutResult, WorkerRequest, WorkerResponse } from './protocol.ts';

/** The engine (or the worker) refused a request; `message` is the engine's own words. */
export class FrameWorkerError extends Error {
  readonly code: string;
  constructor(code: string, message: string) {
    super(message);
    this.name = 'FrameWorkerError';
    this.code = code;
  }
}

type Pending = { resolve: (response: WorkerResponse & { ok: true }) => void; reject: (error: Error) => void };
type WithoutId<T> = T extends unknown ? Omit<T, 'id'> : never;

let worker: Worker | undefined;
let nextId = 1;
const pending = new Map<number, Pending>();

function getWorker(): Worker {
  if (worker) return worker;
  worker = new Worker(new URL('./decode.worker.ts', import.meta.url), { type: 'module' });
  worker.onmessage = (event: MessageEvent<WorkerResponse>) => {
    const response = event.data;
    const waiting = pending.get(response.id);
    if (!waiting) return;
    pending.delete(response.id);
    if (response.ok) waiting.resolve(response);
    else waiting.reject(new FrameWorkerError(response.code, response.message));
  };
  worker.onerror = (event) => {
    for (const waiting of pending.values()) waiting.reject(new FrameWorkerError('worker_error', `the frame worker failed: ${event.message}`));
    pending.clear();
  };
  return worker;
}

function send(request: WithoutId<WorkerRequest>, transfer: Transferable[] = []): Promise<WorkerResponse & { ok: true }> {
  const id = nextId++;
  return new Promise((resolve, reject) => {
    pending.set(id, { resolve, reject });
    getWorker().postMessage({ ...request, id }, transfer);
  });
}

/** Decodes a file's page in the worker; the bytes are handed over (not copied). */
export async function decodeInWorker(key: string, bytes: ArrayBuffer, page = 0): Promise<DecodedFrame> {
  const response = await send({ type: 'decode', key, bytes, page }, [bytes]);
  if (response.type !== 'decode') throw new FrameWorkerError('worker_error', 'unexpected answer from the frame worker');
  return response.frame;
}

/** The RGBA image of a decoded frame under the given display options. */
export async function renderInWorker(key: string, options: RenderOptions): Promise<{ rgba: Uint8ClampedArray; width: number; height: number }> {
  const response = await send({ type: 'render', key, options });
  if (response.type !== 'render') throw new FrameWorkerError('worker_error', 'unexpected answer from the frame worker');
  return { rgba: response.rgba, width: response.width, height: response.height };
}

/** The engine's lineout of a decoded frame for the given regions. */
export async function lineoutInWorker(key: string, options: LineoutRequestOptions): Promise<LineoutResult> {
  const response = await send({ type: 'lineout', key, options });
  if (response.type !== 'lineout') throw new FrameWorkerError('worker_error', 'unexpected answer from the frame worker');
  return response.lineout;
}
