/// <reference lib="webworker" />
/**
 * The frame worker: decodes frames with the shared engine, renders them to RGBA through a colour
 * map, and computes lineouts with the engine's reduce stage — all off the page's main thread, so
 * the viewer stays responsive on a 2048 × 2048 frame. Frames stay here by key for later requests.
 */
import { decodeFrame } from '../../../shared/engine/frames/index.ts';
import { reduceFrame } from '../../../shared/engine/reduce.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import type { Frame } from '../../../shared/engine/types.ts';
import { renderRgba } from './colour-maps.ts';
import { sortedSample } from './scaling.ts';
import type { WorkerRequest, WorkerResponse } from './protocol.ts';

const scope = self as unknown as DedicatedWorkerGlobalScope;
const frames = new Map<string, Frame>();

function need(key: string): Frame {
  const frame = frames.get(key);
  if (!frame) throw new EngineError('invalid_input', `frame ${key} is not decoded in the worker`);
  return frame;
}

async function handle(request: WorkerRequest): Promise<{ response: WorkerResponse; transfer: Transferable[] }> {
  switch (request.type) {
    case 'decode': {
      const frame = await decodeFrame(new Uint8Array(request.bytes), { page: request.page });
      frames.set(request.key, frame);
      const data = frame.data.slice();
      const sample = sortedSample(frame.data);
      return {
        response: {
          id: request.id,
          ok: true,
          type: 'decode',
          frame: { key: request.key, width: frame.width, height: frame.height, data, sortedSample: sample, bitsPerSample: frame.bitsPerSample, fullScale: frame.fullScale, pageCount: frame.pageCount, page: frame.page },
        },
        transfer: [data.buffer, sample.buffer],
      };
    }
    case 'render': {
      const frame = need(request.key);
      const rgba = renderRgba(frame.data, request.options);
      return { response: { id: request.id, ok: true, type: 'render', rgba, width: frame.width, height: frame.height }, transfer: [rgba.buffer] };
    }
    case 'lineout': {
      const frame = need(request.key);
      const { darkKey, ...options } = request.options;
      const lineout = reduceFrame(frame, { ...options, dark: darkKey ? need(darkKey) : undefined });
      return {
        response: { id: request.id, ok: true, type: 'lineout', lineout: { counts: lineout.counts, variance: lineout.variance, signal: lineout.signal, background: lineout.background } },
        transfer: [lineout.counts.buffer, lineout.variance.buffer],
      };
    }
    case 'forget':
      frames.delete(request.key);
      return { response: { id: request.id, ok: true, type: 'forget' }, transfer: [] };
  }
}

scope.onmessage = (event: MessageEvent<WorkerRequest>) => {
  const request = event.data;
  handle(request).then(
    ({ response, transfer }) => scope.postMessage(response, transfer),
    (error: unknown) => {
      const message = error instanceof Error ? error.message : String(error);
      const code = error instanceof EngineError ? error.code : 'worker_error';
      scope.postMessage({ id: request.id, ok: false, message, code } satisfies WorkerResponse);
    },
  );
};
