/** Runs: applying calibrations to many frames in the background (pg-boss queue `orderly-apply`). */
import { z } from 'zod';
import type { ScanAnalysis } from '../analysis/scan.ts';

export const runStates = ['queued', 'running', 'done', 'cancelled', 'failed'] as const;
export type RunState = (typeof runStates)[number];
export const runItemStates = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type RunItemState = (typeof runItemStates)[number];

const periodSchema = z.union([
  z.number({ error: 'period must be a positive number or "detect"' }).positive({ message: 'period must be > 0' }),
  z.literal('detect'),
]);

/** POST /api/instruments/:instrumentId/runs — either `frameIds` or `scanVariable`. */
export const createRunSchema = z
  .object({
    frameIds: z.array(z.uuid({ message: 'every frame id must be a UUID' })).min(1, { message: 'frameIds must not be empty' }).max(5000, { message: 'at most 5000 frames per run' }).optional(),
    /** All signal frames of the instrument with this scan variable. */
    scanVariable: z.string().trim().min(1, { message: 'scanVariable must not be empty' }).max(200).optional(),
    /** A version number, or 'valid' (default): the version valid at each frame's time. */
    version: z.union([z.number().int().min(1), z.literal('valid')], { error: 'version must be a version number or "valid"' }).default('valid'),
    /** Period of the scan variable for the modulation fit (units of the scan values); default 2π. */
    period: periodSchema.optional(),
  })
  .refine((v) => (v.frameIds ? 1 : 0) + (v.scanVariable ? 1 : 0) === 1, { message: 'give exactly one of frameIds or scanVariable', path: ['frameIds'] });
export type CreateRunInput = z.input<typeof createRunSchema>;

export interface RunItem {
  frameId: string;
  state: RunItemState;
  message: string | null;
  /** The worker process that made (or last tried) this item. */
  workerId: string | null;
  spectrumId: string | null;
  version: number | null;
  attempts: number;
}

export interface Run {
  id: string;
  instrumentId: string;
  kind: 'apply' | 'reapply';
  state: RunState;
  version: number | 'valid';
  scanVariable: string | null;
  period: number | 'detect' | null;
  total: number;
  done: number;
  failed: number;
  cancelled: number;
  createdBy: string;
  createdAt: string;
  finishedAt: string | null;
  items: RunItem[];
}

/** GET /api/instruments/:instrumentId/runs?limit=N — the newest runs first. */
export const listRunsQuerySchema = z.object({
  limit: z.coerce.number({ error: 'limit must be a whole number' }).int({ message: 'limit must be a whole number' }).min(1, { message: 'limit must be ≥ 1' }).max(200, { message: 'limit must be ≤ 200' }).default(20),
});

/** One run in the instrument's list: its counts without the items. */
export interface RunSummary {
  id: string;
  kind: 'apply' | 'reapply';
  state: RunState;
  version: number | 'valid';
  scanVariable: string | null;
  total: number;
  done: number;
  failed: number;
  cancelled: number;
  createdBy: string;
  createdByName: string;
  createdAt: string;
  finishedAt: string | null;
}

export const scanQuerySchema = z.object({
  period: z
    .union([z.literal('detect'), z.coerce.number({ error: 'period must be a positive number or "detect"' }).positive({ message: 'period must be > 0' })])
    .optional(),
});

export type ScanResponse = ScanAnalysis & {
  runId: string;
  scanVariable: string | null;
  /** Frames in the run with a spectrum and a scan value, and those left out. */
  framesUsed: number;
  framesSkipped: number;
};
