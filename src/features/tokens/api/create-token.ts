import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { ApiTokenCreated, CreateTokenInput } from '../../../../shared/api/session.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/tokens → the secret, this once. */
export function createToken(input: CreateTokenInput): Promise<ApiTokenCreated> {
  return api.post<ApiTokenCreated>(paths.tokens(), input);
}

/** Creates a token; the list refetches (the secret stays only in the mutation's data). */
export function useCreateToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.tokens.all }),
  });
}
