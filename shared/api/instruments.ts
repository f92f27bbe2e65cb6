/** Instruments: create, edit, read. */
import { z } from 'zod';
import { instrumentProfileSchema, type InstrumentProfileInput } from './instrument-profile.ts';
import type { Role } from './members.ts';
import type { Regions } from './frames.ts';
import { driftThresholdSchema } from './spectra.ts';

/** Per-instrument settings; unknown keys are stripped. */
export const instrumentSettingsSchema = z.object({
  /** When true (default) nobody approves a calibration version they authored. */
  forbidSelfApproval: z.boolean({ error: 'forbidSelfApproval must be true or false' }).default(true),
  /** Drift flag threshold (issue 5; owners set it): flagged when |shift| > sigma·σ and > px. Absent → 3 σ and 1 px. */
  driftThreshold: driftThresholdSchema.optional(),
});
export type InstrumentSettings = z.infer<typeof instrumentSettingsSchema>;

const instrumentName = z
  .string({ error: 'name is required' })
  .trim()
  .min(1, { message: 'name must not be empty' })
  .max(200, { message: 'name must be at most 200 characters' });
const description = z.string({ error: 'description must be text' }).max(4_000, { message: 'description must be at most 4000 characters' });

/** POST /api/instruments */
export const createInstrumentSchema = z.object({
  name: instrumentName,
  description: description.default(''),
  profile: instrumentProfileSchema,
  notes: z.string().max(10_000, { message: 'notes must be at most 10000 characters' }).default(''),
  settings: instrumentSettingsSchema.default({ forbidSelfApproval: true }),
});
export type CreateInstrumentInput = z.input<typeof createInstrumentSchema>;

/** PATCH /api/instruments/:id — every field optional; `profile` replaces the whole profile. */
export const updateInstrumentSchema = z.object({
  name: instrumentName.optional(),
  description: description.optional(),
  profile: instrumentProfileSchema.optional(),
  notes: z.string().max(10_000, { message: 'notes must be at most 10000 characters' }).optional(),
  settings: instrumentSettingsSchema.partial().optional(),
});
export type UpdateInstrumentInput = z.input<typeof updateInstrumentSchema>;

/** An instrument as the API returns it. `myRole` is null for a site admin who is not a member. */
export interface Instrument {
  id: string;
  name: string;
  description: string;
  profile: InstrumentProfileInput;
  pixelCount: number;
  notes: string;
  settings: InstrumentSettings;
  /** Default signal/background regions for its frames (PUT …/regions); null = automatic. */
  regions: Regions | null;
  createdAt: string;
  updatedAt: string;
  myRole: Role | null;
}
