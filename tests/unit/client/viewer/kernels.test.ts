/**
 * The viewer's pure kernels: display stretch, percentiles, zoom about a point, band editing and
 * the line shape from two handles. Expected values are worked by hand from the stated formulas.
 */
import { describe, expect, it } from 'vitest';
import { percentileOfSorted, scaleCounts, sortedSample } from '../../../../src/lib/frame-worker/scaling.ts';
import { colourLut } from '../../../../src/lib/frame-worker/colour-maps.ts';
import { bandFromDrag, lineShapeFromHandles, lineShiftPx, moveBand, resizeBand } from '../../../../src/features/viewer/lib/regions.ts';
import { screenToImage, zoomAbout } from '../../../../src/features/viewer/lib/view-transform.ts';

describe('scaleCounts', () => {
  it.each([
    // linear: (v - lo) / (hi - lo), clamped
    ['linear', 50, 0.5],
    ['linear', -10, 0],
    ['linear', 200, 1],
    // log: log10(1000·x + 1) / log10(1001); x = 0.5 → log10(501)/log10(1001) = 0.89979 (worked by hand)
    ['log', 50, Math.log10(501) / Math.log10(1001)],
    // asinh: asinh(x/0.05)/asinh(20) (Lupton et al. 1999); x = 0.5 → asinh(10)/asinh(20)
    ['asinh', 50, Math.asinh(10) / Math.asinh(20)],
  ] as const)('%s of %d between 0 and 100 is %f', (scaling, value, expected) => {
    expect(scaleCounts(value, 0, 100, scaling)).toBeCloseTo(expected, 10);
  });

  it('keeps NaN pixels NaN (drawn transparent)', () => {
    expect(scaleCounts(Number.NaN, 0, 1, 'linear')).toBeNaN();
  });
});

describe('percentileOfSorted', () => {
  // numpy.percentile([1, 2, 3, 4], q) with the default linear method: 25 → 1.75, 50 → 2.5, 90 → 3.7
  it.each([
    [25, 1.75],
    [50, 2.5],
    [90, 3.7],
    [0, 1],
    [100, 4],
  ])('the %d-th percentile of 1..4 is %f (numpy linear method)', (p, expected) => {
    expect(percentileOfSorted([1, 2, 3, 4], p)).toBeCloseTo(expected, 12);
  });

  it('samples skip NaN and come out sorted', () => {
    expect(Array.from(sortedSample(new Float32Array([3, Number.NaN, 1, 2])))).toEqual([1, 2, 3]);
  });
});

describe('colour maps', () => {
  it('viridis runs from dark purple to yellow (d3-scale-chromatic: #440154 … #fde725)', () => {
    const lut = colourLut('viridis');
    expect(Array.from(lut.subarray(0, 3))).toEqual([0x44, 0x01, 0x54]);
    expect(Array.from(lut.subarray(255 * 3, 256 * 3))).toEqual([0xfd, 0xe7, 0x25]);
  });
});

describe('zoomAbout', () => {
  it.each([
    [2, 100, 50],
    [0.5, 10, 300],
    [3.7, 0, 0],
  ])('zoom ×%f keeps the image point under (%d, %d) fixed', (factor, sx, sy) => {
    const view = { scale: 1.5, offsetX: 20, offsetY: -7 };
    const before = screenToImage(view, sx, sy);
    const next = zoomAbout(view, factor, sx, sy);
    const after = screenToImage(next, sx, sy);
    expect(next.scale).toBeCloseTo(1.5 * factor, 12);
    expect(after.x).toBeCloseTo(before.x, 9);
    expect(after.y).toBeCloseTo(before.y, 9);
  });
});

describe('band editing', () => {
  it.each([
    // from, to, length → band (inclusive start, exclusive end)
    [10.2, 19.6, 100, { start: 10, end: 21 }],
    [30, 5, 100, { start: 5, end: 31 }],
    [-4, 3, 100, { start: 0, end: 4 }],
    [95, 130, 100, { start: 95, end: 100 }],
  ])('a drag from %f to %f on %d rows gives %o', (from, to, length, expected) => {
    expect(bandFromDrag(from, to, length)).toEqual(expected);
  });

  it.each([
    [{ start: 10, end: 20 }, 5.4, { start: 15, end: 25 }],
    [{ start: 10, end: 20 }, -30, { start: 0, end: 10 }],
    [{ start: 10, end: 20 }, 200, { start: 90, end: 100 }],
  ])('moving %o by %f keeps its height inside 100 rows: %o', (band, delta, expected) => {
    expect(moveBand(band, delta, 100)).toEqual(expected);
  });

  it.each([
    ['start', 12, { start: 12, end: 20 }],
    ['start', 25, { start: 19, end: 20 }],
    ['end', 5, { start: 10, end: 11 }],
    ['end', 140, { start: 10, end: 100 }],
  ] as const)('resizing the %s edge to %d gives %o (never under one row)', (edge, at, expected) => {
    expect(resizeBand({ start: 10, end: 20 }, edge, at, 100)).toEqual(expected);
  });
});

describe('line shape from two handles', () => {
  it.each([
    [0.02, 0.0003],
    [-0.05, 0],
    [0, 0.001],
  ])('recovers tilt %f and curvature %f from the shifts at the band ends', (tilt, curvature) => {
    const shape = { tiltPxPerPx: tilt, curvaturePxPerPx2: curvature };
    const half = 40;
    const recovered = lineShapeFromHandles(lineShiftPx(shape, -half), lineShiftPx(shape, half), half);
    expect(recovered.tiltPxPerPx).toBeCloseTo(tilt, 12);
    expect(recovered.curvaturePxPerPx2).toBeCloseTo(curvature, 12);
  });
});
