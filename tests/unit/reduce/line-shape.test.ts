import { describe, expect, it } from 'vitest';
import { estimateLineShape, reduceFrame } from '../../../shared/engine/reduce.ts';
import { findPeaks } from '../../../shared/engine/peaks.ts';
import { type SyntheticFrameSpec, syntheticFrame } from './support/synthetic.ts';

// Invented frame: lines tilted and curved across a tall band; centre row 60, band rows 20..101.
const tilt = 0.15;
const curvature = 0.004;
const spec: SyntheticFrameSpec = {
  spectralLength: 300,
  spatialLength: 140,
  spectralAxis: 'x',
  spatialCentre: 60,
  lines: [
    { pixel: 70.4, sigmaPx: 1.2, photons: 150000, spatialSigmaPx: 16 },
    { pixel: 150.6, sigmaPx: 1.2, photons: 120000, spatialSigmaPx: 16 },
    { pixel: 230.2, sigmaPx: 1.2, photons: 100000, spatialSigmaPx: 16 },
  ],
  backgroundPhotonsPerPixel: 3,
  readNoiseCounts: 2,
  tiltPxPerPx: tilt,
  curvaturePxPerPx2: curvature,
  seed: 21,
};
const signal = { start: 20, end: 101 }; // centre (20 + 100) / 2 = 60, the lines' spatial centre
const background = [
  { start: 2, end: 14 },
  { start: 110, end: 138 },
];

describe('tilt and curvature', () => {
  it('corrected summation recovers the narrow line that the tilt smears out', () => {
    const frame = syntheticFrame(spec);
    const untilted = syntheticFrame({ ...spec, tiltPxPerPx: 0, curvaturePxPerPx2: 0 });
    const widthOf = (lineout: ReturnType<typeof reduceFrame>) => findPeaks(lineout).find((p) => Math.abs(p.pixel - 150.6) < 2)?.fwhmPx ?? NaN;
    const smeared = widthOf(reduceFrame(frame, { spectralAxis: 'x', signal, background }));
    const corrected = widthOf(reduceFrame(frame, { spectralAxis: 'x', signal, background, lineShape: { tiltPxPerPx: tilt, curvaturePxPerPx2: curvature } }));
    const reference = widthOf(reduceFrame(untilted, { spectralAxis: 'x', signal, background }));
    // Within ±1 spatial sigma (16 rows) the shift spans ±2.4 px + 1 px of curvature: the
    // uncorrected line is much wider.
    expect(smeared).toBeGreaterThan(1.5 * reference);
    // Linear interpolation broadens a little (≈ a 1-px boxcar at worst); allow 15 %.
    expect(corrected).toBeLessThan(1.15 * reference);
    const corrLine = findPeaks(reduceFrame(frame, { spectralAxis: 'x', signal, background, lineShape: { tiltPxPerPx: tilt, curvaturePxPerPx2: curvature } }));
    // Corrected, every row is aligned on its position at the band centre row: the given pixels.
    for (const truth of [70.4, 150.6, 230.2]) {
      const p = corrLine.find((q) => Math.abs(q.pixel - truth) < 2);
      expect(p).toBeDefined();
      expect(Math.abs(p!.pixel - truth)).toBeLessThan(0.05);
    }
  });

  it('estimateLineShape measures the tilt and curvature it was built with', () => {
    const frame = syntheticFrame(spec);
    const shape = estimateLineShape(frame, { spectralAxis: 'x', signal, background });
    expect(shape.linesUsed).toBe(3);
    expect(Math.abs(shape.tiltPxPerPx - tilt)).toBeLessThan(Math.max(4 * shape.tiltSigmaPxPerPx, 0.003));
    expect(Math.abs(shape.curvaturePxPerPx2 - curvature)).toBeLessThan(Math.max(4 * shape.curvatureSigmaPxPerPx2, 0.0001));
    expect(shape.tiltSigmaPxPerPx).toBeLessThan(0.005);
  });

  it('estimateLineShape finds no tilt in an untilted frame', () => {
    const frame = syntheticFrame({ ...spec, tiltPxPerPx: 0, curvaturePxPerPx2: 0, seed: 22 });
    const shape = estimateLineShape(frame, { spectralAxis: 'x', signal, background });
    expect(Math.abs(shape.tiltPxPerPx)).toBeLessThan(Math.max(4 * shape.tiltSigmaPxPerPx, 0.003));
    expect(Math.abs(shape.curvaturePxPerPx2)).toBeLessThan(Math.max(4 * shape.curvatureSigmaPxPerPx2, 0.0001));
  });
});
