/** Messages between the page and the frame worker (decode.worker.ts). Plain data and typed arrays only. */
import type { LineShape, SpatialBand } from '../../../shared/engine/types.ts';
import type { RenderOptions } from './colour-maps.ts';

/** A frame decoded in the worker, as the page receives it (the worker keeps its own copy for lineouts). */
export interface DecodedFrame {
  key: string;
  width: number;
  height: number;
  /** Row-major counts, `data[row * width + col]`. */
  data: Float32Array;
  /** Ascending sample of the pixel values (NaN dropped), for percentiles and the histogram. */
  sortedSample: Float32Array;
  bitsPerSample: number;
  fullScale: number;
  pageCount: number;
  page: number;
}

export interface LineoutRequestOptions {
  spectralAxis: 'x' | 'y';
  signal?: SpatialBand;
  background?: SpatialBand[];
  lineShape?: LineShape;
  /** Key of an already decoded dark frame to subtract. */
  darkKey?: string;
}

/** The lineout the worker computed with shared/engine reduce. */
export interface LineoutResult {
  counts: Float64Array;
  variance: Float64Array;
  signal: SpatialBand;
  background: SpatialBand[];
}

export type WorkerRequest =
  | { id: number; type: 'decode'; key: string; bytes: ArrayBuffer; page: number }
  | { id: number; type: 'render'; key: string; options: RenderOptions }
  | { id: number; type: 'lineout'; key: string; options: LineoutRequestOptions }
  | { id: number; type: 'forget'; key: string };

export type WorkerResponse =
  | { id: number; ok: true; type: 'decode'; frame: DecodedFrame }
  | { id: number; ok: true; type: 'render'; rgba: Uint8ClampedArray; width: number; height: number }
  | { id: number; ok: true; type: 'lineout'; lineout: LineoutResult }
  | { id: number; ok: true; type: 'forget' }
  | { id: number; ok: false; message: string; code: string };
