/**
 * The exact messages for known lines that cannot be used: calibrateFrame turns them into a
 * `failed` result (it never throws on bad data), naming the line. Frame: our simulator's
 * (invented data); the numbers below are inputs, not expected science.
 */
import { describe, expect, it } from 'vitest';
import { calibrateFrame, type CalibrateOptions } from '../../../shared/engine/calibrate.ts';
import { checkKnownLines, matchKnownLines } from '../../../shared/engine/known-lines.ts';
import { generateScenarios, simulateFrame } from '../../../shared/engine/simulate/index.ts';
import type { Peak } from '../../../shared/engine/types.ts';

const [scenario] = generateScenarios(1, 2026, { classes: ['gi-odd-clean'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
const { frame } = simulateFrame(scenario, 11);
const options: CalibrateOptions = { profile: scenario.profile, driverNm: scenario.driver.nominalNm, driverTolerancePct: 1 };

function peak(pixel: number, fwhmPx = 4): Peak {
  return { pixel, pixelSigma: 0.01, fwhmPx, amplitude: 100, area: 400, areaSigma: 10, snr: 50, spatialWidthPx: 10, saturated: false };
}

describe('known lines that cannot be used', () => {
  it.each([
    [{ pixel: 400, energyEv: -3 }, 'A known line needs a finite positive photon energy in eV; got -3 for the line at pixel 400.'],
    [{ pixel: 400, energyEv: Number.NaN }, 'A known line needs a finite positive photon energy in eV; got NaN for the line at pixel 400.'],
    [{ pixel: 1024, energyEv: 72.7 }, 'The known line at pixel 1024 (72.7 eV) is off the detector: its spectral pixels run from 0 to 1023.'],
    [{ pixel: -2, energyEv: 72.7, label: 'Al' }, 'The known line at pixel -2 (72.7 eV, Al) is off the detector: its spectral pixels run from 0 to 1023.'],
  ])('checkKnownLines(%o)', (line, message) => {
    expect(() => checkKnownLines([line], 1024)).toThrow(message);
  });

  it('names the line and the nearest peak when no peak is close enough (max(3 px, 2 FWHM))', () => {
    const peaks = [peak(100, 4), peak(300, 1)];
    expect(() => matchKnownLines([{ pixel: 108.5, energyEv: 50 }], peaks, 1024)).toThrow(
      'No detected peak within 8.0 px of the known line at pixel 108.5 (50 eV): the nearest detected peak is at pixel 100.00.',
    );
    expect(matchKnownLines([{ pixel: 107.9, energyEv: 50 }], peaks, 1024).anchors[0].pixel).toBe(100);
    expect(() => matchKnownLines([{ pixel: 303.5, energyEv: 50 }], peaks, 1024)).toThrow('No detected peak within 3.0 px of the known line at pixel 303.5 (50 eV)');
    expect(() => matchKnownLines([{ pixel: 10, energyEv: 50 }], [], 1024)).toThrow('No detected peak within 0.0 px of the known line at pixel 10 (50 eV): no peaks were detected.');
  });

  it('refuses two energies on one peak', () => {
    expect(() => matchKnownLines([{ pixel: 99, energyEv: 50 }, { pixel: 101, energyEv: 51, label: 'Ne' }], [peak(100)], 1024)).toThrow(
      'The known line at pixel 99 (50 eV) and the known line at pixel 101 (51 eV, Ne) both land on the peak at pixel 100.00 with different energies; give one energy per peak.',
    );
  });

  it('gives the assigner the wavelength hc/E at the peak (hc = 1239.841984 eV nm, CODATA 2018)', () => {
    const { assignLines } = matchKnownLines([{ pixel: 101, energyEv: 72.7, label: 'Al edge' }], [peak(100)], 1024);
    expect(assignLines).toEqual([{ wavelengthNm: expect.closeTo(1239.841984 / 72.7, 6), pixel: 100, pixelSigma: 0.01, label: 'Al edge' }]);
  });

  it('fails the calibration with that message, names the entry and gives no map', () => {
    const result = calibrateFrame(frame, { ...options, knownLines: [{ pixel: 2000, energyEv: 70 }] });
    expect(result.status).toBe('failed');
    expect(result.calibration).toBeNull();
    expect(result.message).toBe('The known line at pixel 2000 (70 eV) is off the detector: its spectral pixels run from 0 to 1023.');
    // Bad input, not bad data: callers answer it with exit code 2 or a 400.
    expect(result.badOption).toEqual({ name: 'knownLines', index: 0 });
    const second = calibrateFrame(frame, { ...options, knownLines: [{ pixel: 500, energyEv: 70 }, { pixel: 500, energyEv: 0 }] });
    expect(second.badOption).toEqual({ name: 'knownLines', index: 1 });
    expect(calibrateFrame(frame, options).badOption).toBeUndefined();
  });
});
