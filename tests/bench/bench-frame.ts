/**
 * The bench frame when Python cannot write the reference pipeline's own: the same geometry
 * (1200 l/mm, α = 87°, β = 77° at the centre, 235 mm, 13.5 µm pixels, odd harmonics of 800 nm)
 * rendered by our simulator and written as an uncompressed 16-bit TIFF by our encoder.
 */
import { encodeTiff, simulateFrame, type SimScenario } from '../../shared/engine/simulate/index.ts';
import type { GratingGeometry } from '../../shared/engine/types.ts';

export function benchFrameFallback(width: number, height: number): Uint8Array {
  const geometry: GratingGeometry = {
    grooveDensityPerMm: 1200,
    incidenceAngleDeg: 87,
    detectorDistanceMm: 235,
    pixelPitchUm: 13.5,
    wavelengthIncreasesWithPixel: false,
    detectorCenterPixel: width / 2,
    detectorAngleDeg: 77,
    detectorTiltDeg: 0,
  };
  const scenario: SimScenario = {
    id: `bench-${width}x${height}`,
    class: 'bench',
    decidable: true,
    description: 'bench frame (invented)',
    geometry,
    profile: { name: 'bench', spectralAxis: 'x', ...geometry },
    width,
    height,
    spectralAxis: 'x',
    driver: { nominalNm: 800, tolerancePercent: 1, effectiveNm: 800 },
    parity: 'odd',
    envelope: { plateauPhotons: 3000 * 2.5 * Math.sqrt(2 * Math.PI) * (height / 8) * Math.sqrt(2 * Math.PI), cutoffHarmonic: 101 },
    lineFwhmPx: 2.5 * 2.355,
    spatialFwhmPx: (height / 8) * 2.355,
    spatialReferenceHarmonic: 41,
    spatialCentrePx: height / 2,
    pedestalCounts: 400,
    readNoiseCounts: 8,
    gainCountsPerPhoton: 1,
  };
  return encodeTiff(simulateFrame(scenario, 1).frame, { bitsPerSample: 16, sampleFormat: 'uint' });
}
