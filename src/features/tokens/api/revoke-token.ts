import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** DELETE /api/tokens/:id */
export function revokeToken(tokenId: string): Promise<void> {
  return api.delete(paths.token(tokenId));
}

/** Revokes a token; the list refetches. */
export function useRevokeToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: revokeToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.tokens.all }),
  });
}
