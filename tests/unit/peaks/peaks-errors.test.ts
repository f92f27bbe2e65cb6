import { describe, expect, it } from 'vitest';
import { findPeaks } from '../../../shared/engine/peaks.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import { syntheticLineout } from '../reduce/support/synthetic.ts';

// Invented lineout for the error paths.
const { lineout } = syntheticLineout(100, [{ pixel: 50, sigmaPx: 1.5, area: 5000 }], (e) => e + 10, 3);

function caught(fn: () => unknown): EngineError {
  try {
    fn();
  } catch (e) {
    if (e instanceof EngineError) return e;
    throw e;
  }
  throw new Error('expected an EngineError');
}

describe('findPeaks errors', () => {
  it('refuses a lineout whose arrays do not match', () => {
    const e = caught(() => findPeaks({ ...lineout, variance: new Float64Array(99) }));
    expect(e.code).toBe('invalid_input');
    expect(e.message).toBe('The lineout needs Float64Array counts and variance of the same length.');
    expect(caught(() => findPeaks({ ...lineout, saturated: new Uint8Array(3) })).message).toBe(
      'The lineout has 100 counts but 3 saturation flags.',
    );
  });

  it('checks its options', () => {
    expect(caught(() => findPeaks(lineout, { minSnr: 0 })).message).toBe('minSnr must be a positive number, got 0.');
    expect(caught(() => findPeaks(lineout, { maxPeaks: 0 })).message).toBe('maxPeaks must be at least 1, got 0.');
    expect(caught(() => findPeaks(lineout, { smoothingPx: -1 })).message).toBe('smoothingPx must be a positive number, got -1.');
  });
});
