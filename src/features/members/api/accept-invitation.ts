import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { AcceptInvitationInput, AcceptInvitationResult } from '../../../../shared/api/members.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/invitations/:token/accept: creates the account (and signs in) or adds the membership. */
export function acceptInvitation(token: string, input: AcceptInvitationInput): Promise<AcceptInvitationResult> {
  return api.post<AcceptInvitationResult>(paths.acceptInvitation(token), input);
}

/** Accepts an invitation; afterwards the user may be someone new, so every cached answer goes. */
export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: AcceptInvitationInput) => acceptInvitation(token, input),
    onSuccess: async () => {
      queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== queryKeys.session.all[0] });
      await queryClient.invalidateQueries({ queryKey: queryKeys.session.all });
    },
  });
}
