/**
 * Recalibration workbench: a run of the engine's calibrate pipeline on the server, stored so that
 * a draft version references the run rather than numbers sent by a client.
 */
import { z } from 'zod';
import type { CalibrateResult } from '../engine/calibrate.ts';
import { parities, regionsSchema, type Regions } from './frames.ts';

export const pinSchema = z.object({
  pixel: z.number({ error: 'pin pixel must be a number' }).nonnegative({ message: 'pin pixel must be ≥ 0' }),
  harmonic: z.number({ error: 'pin harmonic must be a number' }).int({ message: 'pin harmonic must be a whole number' }).min(1, { message: 'pin harmonic must be ≥ 1' }).max(999),
});
export type Pin = z.infer<typeof pinSchema>;

/** "The peak near this pixel has this first-order photon energy": an absolute anchor of the scale. */
export const knownLineSchema = z.object({
  pixel: z.number({ error: 'known line pixel must be a number' }).nonnegative({ message: 'known line pixel must be ≥ 0' }),
  energyEv: z
    .number({ error: 'known line energyEv must be a number of eV' })
    .positive({ message: 'known line energyEv must be positive' })
    .max(100_000, { message: 'known line energyEv must be at most 100 000 eV' }),
  label: z.string({ error: 'known line label must be text' }).trim().max(80, { message: 'known line label must be at most 80 characters' }).optional(),
});
export type KnownLineInput = z.infer<typeof knownLineSchema>;

export const workbenchModelSchema = z.union(
  [
    z.literal('auto'),
    z.literal('grating'),
    z.object({
      polynomialDegree: z.union([z.literal('auto'), z.number().int().min(1, { message: 'polynomialDegree must be ≥ 1' }).max(8, { message: 'polynomialDegree must be ≤ 8' })]),
    }),
  ],
  { error: 'model must be "auto", "grating" or {"polynomialDegree": n|"auto"}' },
);
export type WorkbenchModel = z.infer<typeof workbenchModelSchema>;

/** POST /api/instruments/:instrumentId/workbench/runs */
export const workbenchRunSchema = z.object({
  frameIds: z
    .array(z.uuid({ error: 'frameIds must be frame UUIDs' }))
    .min(1, { message: 'frameIds must name at least one signal frame' })
    .max(8, { message: 'at most 8 frames per run' }),
  darkFrameId: z.uuid({ error: 'darkFrameId must be a frame UUID' }).optional(),
  driverNm: z.number({ error: 'driverNm must be a number' }).positive({ message: 'driverNm must be positive' }).max(100_000),
  /** 1σ of the measured driver wavelength, percent. */
  driverTolerancePct: z.number({ error: 'driverTolerancePct must be a number' }).positive({ message: 'driverTolerancePct must be positive' }).max(5, { message: 'driverTolerancePct (1σ) must be at most 5' }).default(0.5),
  /** Ionisation blue-shift allowance below the measured driver, percent. */
  blueShiftPct: z.number({ error: 'blueShiftPct must be a number' }).min(0, { message: 'blueShiftPct must be 0 or more' }).lt(10, { message: 'blueShiftPct must be below 10' }).default(1),
  parity: z.enum(parities, { error: 'parity must be "odd" or "all"' }).default('odd'),
  /** Filter foils, engine notation: "Al" or "Al:200" (200 nm). */
  filters: z.array(z.string().trim().min(1).max(50)).max(10).default([]),
  pins: z.array(pinSchema).max(50).default([]),
  /** Lines of known first-order photon energy, applied to every frame of the run. */
  knownLines: z.array(knownLineSchema).max(20, { message: 'at most 20 known lines' }).default([]),
  model: workbenchModelSchema.default('auto'),
  regions: regionsSchema.optional(),
});
export type WorkbenchRunInput = z.input<typeof workbenchRunSchema>;
export type WorkbenchRunInputs = z.output<typeof workbenchRunSchema>;

export interface PerFrameResult {
  frameId: string;
  status: CalibrateResult['status'];
  message: string;
}

/** The engine's CalibrateResult (`orderly calibrate --json`), plus per-frame status for several frames. */
export type WorkbenchResult = CalibrateResult & { perFrame?: PerFrameResult[] };

export interface WorkbenchRun {
  id: string;
  instrumentId: string;
  createdAt: string;
  createdBy: string | null;
  /** The request as validated, with defaults filled and `regionsUsed` (what the engine was given). */
  inputs: WorkbenchRunInputs & { regionsUsed: Regions | null; regionsSource: 'request' | 'frame' | 'instrument' | 'automatic' };
  result: WorkbenchResult;
}
