import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { MembersResponse } from '../../../../shared/api/members.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/instruments/:instrumentId/members: members, and pending invitations for managers. */
export function getMembers(instrumentId: string, signal?: AbortSignal): Promise<MembersResponse> {
  return api.get<MembersResponse>(paths.members(instrumentId), signal);
}

export const membersQueryOptions = (instrumentId: string) =>
  queryOptions({
    queryKey: queryKeys.instruments.members(instrumentId),
    queryFn: ({ signal }) => getMembers(instrumentId, signal),
  });

/** The members of one instrument with their roles, and invitations still waiting. */
export function useMembers(instrumentId: string) {
  return useQuery(membersQueryOptions(instrumentId));
}
