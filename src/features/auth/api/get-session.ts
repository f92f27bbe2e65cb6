import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { SessionInfo } from '../../../../shared/api/session.ts';
import type { Role } from '../../../../shared/api/members.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/session: always 200; `user` is null when signed out. */
export function getSession(signal?: AbortSignal): Promise<SessionInfo> {
  return api.get<SessionInfo>(paths.session(), signal);
}

/** The session query; its `csrfToken` is what the api client sends on state-changing calls. */
export const sessionQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.session.current(),
    queryFn: ({ signal }) => getSession(signal),
    staleTime: 60_000,
  });

/** The current session (user, memberships, CSRF token). */
export function useSession() {
  return useQuery(sessionQueryOptions());
}

/** The signed-in user's role on one instrument, from the session's memberships (null when none). */
export function roleOn(session: SessionInfo | undefined, instrumentId: string): Role | null {
  return session?.memberships.find((m) => m.instrumentId === instrumentId)?.role ?? null;
}

/**
 * Whether the session may manage an instrument (edit the profile, invite, change roles):
 * a site admin or the instrument's owner. Only hides controls; the server decides.
 */
export function canManageInstrument(session: SessionInfo | undefined, instrumentId: string): boolean {
  return Boolean(session?.user?.isAdmin) || roleOn(session, instrumentId) === 'owner';
}
