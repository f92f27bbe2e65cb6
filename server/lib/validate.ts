/**
 * Validation at the boundary: `validated({ body, query, params }, handler)` parses each part with
 * its zod schema (a ZodError becomes a 400 in the error handler) and hands the parsed values to
 * the handler, so handlers never read the raw request.
 */
import type { Request, RequestHandler, Response } from 'express';
import type { z } from 'zod';

interface Schemas {
  body?: z.ZodType;
  query?: z.ZodType;
  params?: z.ZodType;
}
type Out<S> = S extends z.ZodType ? z.output<S> : undefined;
export interface Parsed<S extends Schemas> {
  body: Out<S['body']>;
  query: Out<S['query']>;
  params: Out<S['params']>;
}

export function validated<S extends Schemas>(
  schemas: S,
  handler: (req: Request, res: Response, input: Parsed<S>) => Promise<void> | void,
): RequestHandler {
  return async (req: Request, res: Response) => {
    const input = {
      body: schemas.body ? schemas.body.parse(req.body ?? {}) : undefined,
      query: schemas.query ? schemas.query.parse(req.query) : undefined,
      params: schemas.params ? schemas.params.parse(req.params) : undefined,
    } as Parsed<S>;
    await handler(req, res, input);
  };
}
