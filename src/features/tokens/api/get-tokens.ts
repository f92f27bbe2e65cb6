import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { ApiTokenInfo } from '../../../../shared/api/session.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/tokens: the user's personal API tokens (never the secrets). */
export function getTokens(signal?: AbortSignal): Promise<ApiTokenInfo[]> {
  return api.get<ApiTokenInfo[]>(paths.tokens(), signal);
}

export const tokensQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.tokens.list(),
    queryFn: ({ signal }) => getTokens(signal),
  });

/** The user's API tokens. */
export function useTokens() {
  return useQuery(tokensQueryOptions());
}
