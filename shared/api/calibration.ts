/**
 * The stored calibration (shared/engine/types.ts `Calibration`) as a zod schema: what
 * `orderly apply --calibration` and the server accept. Checks the shape that evaluation needs;
 * unknown extra fields are kept out.
 */
import { z } from 'zod';

const band = z.object({ start: z.number().int().nonnegative(), end: z.number().int().positive() });
const finite = z.number().finite();
const matrix = z.array(z.array(finite));

const geometry = z.object({
  grooveDensityPerMm: finite.positive(),
  incidenceAngleDeg: finite,
  detectorDistanceMm: finite.positive(),
  pixelPitchUm: finite.positive(),
  wavelengthIncreasesWithPixel: z.boolean(),
  detectorCenterPixel: finite,
  detectorAngleDeg: finite,
  detectorTiltDeg: finite,
});

export const calibrationSchema = z
  .object({
    format: z.literal('orderly-calibration/1'),
    model: z.enum(['polynomial', 'grating']),
    spectralAxis: z.enum(['x', 'y']),
    pixelCount: z.number().int().positive(),
    polynomial: z
      .object({
        degree: z.number().int().nonnegative(),
        domainPx: z.tuple([finite, finite]),
        coefficients: z.array(finite).min(1),
        covariance: matrix,
        degreeCriterion: z.string(),
      })
      .optional(),
    grating: z
      .object({ geometry, parameterNames: z.array(z.string()), heldParameterNames: z.array(z.string()).optional(), parameters: z.array(finite), covariance: matrix })
      .optional(),
    driverNm: finite.positive(),
    driverSigmaNm: finite.nonnegative(),
    parity: z.enum(['odd', 'all']),
    absoluteScale: z.enum(['anchored', 'driver-tolerance']),
    anchors: z
      .array(
        z.object({
          kind: z.enum(['known-line', 'filter-edge']),
          label: z.string(),
          pixel: finite,
          pixelSigma: finite.nonnegative(),
          energyEv: finite.positive(),
          energySigmaEv: finite.nonnegative(),
        }),
      )
      .optional(),
    unanchoredScaleSigmaRelative: finite.nonnegative().optional(),
    scaleSigmaRelative: finite.nonnegative(),
    residualRmsNm: finite.nonnegative(),
    reducedChiSquare: finite.nonnegative(),
    points: z.array(
      z.object({
        pixel: finite,
        pixelSigma: finite,
        harmonic: z.number().int().positive(),
        diffractionOrder: z.number().int().positive(),
        wavelengthNm: finite,
        residualNm: finite,
        leaveOneOutResidualNm: z.number(),
      }),
    ),
    filters: z.array(z.string()),
    signal: band.optional(),
    background: z.array(band).optional(),
    lineShape: z.object({ tiltPxPerPx: finite, curvaturePxPerPx2: finite }).optional(),
    notes: z.array(z.string()),
  })
  .refine((c) => (c.model === 'polynomial' ? c.polynomial !== undefined : c.grating !== undefined), {
    message: 'a polynomial calibration needs `polynomial`, a grating calibration needs `grating`',
  });
