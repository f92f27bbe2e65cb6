import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { describe, expect, it } from 'vitest';
import { findPeaks, fitGaussians } from '../../../shared/engine/peaks.ts';
import { reduceFrame } from '../../../shared/engine/reduce.ts';
import { type SyntheticFrameSpec, expectedPhotons, syntheticFrame, syntheticLineout } from '../reduce/support/synthetic.ts';

// Invented lineouts and frames: Gaussian lines at known sub-pixel positions, seeded noise.

function stats(values: number[]): { mean: number; sd: number } {
  const mean = values.reduce((a, b) => a + b, 0) / values.length;
  const sd = Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1));
  return { mean, sd };
}

describe('findPeaks: positions and uncertainties', () => {
  it('recovers ten lines at known sub-pixel positions within their reported sigma', () => {
    const lines = Array.from({ length: 10 }, (_, i) => ({ pixel: 30 + 45.37 * i, sigmaPx: 1.3 + 0.05 * i, area: 5000 + 800 * i }));
    const { lineout } = syntheticLineout(500, lines, (e) => e + 25, 4);
    const peaks = findPeaks(lineout);
    expect(peaks.length).toBe(10);
    peaks.forEach((p, i) => {
      expect(Math.abs(p.pixel - lines[i].pixel)).toBeLessThan(4 * p.pixelSigma);
      // Point-sampled fit of a pixel-integrated Gaussian: sigma² grows by 1/12 px² (common practice).
      expect(p.fwhmPx / 2.3548).toBeCloseTo(Math.sqrt(lines[i].sigmaPx ** 2 + 1 / 12), 1);
      expect(Math.abs(p.area - lines[i].area)).toBeLessThan(4 * p.areaSigma);
      expect(p.snr).toBeCloseTo(p.area / p.areaSigma, 6);
    });
    for (let i = 1; i < peaks.length; i++) expect(peaks[i].pixel).toBeGreaterThan(peaks[i - 1].pixel);
  });

  it.each([
    { area: 600, noise: 25 },
    { area: 3000, noise: 25 },
    { area: 20000, noise: 400 },
  ])('reports a pixelSigma within 20 % of the scatter over 300 realisations (area $area, floor $noise)', ({ area, noise }) => {
    const centres: number[] = [];
    const sigmas: number[] = [];
    for (let k = 0; k < 300; k++) {
      const { lineout } = syntheticLineout(80, [{ pixel: 40.3, sigmaPx: 1.6, area }], (e) => e + noise, 100 + k);
      const p = findPeaks(lineout).find((q) => Math.abs(q.pixel - 40.3) < 3);
      if (!p) continue;
      centres.push(p.pixel);
      sigmas.push(p.pixelSigma);
    }
    expect(centres.length).toBeGreaterThanOrEqual(295);
    const { mean, sd } = stats(centres);
    const reported = stats(sigmas).mean;
    expect(Math.abs(reported / sd - 1)).toBeLessThan(0.2);
    expect(Math.abs(mean - 40.3)).toBeLessThan(4 * sd / Math.sqrt(centres.length));
  });

  it('reaches the Cramér–Rao bound for a photon-limited line through the full reduce + peaks pipeline', () => {
    // Cramér–Rao bound for Gaussian position estimation, e.g. Thompson, Larson & Webb,
    // Biophys. J. 82, 2775 (2002) (from memory): background-free, σ_x² = (s² + a²/12) / N for
    // line sigma s, pixel size a = 1 and N detected photons.
    const photons = 3000;
    const sigmaPx = 1.5;
    const spec: SyntheticFrameSpec = {
      spectralLength: 96,
      spatialLength: 44,
      spectralAxis: 'x',
      spatialCentre: 22,
      lines: [{ pixel: 47.35, sigmaPx, photons, spatialSigmaPx: 3 }],
      readNoiseCounts: 0.5,
      seed: 0,
    };
    const model = expectedPhotons(spec);
    const signal = { start: 8, end: 37 };
    const inBand = model.slice(signal.start * 96, signal.end * 96).reduce((a, b) => a + b, 0);
    const bound = Math.sqrt((sigmaPx ** 2 + 1 / 12) / inBand);
    const centres: number[] = [];
    const sigmas: number[] = [];
    for (let k = 0; k < 250; k++) {
      const frame = syntheticFrame({ ...spec, seed: 5000 + k }, model);
      const lineout = reduceFrame(frame, { spectralAxis: 'x', signal, background: [{ start: 0, end: 4 }, { start: 40, end: 44 }] });
      const p = findPeaks(lineout).find((q) => Math.abs(q.pixel - 47.35) < 3);
      if (!p) continue;
      centres.push(p.pixel);
      sigmas.push(p.pixelSigma);
    }
    expect(centres.length).toBe(250);
    const { mean, sd } = stats(centres);
    const ratio = sd / bound;
    console.info(`CRB check: scatter ${sd.toFixed(4)} px, bound ${bound.toFixed(4)} px, ratio ${ratio.toFixed(3)}, mean reported sigma ${stats(sigmas).mean.toFixed(4)} px`);
    expect(ratio).toBeLessThan(1.5);
    expect(ratio).toBeGreaterThan(0.85); // an estimator cannot beat the bound beyond sampling noise
    expect(Math.abs(stats(sigmas).mean / sd - 1)).toBeLessThan(0.2);
    expect(Math.abs(mean - 47.35)).toBeLessThan(4 * sd / Math.sqrt(centres.length));
  });

  it('agrees with an independent fit by ml-levenberg-marquardt on the same window', () => {
    const { lineout } = syntheticLineout(60, [{ pixel: 29.62, sigmaPx: 1.4, area: 8000 }], (e) => e + 30, 77);
    const x: number[] = [];
    const y: number[] = [];
    for (let p = 22; p <= 37; p++) {
      x.push(p);
      y.push(lineout.counts[p]);
    }
    const gaussian = ([a, mu, s, c0, c1]: number[]) => (t: number) => a * Math.exp(-((t - mu) ** 2) / (2 * s * s)) + c0 + c1 * (t - 29);
    const jacobian = ([a, mu, s]: number[]) => (t: number) => {
      const g = Math.exp(-((t - mu) ** 2) / (2 * s * s));
      return [g, (a * g * (t - mu)) / (s * s), (a * g * (t - mu) ** 2) / (s * s * s), 1, t - 29];
    };
    // Unweighted on both sides: ml-levenberg-marquardt 5.1's additive damping barely moves from
    // the start with 1/variance weights of ~1e-3 (tried), but converges unweighted.
    const initial = [2000, 29, 1.5, 0, 0];
    const theirs = levenbergMarquardt({ x, y }, gaussian, {
      initialValues: initial,
      weights: 1,
      maxIterations: 2000,
      damping: 1e-2,
      errorTolerance: 1e-10,
      jacobianFunction: jacobian,
    });
    const ours = fitGaussians({
      x: Float64Array.from(x),
      y: Float64Array.from(y),
      weight: new Float64Array(x.length).fill(1),
      count: 1,
      initial: Float64Array.from(initial),
      lower: Float64Array.from([0, 22, 0.3, -Infinity, -Infinity]),
      upper: Float64Array.from([Infinity, 37, 30, Infinity, Infinity]),
      xRef: 29,
    });
    expect(ours).not.toBeNull();
    // Centre sigma of the unweighted fit: covariance times the residual variance.
    const sigmaMu = Math.sqrt((ours!.covariance[1 * 5 + 1] * ours!.chiSquare) / ours!.degreesOfFreedom);
    const t = theirs.parameterValues;
    expect(Math.abs(ours!.params[1] - t[1])).toBeLessThan(0.05 * sigmaMu); // theirs stops a little short of the minimum
    expect(Math.abs(ours!.params[0] / t[0] - 1)).toBeLessThan(5e-3);
    expect(Math.abs(ours!.params[2] / t[2] - 1)).toBeLessThan(5e-3);
    // findPeaks (weighted, its own window) is a different estimator of the same centre: within one sigma.
    const [peak] = findPeaks(lineout);
    expect(Math.abs(peak.pixel - ours!.params[1])).toBeLessThan(sigmaMu);
  });

  it('resolves two blended lines 5 px (1.6 FWHM) apart by fitting them jointly', () => {
    const lines = [
      { pixel: 50.2, sigmaPx: 1.3, area: 10000 },
      { pixel: 55.2, sigmaPx: 1.3, area: 6000 },
    ];
    const { lineout } = syntheticLineout(110, lines, (e) => e + 20, 8);
    const peaks = findPeaks(lineout);
    expect(peaks.length).toBe(2);
    peaks.forEach((p, i) => expect(Math.abs(p.pixel - lines[i].pixel)).toBeLessThan(4 * p.pixelSigma));
  });
});

describe('findPeaks: spatial width, limits and empty results', () => {
  it('measures the spatial RMS width of each line across the band', () => {
    const spec: SyntheticFrameSpec = {
      spectralLength: 160,
      spatialLength: 80,
      spectralAxis: 'y',
      spatialCentre: 40,
      lines: [
        { pixel: 50.5, sigmaPx: 1.4, photons: 60000, spatialSigmaPx: 6 },
        { pixel: 110.5, sigmaPx: 1.4, photons: 30000, spatialSigmaPx: 3 },
      ],
      backgroundPhotonsPerPixel: 2,
      readNoiseCounts: 2,
      seed: 31,
    };
    const lineout = reduceFrame(syntheticFrame(spec), { spectralAxis: 'y', signal: { start: 15, end: 66 }, background: [{ start: 0, end: 10 }, { start: 70, end: 80 }] });
    const peaks = findPeaks(lineout);
    expect(peaks.length).toBe(2);
    // Pixel-integrated spatial profile: sigma² + 1/12 (common practice).
    expect(Math.abs(peaks[0].spatialWidthPx - Math.sqrt(36 + 1 / 12)) / 6).toBeLessThan(0.1);
    expect(Math.abs(peaks[1].spatialWidthPx - Math.sqrt(9 + 1 / 12)) / 3).toBeLessThan(0.1);
  });

  it('measures wide and narrow spatial widths on a tall band (fitted in bins of rows)', () => {
    // 1200 band rows: the wide line is fitted in bins, the narrow one at full resolution.
    const spec: SyntheticFrameSpec = {
      spectralLength: 160,
      spatialLength: 1240,
      spectralAxis: 'x',
      spatialCentre: 620,
      lines: [
        { pixel: 50.5, sigmaPx: 1.4, photons: 4e6, spatialSigmaPx: 150 },
        { pixel: 110.5, sigmaPx: 1.4, photons: 2e5, spatialSigmaPx: 4 },
      ],
      backgroundPhotonsPerPixel: 2,
      readNoiseCounts: 2,
      seed: 32,
    };
    const lineout = reduceFrame(syntheticFrame(spec), { spectralAxis: 'x', signal: { start: 20, end: 1220 }, background: [{ start: 0, end: 10 }, { start: 1230, end: 1240 }] });
    const peaks = findPeaks(lineout);
    expect(peaks.length).toBe(2);
    // Pixel-integrated spatial profile: sigma² + 1/12 (common practice); the bins' box is taken off.
    expect(Math.abs(peaks[0].spatialWidthPx - Math.sqrt(150 ** 2 + 1 / 12)) / 150).toBeLessThan(0.03);
    expect(Math.abs(peaks[1].spatialWidthPx - Math.sqrt(16 + 1 / 12)) / 4).toBeLessThan(0.1);
  });

  it('keeps the strongest maxPeaks', () => {
    const lines = [1000, 8000, 3000, 6000].map((area, i) => ({ pixel: 30 + 40 * i, sigmaPx: 1.5, area }));
    const { lineout } = syntheticLineout(200, lines, (e) => e + 10, 9);
    const peaks = findPeaks(lineout, { maxPeaks: 2 });
    expect(peaks.map((p) => Math.round(p.pixel))).toEqual([70, 150]);
  });

  it('returns an empty list (not an error) when there is no line', () => {
    const flat = syntheticLineout(300, [], () => 0, 1).lineout;
    expect(findPeaks(flat)).toEqual([]);
    const noise = syntheticLineout(2048, [], () => 50, 2).lineout;
    // Pure Gaussian noise: at 5 sigma no false peak is expected in 2048 pixels.
    expect(findPeaks(noise, { minSnr: 5 })).toEqual([]);
  });

  it('returns only well-formed peaks from a noisy, crowded lineout', () => {
    const lines = Array.from({ length: 60 }, (_, i) => ({ pixel: 10 + 8.1 * i, sigmaPx: 1.2, area: 300 + 200 * (i % 7) }));
    const { lineout } = syntheticLineout(500, lines, (e) => e + 40, 12);
    for (const p of findPeaks(lineout)) {
      expect(p.pixel).toBeGreaterThan(0);
      expect(p.pixel).toBeLessThan(499);
      expect(p.pixelSigma).toBeGreaterThan(0);
      expect(p.pixelSigma).toBeLessThan(p.fwhmPx);
      expect(p.snr).toBeGreaterThanOrEqual(3);
      expect(Number.isFinite(p.area) && Number.isFinite(p.areaSigma)).toBe(true);
    }
  });

  it('finds all 40 peaks on a 2048-pixel lineout (timing lives in npm run bench)', () => {
    const lines = Array.from({ length: 40 }, (_, i) => ({ pixel: 30 + 50.13 * i, sigmaPx: 1.5, area: 4000 + 300 * i }));
    const { lineout } = syntheticLineout(2048, lines, (e) => e + 30, 13);
    const found = findPeaks(lineout);
    expect(found).toHaveLength(40);
    found.forEach((p, i) => expect(Math.abs(p.pixel - lines[i].pixel)).toBeLessThan(0.2));
  });
});
