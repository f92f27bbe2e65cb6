/** Members (/api/instruments/:instrumentId/members…, …/invitations) and invitation links (/api/invitations/:token…). */
import { Router } from 'express';
import { z } from 'zod';
import { acceptInvitationSchema, createInvitationSchema, updateMemberSchema, type AcceptInvitationResult } from '../../../shared/api/members.ts';
import type { Db } from '../../db/client.ts';
import { requireUser } from '../../auth/middleware.ts';
import { validated } from '../../lib/validate.ts';
import type { Mailer } from '../../mail/mailer.ts';
import { startSession } from '../session/routes.ts';
import { acceptInvitation, changeRole, inviteMember, listMembers, previewInvitation, removeMember } from './service.ts';

const instrumentParams = z.object({ instrumentId: z.uuid({ error: 'instrumentId must be a UUID' }) });
const memberParams = instrumentParams.extend({ userId: z.uuid({ error: 'userId must be a UUID' }) });
const tokenParams = z.object({ token: z.string().min(16, { message: 'token is malformed' }).max(200) });

/** Mounted at /api/instruments. */
export function membersRouter(deps: { db: Db; mailer: Mailer; appUrl: string }): Router {
  const { db } = deps;
  const router = Router();
  router.use(requireUser);
  router.get(
    '/:instrumentId/members',
    validated({ params: instrumentParams }, async (req, res, { params }) => {
      res.json(await listMembers(db, req.user!, params.instrumentId));
    }),
  );
  router.patch(
    '/:instrumentId/members/:userId',
    validated({ params: memberParams, body: updateMemberSchema }, async (req, res, { params, body }) => {
      await changeRole(db, req.user!, params.instrumentId, params.userId, body.role);
      res.json(await listMembers(db, req.user!, params.instrumentId));
    }),
  );
  router.delete(
    '/:instrumentId/members/:userId',
    validated({ params: memberParams }, async (req, res, { params }) => {
      await removeMember(db, req.user!, params.instrumentId, params.userId);
      res.status(204).end();
    }),
  );
  router.post(
    '/:instrumentId/invitations',
    validated({ params: instrumentParams, body: createInvitationSchema }, async (req, res, { params, body }) => {
      res.status(201).json(await inviteMember(deps, req.user!, params.instrumentId, body));
    }),
  );
  return router;
}

/** Mounted at /api/invitations; no sign-in needed (the token is the credential). */
export function invitationsRouter(db: Db): Router {
  const router = Router();
  router.get(
    '/:token',
    validated({ params: tokenParams }, async (_req, res, { params }) => {
      res.json(await previewInvitation(db, params.token));
    }),
  );
  router.post(
    '/:token/accept',
    validated({ params: tokenParams, body: acceptInvitationSchema }, async (req, res, { params, body }) => {
      const result = await acceptInvitation(db, req.user, params.token, body);
      const csrfToken = result.accountCreated ? await startSession(req, result.user) : req.session.csrfToken!;
      const response: AcceptInvitationResult = { ...result, csrfToken };
      res.json(response);
    }),
  );
  return router;
}
