/** /api/tokens — the signed-in user's own personal API tokens. */
import { Router } from 'express';
import { z } from 'zod';
import { createTokenSchema } from '../../../shared/api/session.ts';
import type { Db } from '../../db/client.ts';
import { requireUser } from '../../auth/middleware.ts';
import { validated } from '../../lib/validate.ts';
import { createToken, listTokens, revokeToken } from './service.ts';

export function tokensRouter(db: Db): Router {
  const router = Router();
  router.use(requireUser);
  router.get('/', async (req, res) => {
    res.json(await listTokens(db, req.user!.id));
  });
  router.post(
    '/',
    validated({ body: createTokenSchema }, async (req, res, { body }) => {
      res.status(201).json(await createToken(db, req.user!.id, body.name));
    }),
  );
  router.delete(
    '/:tokenId',
    validated({ params: z.object({ tokenId: z.uuid({ error: 'tokenId must be a UUID' }) }) }, async (req, res, { params }) => {
      await revokeToken(db, req.user!.id, params.tokenId);
      res.status(204).end();
    }),
  );
  return router;
}
