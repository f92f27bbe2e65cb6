/**
 * GET /api/instruments/:instrumentId/runs?limit=N — the instrument's recent runs, newest first,
 * with counts and who started each. Every member reads it; non-members get 404. Read-only, so no
 * audit event. (Starting, cancelling and retrying runs live in spectra/routes.ts.)
 */
import { Router } from 'express';
import { z } from 'zod';
import { listRunsQuerySchema } from '../../../shared/api/runs.ts';
import { requireUser } from '../../auth/middleware.ts';
import type { Executor } from '../../db/client.ts';
import { validated } from '../../lib/validate.ts';
import { listRuns } from './service.ts';

const params = z.object({ instrumentId: z.uuid({ error: 'instrumentId must be a UUID' }) });

export function instrumentRunsListRouter(db: Executor): Router {
  const router = Router();
  router.get(
    '/:instrumentId/runs',
    requireUser,
    validated({ params, query: listRunsQuerySchema }, async (req, res, { params, query }) => {
      res.json(await listRuns(db, req.user!, params.instrumentId, query.limit));
    }),
  );
  return router;
}
