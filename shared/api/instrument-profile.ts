/**
 * The nominal geometry of a spectrometer as the API and the forms take it. Field names are the
 * engine's (`shared/engine/types.ts` InstrumentProfile, without `name`, which lives on the
 * instrument). Unknown fields are stripped, not refused, so older clients keep working.
 * Ranges are generous sanity limits (common practice for grating spectrometers), not physics.
 */
import { z } from 'zod';

// zod 4's z.number() already refuses NaN and ±Infinity.
const finite = (label: string) => z.number({ error: `${label} must be a number` });

export const instrumentProfileSchema = z.object({
  spectralAxis: z.enum(['x', 'y'], { error: 'spectralAxis must be "x" or "y"' }),
  grooveDensityPerMm: finite('grooveDensityPerMm')
    .min(1, { message: 'grooveDensityPerMm must be at least 1 line/mm' })
    .max(10_000, { message: 'grooveDensityPerMm must be at most 10000 lines/mm' }),
  incidenceAngleDeg: finite('incidenceAngleDeg')
    .min(0, { message: 'incidenceAngleDeg must be between 0 and 90 degrees' })
    .lt(90, { message: 'incidenceAngleDeg must be between 0 and 90 degrees' }),
  detectorDistanceMm: finite('detectorDistanceMm')
    .gt(0, { message: 'detectorDistanceMm must be positive' })
    .max(20_000, { message: 'detectorDistanceMm must be at most 20000 mm' }),
  pixelPitchUm: finite('pixelPitchUm')
    .gt(0, { message: 'pixelPitchUm must be positive' })
    .max(1_000, { message: 'pixelPitchUm must be at most 1000 µm' }),
  wavelengthIncreasesWithPixel: z.boolean({ error: 'wavelengthIncreasesWithPixel must be true or false' }),
  detectorCenterPixel: finite('detectorCenterPixel').optional(),
  detectorAngleDeg: finite('detectorAngleDeg')
    .gt(-90, { message: 'detectorAngleDeg must be between -90 and 90 degrees' })
    .lt(90, { message: 'detectorAngleDeg must be between -90 and 90 degrees' })
    .optional(),
  /** Camera tilt from square to the central ray, degrees; positive: the long-wavelength end farther from the grating. */
  detectorTiltDeg: finite('detectorTiltDeg')
    .gt(-45, { message: 'detectorTiltDeg must be between -45 and 45 degrees' })
    .lt(45, { message: 'detectorTiltDeg must be between -45 and 45 degrees' })
    .optional(),
  pixelCount: z
    .number({ error: 'pixelCount must be a number' })
    .int({ message: 'pixelCount must be a whole number' })
    .min(2, { message: 'pixelCount must be at least 2' })
    .max(65_536, { message: 'pixelCount must be at most 65536' }),
  notes: z.string().max(4_000, { message: 'notes must be at most 4000 characters' }).optional(),
});

/** A validated instrument profile. */
export type InstrumentProfileInput = z.infer<typeof instrumentProfileSchema>;

/**
 * The engine's PROFILE.json as the command line reads it: the same fields plus the instrument
 * `name`, with `pixelCount` optional (the frame supplies it when absent).
 */
export const cliProfileSchema = instrumentProfileSchema.extend({
  name: z.string({ error: 'name must be text' }).min(1, { message: 'name must not be empty' }).default('instrument'),
  pixelCount: instrumentProfileSchema.shape.pixelCount.optional(),
});
