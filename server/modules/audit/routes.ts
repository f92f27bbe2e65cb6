/** GET /api/audit?instrumentId= */
import { Router } from 'express';
import { auditQuerySchema } from '../../../shared/api/audit.ts';
import type { Db } from '../../db/client.ts';
import { requireUser } from '../../auth/middleware.ts';
import { validated } from '../../lib/validate.ts';
import { readAudit } from './service.ts';

export function auditRouter(db: Db): Router {
  const router = Router();
  router.get(
    '/',
    requireUser,
    validated({ query: auditQuerySchema }, async (req, res, { query }) => {
      res.json(await readAudit(db, req.user!, query));
    }),
  );
  return router;
}
