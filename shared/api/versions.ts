/**
 * Calibration versions: draft → in_review → approved → superseded / withdrawn.
 * Approved versions of an instrument cover non-overlapping intervals [validFrom, validUntil).
 */
import { z } from 'zod';
import type { Calibration } from '../engine/types.ts';
import type { WorkbenchResult, WorkbenchRunInputs } from './workbench.ts';

export const versionStates = ['draft', 'in_review', 'approved', 'superseded', 'withdrawn'] as const;
export type VersionState = (typeof versionStates)[number];

const iso = (label: string) => z.iso.datetime({ offset: true, error: `${label} must be an ISO 8601 time, e.g. 2026-11-30T14:05:00Z` });
const note = z.string({ error: 'note must be text' }).trim().max(10_000, { message: 'note must be at most 10000 characters' });

/** POST /api/instruments/:instrumentId/versions */
export const createVersionSchema = z
  .object({
    runId: z.uuid({ error: 'runId must be a workbench run UUID' }),
    validFrom: iso('validFrom'),
    validUntil: iso('validUntil').nullable().optional(),
    note: note.default(''),
  })
  .refine((v) => !v.validUntil || Date.parse(v.validUntil) > Date.parse(v.validFrom), { message: 'validUntil must be after validFrom', path: ['validUntil'] });
export type CreateVersionInput = z.input<typeof createVersionSchema>;

/** PATCH /api/versions/:versionId — drafts only. */
export const updateVersionSchema = z.object({
  note: note.optional(),
  validFrom: iso('validFrom').optional(),
  validUntil: iso('validUntil').nullable().optional(),
});
export type UpdateVersionInput = z.input<typeof updateVersionSchema>;

/** Body of /submit, /approve, /reject and /withdraw: an optional comment, kept in the history. */
export const transitionCommentSchema = z.object({ comment: z.string({ error: 'comment must be text' }).trim().max(4_000, { message: 'comment must be at most 4000 characters' }).default('') });
export type TransitionCommentInput = z.input<typeof transitionCommentSchema>;

export interface Version {
  id: string;
  instrumentId: string;
  number: number;
  state: VersionState;
  validFrom: string;
  validUntil: string | null;
  note: string;
  authorId: string | null;
  reviewerId: string | null;
  approvedAt: string | null;
  supersededById: string | null;
  /** When it stopped applying because a later version took over (= that version's validFrom). */
  supersededAt: string | null;
  runId: string;
  frameIds: string[];
  model: 'grating' | 'polynomial';
  /** Fitted effective driver wavelength, nm. */
  driverNm: number;
  rmsResidualPx: number;
  peakCount: number;
  createdAt: string;
  updatedAt: string;
}

export interface VersionPerson {
  id: string;
  name: string;
  email: string;
}

export interface VersionHistoryEntry {
  from: VersionState | null;
  to: VersionState;
  by: VersionPerson | null;
  at: string;
  comment: string;
}

/** A spectrum a version produced (newest first in VersionDetail.spectra). */
export interface VersionSpectrum {
  frameId: string;
  frameName: string;
  takenAt: string;
  stale: boolean;
  driftFlagged: boolean;
  madeAt: string;
}

export interface VersionDetail extends Version {
  /** How many spectra this version produced, and the newest 100 of them. */
  spectraCount: number;
  spectra: VersionSpectrum[];
  calibration: Calibration;
  result: WorkbenchResult;
  inputs: WorkbenchRunInputs;
  author: VersionPerson | null;
  reviewer: VersionPerson | null;
  history: VersionHistoryEntry[];
}
