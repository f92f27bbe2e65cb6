/**
 * Spectra, drift and runs routes (issue 5). Mounted at /api/frames (spectrum, CSV), /api/instruments
 * (drift, runs, re-apply) and /api/runs. Who may do what is decided in the services.
 */
import { Router } from 'express';
import { z } from 'zod';
import { createRunSchema, scanQuerySchema } from '../../../shared/api/runs.ts';
import { driftQuerySchema, spectrumQuerySchema } from '../../../shared/api/spectra.ts';
import { spectrumToCsv } from '../../../shared/api/spectrum-csv.ts';
import { listSpectraQuerySchema } from '../../../shared/api/spectra-list.ts';
import { requireUser } from '../../auth/middleware.ts';
import { validated } from '../../lib/validate.ts';
import { cancelRun, createRun, getRun, reapplyStale, retryRun, scanOfRun, type RunsDeps } from '../runs/service.ts';
import { driftSeries, getSpectrum, listInstrumentSpectra } from './service.ts';

const frameParams = z.object({ frameId: z.uuid({ error: 'frameId must be a UUID' }) });
const instrumentParams = z.object({ instrumentId: z.uuid({ error: 'instrumentId must be a UUID' }) });
const runParams = z.object({ runId: z.uuid({ error: 'runId must be a UUID' }) });

export function frameSpectraRouter(deps: RunsDeps): Router {
  const router = Router();
  router.get(
    '/:frameId/spectrum',
    requireUser,
    validated({ params: frameParams, query: spectrumQuerySchema }, async (req, res, { params, query }) => {
      res.json(await getSpectrum(deps, req.user!, params.frameId, query.version, { filterCorrection: query.filterCorrection }));
    }),
  );
  router.get(
    '/:frameId/spectrum.csv',
    requireUser,
    validated({ params: frameParams, query: spectrumQuerySchema }, async (req, res, { params, query }) => {
      const spectrum = await getSpectrum(deps, req.user!, params.frameId, query.version, { filterCorrection: query.filterCorrection });
      res
        .type('text/csv; charset=utf-8')
        .attachment(`spectrum-${params.frameId}-v${spectrum.calibration.version}.csv`)
        .send(spectrumToCsv(spectrum));
    }),
  );
  return router;
}

export function instrumentSpectraRouter(deps: RunsDeps): Router {
  const router = Router();
  router.get(
    '/:instrumentId/drift',
    requireUser,
    validated({ params: instrumentParams, query: driftQuerySchema }, async (req, res, { params, query }) => {
      res.json(await driftSeries(deps, req.user!, params.instrumentId, query.from ? new Date(query.from) : undefined, query.to ? new Date(query.to) : undefined));
    }),
  );
  router.get(
    '/:instrumentId/spectra',
    requireUser,
    validated({ params: instrumentParams, query: listSpectraQuerySchema }, async (req, res, { params, query }) => {
      res.json(await listInstrumentSpectra(deps, req.user!, params.instrumentId, { stale: query.stale === undefined ? undefined : query.stale === 'true', limit: query.limit }));
    }),
  );
  router.post(
    '/:instrumentId/spectra/reapply',
    requireUser,
    validated({ params: instrumentParams }, async (req, res, { params }) => {
      res.status(201).json(await reapplyStale(deps, req.user!, params.instrumentId));
    }),
  );
  router.post(
    '/:instrumentId/runs',
    requireUser,
    validated({ params: instrumentParams, body: createRunSchema }, async (req, res, { params, body }) => {
      res.status(201).json(await createRun(deps, req.user!, params.instrumentId, body));
    }),
  );
  return router;
}

export function runsRouter(deps: RunsDeps): Router {
  const router = Router();
  router.use(requireUser);
  router.get(
    '/:runId',
    validated({ params: runParams }, async (req, res, { params }) => {
      res.json(await getRun(deps, req.user!, params.runId));
    }),
  );
  router.get(
    '/:runId/scan',
    validated({ params: runParams, query: scanQuerySchema }, async (req, res, { params, query }) => {
      res.json(await scanOfRun(deps, req.user!, params.runId, query.period));
    }),
  );
  router.post(
    '/:runId/cancel',
    validated({ params: runParams }, async (req, res, { params }) => {
      res.json(await cancelRun(deps, req.user!, params.runId));
    }),
  );
  router.post(
    '/:runId/retry',
    validated({ params: runParams }, async (req, res, { params }) => {
      res.json(await retryRun(deps, req.user!, params.runId));
    }),
  );
  return router;
}
