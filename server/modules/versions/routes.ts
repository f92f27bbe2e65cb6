/** Workbench runs and calibration versions; see workbench.ts and service.ts for who may do what. */
import { Router } from 'express';
import { z } from 'zod';
import { createVersionSchema, transitionCommentSchema, updateVersionSchema, type Version } from '../../../shared/api/versions.ts';
import { workbenchRunSchema } from '../../../shared/api/workbench.ts';
import { requireUser } from '../../auth/middleware.ts';
import { validated } from '../../lib/validate.ts';
import type { FramesDeps } from '../frames/service.ts';
import { instrumentParams } from '../instruments/routes.ts';
import { approveVersion, createVersion, getVersion, listVersions, rejectVersion, submitVersion, updateVersion, withdrawVersion } from './service.ts';
import { getWorkbenchRun, runWorkbench } from './workbench.ts';

const versionParams = z.object({ versionId: z.uuid({ error: 'versionId must be a UUID' }) });
const runParams = z.object({ runId: z.uuid({ error: 'runId must be a UUID' }) });

/** Mounted at /api/instruments. */
export function instrumentVersionsRouter(deps: FramesDeps): Router {
  const { db } = deps;
  const router = Router();
  router.use(requireUser);
  router.post(
    '/:instrumentId/workbench/runs',
    validated({ params: instrumentParams, body: workbenchRunSchema }, async (req, res, { params, body }) => {
      res.status(201).json(await runWorkbench(deps, req.user!, params.instrumentId, body));
    }),
  );
  router.get(
    '/:instrumentId/versions',
    validated({ params: instrumentParams }, async (req, res, { params }) => {
      res.json(await listVersions(db, req.user!, params.instrumentId));
    }),
  );
  router.post(
    '/:instrumentId/versions',
    validated({ params: instrumentParams, body: createVersionSchema }, async (req, res, { params, body }) => {
      res.status(201).json(await createVersion(db, req.user!, params.instrumentId, body));
    }),
  );
  return router;
}

/** Mounted at /api/workbench. */
export function workbenchRouter(deps: FramesDeps): Router {
  const router = Router();
  router.use(requireUser);
  router.get(
    '/runs/:runId',
    validated({ params: runParams }, async (req, res, { params }) => {
      res.json(await getWorkbenchRun(deps.db, req.user!, params.runId));
    }),
  );
  return router;
}

/** Called after a committed transition (issue 5's notices and stale marks: server/modules/notices). */
export type VersionTransitionHook = (transition: 'submit' | 'approve' | 'reject' | 'withdraw', version: Version, actorId: string, comment: string) => Promise<void>;

/** Mounted at /api/versions. */
export function versionsRouter(deps: FramesDeps, onTransition?: VersionTransitionHook): Router {
  const { db } = deps;
  const router = Router();
  router.use(requireUser);
  router.get(
    '/:versionId',
    validated({ params: versionParams }, async (req, res, { params }) => {
      res.json(await getVersion(db, req.user!, params.versionId));
    }),
  );
  router.patch(
    '/:versionId',
    validated({ params: versionParams, body: updateVersionSchema }, async (req, res, { params, body }) => {
      res.json(await updateVersion(db, req.user!, params.versionId, body));
    }),
  );
  router.post(
    '/:versionId/submit',
    validated({ params: versionParams, body: transitionCommentSchema }, async (req, res, { params, body }) => {
      const version = await submitVersion(db, req.user!, params.versionId, body.comment);
      await onTransition?.('submit', version, req.user!.id, body.comment);
      res.json(version);
    }),
  );
  router.post(
    '/:versionId/approve',
    validated({ params: versionParams, body: transitionCommentSchema }, async (req, res, { params, body }) => {
      const version = await approveVersion(db, req.user!, params.versionId, body.comment);
      await onTransition?.('approve', version, req.user!.id, body.comment);
      res.json(version);
    }),
  );
  router.post(
    '/:versionId/reject',
    validated({ params: versionParams, body: transitionCommentSchema }, async (req, res, { params, body }) => {
      const version = await rejectVersion(db, req.user!, params.versionId, body.comment);
      await onTransition?.('reject', version, req.user!.id, body.comment);
      res.json(version);
    }),
  );
  router.post(
    '/:versionId/withdraw',
    validated({ params: versionParams, body: transitionCommentSchema }, async (req, res, { params, body }) => {
      const version = await withdrawVersion(db, req.user!, params.versionId, body.comment);
      await onTransition?.('withdraw', version, req.user!.id, body.comment);
      res.json(version);
    }),
  );
  return router;
}
