import { QueryClient } from '@tanstack/react-query';
import { ApiError } from './api-client';

/**
 * Builds the app's QueryClient. Errors the server meant (4xx) are not retried: repeating a
 * refused request only delays the message the user needs to read.
 */
export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        refetchOnWindowFocus: false,
        retry: (failureCount, error) =>
          !(error instanceof ApiError && error.status < 500) && failureCount < 2,
      },
      mutations: { retry: false },
    },
  });
}
