/**
 * Perceptually uniform colour maps (d3-scale-chromatic: viridis, inferno, cividis, magma) as
 * 256-entry RGBA lookup tables, and the frame → RGBA pass that uses them.
 */
import { interpolateCividis, interpolateInferno, interpolateMagma, interpolateViridis } from 'd3-scale-chromatic';
import { scaleCounts, type DisplayScaling } from './scaling.ts';

export const COLOUR_MAPS = ['viridis', 'inferno', 'cividis', 'magma'] as const;
export type ColourMapName = (typeof COLOUR_MAPS)[number];

const INTERPOLATORS: Record<ColourMapName, (t: number) => string> = {
  viridis: interpolateViridis,
  inferno: interpolateInferno,
  cividis: interpolateCividis,
  magma: interpolateMagma,
};

/** Parses "rgb(r, g, b)" or "#rrggbb", the two forms d3-scale-chromatic returns. */
function parseColour(css: string): [number, number, number] {
  if (css.startsWith('#')) {
    const n = Number.parseInt(css.slice(1), 16);
    return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
  }
  const m = /rgb\((\d+),\s*(\d+),\s*(\d+)\)/.exec(css);
  if (!m) throw new Error(`unexpected colour "${css}" from the colour map`);
  return [Number(m[1]), Number(m[2]), Number(m[3])];
}

const lutCache = new Map<ColourMapName, Uint8Array>();

/** 256 RGB triples of a colour map, index 0 = low end. */
export function colourLut(name: ColourMapName): Uint8Array {
  const cached = lutCache.get(name);
  if (cached) return cached;
  const lut = new Uint8Array(256 * 3);
  for (let i = 0; i < 256; i++) {
    const [r, g, b] = parseColour(INTERPOLATORS[name](i / 255));
    lut[i * 3] = r;
    lut[i * 3 + 1] = g;
    lut[i * 3 + 2] = b;
  }
  lutCache.set(name, lut);
  return lut;
}

/** CSS colour of a colour map at t in [0, 1] (for the colour bar). */
export function colourAt(name: ColourMapName, t: number): string {
  const lut = colourLut(name);
  const i = Math.round(Math.min(1, Math.max(0, t)) * 255) * 3;
  return `rgb(${lut[i]}, ${lut[i + 1]}, ${lut[i + 2]})`;
}

export interface RenderOptions {
  loCounts: number;
  hiCounts: number;
  scaling: DisplayScaling;
  colourMap: ColourMapName;
}

/**
 * RGBA pixels (row-major, as ImageData wants) of a frame's counts. NaN pixels are transparent.
 * One pass with a 4096-step table of the stretch, so log/asinh cost no more than linear.
 */
export function renderRgba(data: ArrayLike<number>, options: RenderOptions): Uint8ClampedArray {
  const { loCounts, hiCounts, scaling } = options;
  const lut = colourLut(options.colourMap);
  const steps = 4096;
  const stretch = new Uint8Array(steps + 1);
  for (let s = 0; s <= steps; s++) stretch[s] = Math.round(scaleCounts(loCounts + ((hiCounts - loCounts) * s) / steps, loCounts, hiCounts, scaling) * 255);
  const out = new Uint8ClampedArray(data.length * 4);
  const span = hiCounts - loCounts || 1;
  for (let i = 0; i < data.length; i++) {
    const v = data[i];
    const o = i * 4;
    if (Number.isNaN(v)) continue;
    const x = (v - loCounts) / span;
    const s = x <= 0 ? 0 : x >= 1 ? steps : Math.round(x * steps);
    const c = stretch[s] * 3;
    out[o] = lut[c];
    out[o + 1] = lut[c + 1];
    out[o + 2] = lut[c + 2];
    out[o + 3] = 255;
  }
  return out;
}
