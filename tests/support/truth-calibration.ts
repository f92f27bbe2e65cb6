/**
 * A calibration built from the simulator's TRUE geometry and effective driver wavelength (what
 * rendered the frame), in the stored format. Tests of what happens after calibration (apply,
 * drift, spectra routes) use it so they do not depend on the order-assignment search, and so a
 * known camera move is measured against the exact map. The band of 0.05 px on the detector
 * centre is an invented, realistic fit uncertainty.
 */
import type { SimScenario, SimTruth } from '../../shared/engine/simulate/index.ts';
import type { Calibration } from '../../shared/engine/types.ts';

export function truthCalibration(scenario: SimScenario, truth: SimTruth): Calibration {
  return {
    format: 'orderly-calibration/1',
    model: 'grating',
    spectralAxis: scenario.spectralAxis,
    pixelCount: scenario.spectralAxis === 'x' ? scenario.width : scenario.height,
    grating: {
      geometry: scenario.geometry,
      parameterNames: ['detectorCenterPixel'],
      parameters: [scenario.geometry.detectorCenterPixel],
      covariance: [[0.05 ** 2]],
    },
    driverNm: truth.effectiveDriverNm,
    driverSigmaNm: 0,
    parity: scenario.parity,
    absoluteScale: 'anchored',
    scaleSigmaRelative: 0,
    residualRmsNm: 0,
    reducedChiSquare: 1,
    points: [],
    filters: [],
    signal: truth.signal,
    ...(scenario.lineShape ? { lineShape: scenario.lineShape } : {}),
    notes: ['Test fixture: the simulator’s true geometry, not a fit.'],
  };
}
