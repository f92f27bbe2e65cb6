/**
 * The one error shape every API route answers with: `{ error: { code, message, details? } }`.
 * `code` is stable for programs; `message` is a plain sentence for people.
 */
import { z } from 'zod';

/** Stable error codes and the HTTP status each one travels with. */
export const errorCodes = {
  validation: 400,
  unauthenticated: 401,
  csrf: 403,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  /** Frame upload refused by the engine's decoder; travels as 400, 413 (too large) or 415 (unknown type). */
  bad_frame: 400,
  /** The workbench run is not `unique`, so it cannot become a version. */
  ambiguous: 400,
  /** An approved/superseded/withdrawn version cannot change. */
  immutable: 409,
  /** A version is in the wrong state for the transition. */
  state: 409,
  /** No approved calibration covers the frame's time (issue 5). */
  no_calibration: 409,
  gone: 410,
  rate_limited: 429,
  internal: 500,
} as const;

export type ErrorCode = keyof typeof errorCodes;

/** One field problem from validation: `path` like `profile.pixelCount`. */
export interface FieldIssue {
  path: string;
  message: string;
}

export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});

/** The body of every non-2xx response. For `validation`, `details.issues` lists the fields. */
export interface ApiErrorBody {
  error: {
    code: ErrorCode;
    message: string;
    details?: { issues?: FieldIssue[] } & Record<string, unknown>;
  };
}
