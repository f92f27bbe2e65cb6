import { useEffect, useState } from 'react';
import type { RenderOptions } from './colour-maps.ts';
import { renderInWorker } from './frame-worker-client.ts';

/**
 * A canvas holding the frame rendered through the colour map (done in the worker), redrawn when
 * the display options change. Returns null until the first image is ready.
 */
export function useRenderedImage(key: string | null, options: RenderOptions | null): HTMLCanvasElement | null {
  const [canvas, setCanvas] = useState<HTMLCanvasElement | null>(null);
  const optionsKey = options ? JSON.stringify(options) : '';
  useEffect(() => {
    if (!key || !optionsKey) return;
    let current = true;
    renderInWorker(key, JSON.parse(optionsKey) as RenderOptions).then(
      ({ rgba, width, height }) => {
        if (!current) return;
        const el = document.createElement('canvas');
        el.width = width;
        el.height = height;
        el.getContext('2d')?.putImageData(new ImageData(new Uint8ClampedArray(rgba.buffer as ArrayBuffer), width, height), 0, 0);
        setCanvas(el);
      },
      () => undefined,
    );
    return () => {
      current = false;
    };
  }, [key, optionsKey]);
  return canvas;
}
