import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { InvitationPreview } from '../../../../shared/api/members.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/invitations/:token: what the invitee sees before accepting. */
export function getInvitation(token: string, signal?: AbortSignal): Promise<InvitationPreview> {
  return api.get<InvitationPreview>(paths.invitation(token), signal);
}

export const invitationQueryOptions = (token: string) =>
  queryOptions({
    queryKey: queryKeys.invitations.detail(token),
    queryFn: ({ signal }) => getInvitation(token, signal),
  });

/** The invitation behind a mailed link. */
export function useInvitation(token: string) {
  return useQuery(invitationQueryOptions(token));
}
