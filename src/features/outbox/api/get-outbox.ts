import { queryOptions, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { OutboxMail } from '../../../../shared/api/audit.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/outbox (site admin): mails captured by the in-process sink, newest first. */
export function getOutbox(signal?: AbortSignal): Promise<OutboxMail[]> {
  return api.get<OutboxMail[]>(paths.outbox(), signal);
}

export const outboxQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.outbox.list(),
    queryFn: ({ signal }) => getOutbox(signal),
    // Mail arrives through SMTP a moment after the action that sent it.
    refetchInterval: 5_000,
  });

/** The captured mails. */
export function useOutbox() {
  return useQuery(outboxQueryOptions());
}
