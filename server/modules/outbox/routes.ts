/** GET /api/outbox — site admins only. */
import { Router } from 'express';
import type { Db } from '../../db/client.ts';
import { requireAdmin } from '../../auth/middleware.ts';
import { readOutbox } from './service.ts';

export function outboxRouter(db: Db): Router {
  const router = Router();
  router.get('/', requireAdmin, async (_req, res) => {
    res.json(await readOutbox(db));
  });
  return router;
}
