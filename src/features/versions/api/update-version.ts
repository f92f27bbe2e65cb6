import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { UpdateVersionInput, Version } from '../../../../shared/api/versions.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** PATCH /api/versions/:versionId — drafts only (note, validity). */
export function updateVersion(versionId: string, input: UpdateVersionInput): Promise<Version> {
  return api.patch<Version>(paths.version(versionId), input);
}

/** Edits a draft; version queries refetch. */
export function useUpdateVersion(versionId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateVersionInput) => updateVersion(versionId, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.versions.all }),
  });
}
