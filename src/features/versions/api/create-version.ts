import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { CreateVersionInput, Version } from '../../../../shared/api/versions.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** POST /api/instruments/:instrumentId/versions — a draft from a unique workbench run. */
export function createVersion(instrumentId: string, input: CreateVersionInput): Promise<Version> {
  return api.post<Version>(paths.instrumentVersions(instrumentId), input);
}

/** Saves a draft; the instrument's version list refetches. */
export function useCreateVersion(instrumentId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateVersionInput) => createVersion(instrumentId, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.versions.list(instrumentId) }),
  });
}
