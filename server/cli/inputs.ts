/** Validation of the CLI's JSON inputs, with messages that name the file's problem. */
import { type z } from 'zod';
import { calibrationSchema } from '../../shared/api/calibration.ts';
import { cliProfileSchema } from '../../shared/api/instrument-profile.ts';
import { EngineError } from '../../shared/engine/errors.ts';
import type { Calibration, InstrumentProfile } from '../../shared/engine/types.ts';

function describe(error: z.ZodError): string {
  return error.issues.map((i) => `${i.path.join('.') || '(top level)'}: ${i.message}`).join('; ');
}

export function parseProfile(json: unknown): InstrumentProfile {
  const parsed = cliProfileSchema.safeParse(json);
  if (!parsed.success) throw new EngineError('invalid_profile', `profile: ${describe(parsed.error)}`);
  return parsed.data as InstrumentProfile;
}

/** Accepts the whole `calibrate --json` object or just its `calibration`. */
export function parseCalibrationFile(json: unknown): Calibration {
  let candidate = json;
  if (candidate && typeof candidate === 'object' && 'status' in candidate) {
    const whole = candidate as { status?: unknown; calibration?: unknown; message?: unknown };
    if (whole.calibration == null) {
      throw new EngineError(
        'invalid_input',
        `the calibration file holds no calibration (status ${String(whole.status)}): ${String(whole.message ?? '')}`.trim(),
      );
    }
    candidate = whole.calibration;
  }
  const parsed = calibrationSchema.safeParse(candidate);
  if (!parsed.success) throw new EngineError('invalid_input', `calibration: ${describe(parsed.error)}`);
  return parsed.data as Calibration;
}
