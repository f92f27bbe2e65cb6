/**
 * GET /api/instruments/:instrumentId/spectra[?stale=true&limit=N] — every member reads it
 * (non-members 404 through instrumentAccess). Read-only, so no audit event.
 */
import { Router } from 'express';
import { z } from 'zod';
import { listSpectraQuerySchema, type SpectrumList } from '../../../shared/api/spectra-list.ts';
import { instrumentAccess } from '../../auth/access.ts';
import { requireUser } from '../../auth/middleware.ts';
import type { Executor } from '../../db/client.ts';
import { validated } from '../../lib/validate.ts';
import { countStaleFrames, listSpectrumSummaries } from './queries.ts';

const params = z.object({ instrumentId: z.uuid({ error: 'instrumentId must be a UUID' }) });

export function instrumentSpectraListRouter(db: Executor): Router {
  const router = Router();
  router.get(
    '/:instrumentId/spectra',
    requireUser,
    validated({ params, query: listSpectraQuerySchema }, async (req, res, { params, query }) => {
      await instrumentAccess(db, req.user!, params.instrumentId);
      const stale = query.stale === undefined ? undefined : query.stale === 'true';
      const rows = await listSpectrumSummaries(db, params.instrumentId, { stale, limit: query.limit });
      const body: SpectrumList = {
        items: rows.map((r) => ({ ...r, takenAt: r.takenAt.toISOString(), createdAt: r.createdAt.toISOString(), updatedAt: r.updatedAt.toISOString() })),
        staleFrames: await countStaleFrames(db, params.instrumentId),
      };
      res.json(body);
    }),
  );
  return router;
}
