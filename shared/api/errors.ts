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
