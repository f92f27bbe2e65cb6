/** /api/instruments — see service.ts for who may do what. */
import { Router } from 'express';
import { z } from 'zod';
import { createInstrumentSchema, updateInstrumentSchema } from '../../../shared/api/instruments.ts';
import type { Db } from '../../db/client.ts';
import { requireUser } from '../../auth/middleware.ts';
import { validated } from '../../lib/validate.ts';
import { createInstrument, deleteInstrument, getInstrument, listInstruments, updateInstrument } from './service.ts';

export const instrumentParams = z.object({ instrumentId: z.uuid({ error: 'instrumentId must be a UUID' }) });

export function instrumentsRouter(db: Db): Router {
  const router = Router();
  router.use(requireUser);
  router.get('/', async (req, res) => {
    res.json(await listInstruments(db, req.user!));
  });
  router.post(
    '/',
    validated({ body: createInstrumentSchema }, async (req, res, { body }) => {
      res.status(201).json(await createInstrument(db, req.user!, body));
    }),
  );
  router.get(
    '/:instrumentId',
    validated({ params: instrumentParams }, async (req, res, { params }) => {
      res.json(await getInstrument(db, req.user!, params.instrumentId));
    }),
  );
  router.patch(
    '/:instrumentId',
    validated({ params: instrumentParams, body: updateInstrumentSchema }, async (req, res, { params, body }) => {
      res.json(await updateInstrument(db, req.user!, params.instrumentId, body));
    }),
  );
  router.delete(
    '/:instrumentId',
    validated({ params: instrumentParams }, async (req, res, { params }) => {
      await deleteInstrument(db, req.user!, params.instrumentId);
      res.status(204).end();
    }),
  );
  return router;
}
