/**
 * Typed errors thrown by services; `server/lib/error-handler.ts` maps them to the JSON shape in
 * shared/api/errors.ts. Services throw; they never build responses.
 */
import type { ErrorCode } from '../../shared/api/errors.ts';

export class HttpError extends Error {
  readonly status: number;
  readonly code: ErrorCode;
  readonly details?: Record<string, unknown>;
  constructor(status: number, code: ErrorCode, message: string, details?: Record<string, unknown>) {
    super(message);
    this.name = new.target.name;
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

export class ValidationError extends HttpError {
  constructor(message: string, details?: Record<string, unknown>) {
    super(400, 'validation', message, details);
  }
}
export class UnauthenticatedError extends HttpError {
  constructor(message = 'Sign in first.') {
    super(401, 'unauthenticated', message);
  }
}
export class ForbiddenError extends HttpError {
  constructor(message = 'You are not allowed to do that.') {
    super(403, 'forbidden', message);
  }
}
export class CsrfError extends HttpError {
  constructor(message = 'Missing or wrong X-CSRF-Token header; fetch GET /api/session for a token.') {
    super(403, 'csrf', message);
  }
}
export class NotFoundError extends HttpError {
  constructor(message = 'Not found.') {
    super(404, 'not_found', message);
  }
}
export class ConflictError extends HttpError {
  constructor(message: string, details?: Record<string, unknown>) {
    super(409, 'conflict', message, details);
  }
}
/** An invitation that existed but was used or has expired. */
export class GoneError extends HttpError {
  constructor(message: string) {
    super(410, 'gone', message);
  }
}
