/** What GET /api/session reports. */
import type { SessionInfo, SessionUser } from '../../../shared/api/session.ts';
import type { Executor } from '../../db/client.ts';
import { listMembershipsOfUser } from '../members/queries.ts';

export async function sessionInfo(db: Executor, user: SessionUser | undefined, csrfToken: string): Promise<SessionInfo> {
  if (!user) return { user: null, memberships: [], csrfToken };
  return { user, memberships: await listMembershipsOfUser(db, user.id), csrfToken };
}
