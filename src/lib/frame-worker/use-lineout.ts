import { useEffect, useState } from 'react';
import { lineoutInWorker } from './frame-worker-client.ts';
import type { LineoutRequestOptions, LineoutResult } from './protocol.ts';

/**
 * The engine's lineout of a decoded frame for the given regions, recomputed in the worker
 * `debounceMs` after the regions stop changing (live while a band is dragged). Only the newest
 * answer is kept; an engine refusal (e.g. overlapping bands) is returned as `error`.
 */
export function useLineout(key: string | null, options: LineoutRequestOptions | null, debounceMs = 60): { lineout: LineoutResult | null; error: string | null } {
  const [state, setState] = useState<{ lineout: LineoutResult | null; error: string | null }>({ lineout: null, error: null });
  const optionsKey = options ? JSON.stringify(options) : '';
  useEffect(() => {
    if (!key || !optionsKey) return;
    let current = true;
    const timer = window.setTimeout(() => {
      lineoutInWorker(key, JSON.parse(optionsKey) as LineoutRequestOptions).then(
        (lineout) => current && setState({ lineout, error: null }),
        (error: unknown) => current && setState((s) => ({ lineout: s.lineout, error: error instanceof Error ? error.message : String(error) })),
      );
    }, debounceMs);
    return () => {
      current = false;
      window.clearTimeout(timer);
    };
  }, [key, optionsKey, debounceMs]);
  return state;
}
