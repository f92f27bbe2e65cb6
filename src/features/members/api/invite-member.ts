import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { CreateInvitationInput, InvitationCreated } from '../../../../shared/api/members.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/instruments/:instrumentId/invitations: the server mails a one-time link. */
export function inviteMember(instrumentId: string, input: CreateInvitationInput): Promise<InvitationCreated> {
  return api.post<InvitationCreated>(paths.invitations(instrumentId), input);
}

/** Invites someone by e-mail; the member list and the outbox refetch. */
export function useInviteMember(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateInvitationInput) => inviteMember(instrumentId, input),
    onSuccess: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.instruments.members(instrumentId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.outbox.all }),
      ]);
    },
  });
}
