/**
 * The grating equation with a flat detector: the physical forward model shared by the
 * simulator, the assigner and the grating dispersion fit.
 *
 * m·λ = d·(sin α − sin β), angles from the grating normal, d = 1e6 / grooveDensityPerMm nm.
 * A pixel p sits at s = (p − c)·pitch along the detector plane; the detector stands at distance L
 * from the grating, its normal tilted by θ from the central ray (the ray at β0 that lands on c):
 *   β(p) = β0 + σ·atan(s·cos θ / (L + s·sin θ)),
 * with σ = −1 when wavelength increases with pixel (β then falls along the detector), else +1.
 */
import type { GratingGeometry, InstrumentProfile } from './types.ts';

const DEG = Math.PI / 180;

export function groovePeriodNm(grooveDensityPerMm: number): number {
  return 1e6 / grooveDensityPerMm;
}

function direction(g: GratingGeometry): number {
  return g.wavelengthIncreasesWithPixel ? -1 : 1;
}

/** Diffraction angle (radians) that lands on `pixel`. */
export function diffractionAngleRad(g: GratingGeometry, pixel: number): number {
  const sMm = (pixel - g.detectorCenterPixel) * g.pixelPitchUm * 1e-3;
  const tilt = g.detectorTiltDeg * DEG;
  const offset = Math.atan2(sMm * Math.cos(tilt), g.detectorDistanceMm + sMm * Math.sin(tilt));
  return g.detectorAngleDeg * DEG + direction(g) * offset;
}

/** Wavelength (nm) diffracted into order m that lands on `pixel`; NaN if no real wavelength does. */
export function pixelToWavelengthNm(g: GratingGeometry, pixel: number, diffractionOrder = 1): number {
  const beta = diffractionAngleRad(g, pixel);
  const lambda = (groovePeriodNm(g.grooveDensityPerMm) * (Math.sin(g.incidenceAngleDeg * DEG) - Math.sin(beta))) / diffractionOrder;
  return lambda > 0 ? lambda : Number.NaN;
}

/** Diffraction angle β (radians) of wavelength λ in order m; NaN when |sin β| > 1. */
export function wavelengthToDiffractionAngleRad(g: Pick<GratingGeometry, 'incidenceAngleDeg' | 'grooveDensityPerMm'>, wavelengthNm: number, diffractionOrder = 1): number {
  const sinBeta = Math.sin(g.incidenceAngleDeg * DEG) - (diffractionOrder * wavelengthNm) / groovePeriodNm(g.grooveDensityPerMm);
  return sinBeta < -1 || sinBeta > 1 ? Number.NaN : Math.asin(sinBeta);
}

/**
 * Position along the detector plane from the centre pixel per unit distance, s/L, where
 * wavelength λ in order m lands: linear in L and the centre, so two lines fix both. NaN when the
 * ray misses the plane.
 */
export function planeOffsetPerDistance(g: GratingGeometry, wavelengthNm: number, diffractionOrder = 1): number {
  const beta = wavelengthToDiffractionAngleRad(g, wavelengthNm, diffractionOrder);
  if (!Number.isFinite(beta)) return Number.NaN;
  const offset = direction(g) * (beta - g.detectorAngleDeg * DEG);
  if (Math.abs(offset) >= Math.PI / 2) return Number.NaN;
  const tilt = g.detectorTiltDeg * DEG;
  const t = Math.tan(offset);
  const denominator = Math.cos(tilt) - t * Math.sin(tilt);
  return denominator <= 0 ? Number.NaN : t / denominator;
}

/** Pixel where wavelength λ in order m lands (may lie off the detector); NaN when |sin β| > 1 or the ray misses the plane. */
export function wavelengthToPixel(g: GratingGeometry, wavelengthNm: number, diffractionOrder = 1): number {
  const u = planeOffsetPerDistance(g, wavelengthNm, diffractionOrder);
  if (!Number.isFinite(u)) return Number.NaN;
  return g.detectorCenterPixel + (g.detectorDistanceMm * u) / (g.pixelPitchUm * 1e-3);
}

/** Local dispersion dλ/dp (nm per pixel) at `pixel`, by central difference. */
export function dispersionNmPerPixel(g: GratingGeometry, pixel: number, diffractionOrder = 1): number {
  return (pixelToWavelengthNm(g, pixel + 0.5, diffractionOrder) - pixelToWavelengthNm(g, pixel - 0.5, diffractionOrder));
}

/**
 * The nominal geometry of a profile on a detector with `pixelCount` spectral pixels. When the
 * profile does not give the central diffraction angle, `detectorAngleDeg` is NaN and
 * `centralAngleKnown` is false: the assigner must then search it.
 */
export function nominalGeometry(profile: InstrumentProfile, pixelCount: number): { geometry: GratingGeometry; centralAngleKnown: boolean } {
  const centralAngleKnown = profile.detectorAngleDeg !== undefined && Number.isFinite(profile.detectorAngleDeg);
  return {
    centralAngleKnown,
    geometry: {
      grooveDensityPerMm: profile.grooveDensityPerMm,
      incidenceAngleDeg: profile.incidenceAngleDeg,
      detectorDistanceMm: profile.detectorDistanceMm,
      pixelPitchUm: profile.pixelPitchUm,
      wavelengthIncreasesWithPixel: profile.wavelengthIncreasesWithPixel,
      detectorCenterPixel: profile.detectorCenterPixel ?? (pixelCount - 1) / 2,
      detectorAngleDeg: centralAngleKnown ? (profile.detectorAngleDeg as number) : Number.NaN,
      detectorTiltDeg: 0,
    },
  };
}
