/** The one error middleware, and the JSON 404 for unknown /api routes. */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import type { ApiErrorBody, FieldIssue } from '../../shared/api/errors.ts';
import { HttpError, NotFoundError } from './errors.ts';

/** Zod issues as `{ path: 'profile.pixelCount', message }`. */
export function fieldIssues(error: ZodError): FieldIssue[] {
  return error.issues.map((issue) => ({ path: issue.path.map(String).join('.'), message: issue.message }));
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new NotFoundError(`No API route ${req.method} ${req.originalUrl.split('?')[0]}.`));
};

function isPostgresUniqueViolation(error: unknown): boolean {
  const cause = (error as { cause?: { code?: string } } | null)?.cause ?? error;
  return (cause as { code?: string } | null)?.code === '23505';
}

export const errorHandler: ErrorRequestHandler = (error, _req, res, _next) => {
  let status = 500;
  let body: ApiErrorBody;
  if (error instanceof HttpError) {
    status = error.status;
    body = { error: { code: error.code, message: error.message, ...(error.details ? { details: error.details } : {}) } };
  } else if (error instanceof ZodError) {
    status = 400;
    const issues = fieldIssues(error);
    const message = issues.map((i) => (i.path ? `${i.path}: ${i.message}` : i.message)).join('; ');
    body = { error: { code: 'validation', message, details: { issues } } };
  } else if ((error as { type?: string })?.type === 'entity.parse.failed') {
    status = 400;
    body = { error: { code: 'validation', message: 'The request body is not valid JSON.' } };
  } else if ((error as { type?: string })?.type === 'entity.too.large') {
    status = 413;
    body = { error: { code: 'validation', message: 'The request body is too large.' } };
  } else if (isPostgresUniqueViolation(error)) {
    // A race the service's own check did not see; the unique index is the last word.
    status = 409;
    body = { error: { code: 'conflict', message: 'That already exists.' } };
  } else {
    console.error('unhandled error:', error);
    body = { error: { code: 'internal', message: 'Something went wrong on the server.' } };
  }
  res.status(status).json(body);
};
