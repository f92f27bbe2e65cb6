import { useMutation, useQueryClient } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { Version } from '../../../../shared/api/versions.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export type VersionTransition = 'submit' | 'approve' | 'reject' | 'withdraw';

const urls: Record<VersionTransition, (versionId: string) => string> = {
  submit: paths.versionSubmit,
  approve: paths.versionApprove,
  reject: paths.versionReject,
  withdraw: paths.versionWithdraw,
};

/** POST /api/versions/:versionId/{submit|approve|reject|withdraw} with an optional comment. */
export function transitionVersion(versionId: string, action: VersionTransition, comment = ''): Promise<Version> {
  return api.post<Version>(urls[action](versionId), { comment });
}

/** Moves a version to its next state; every version query refetches (approval supersedes others). */
export function useTransitionVersion(versionId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ action, comment }: { action: VersionTransition; comment?: string }) => transitionVersion(versionId, action, comment),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.versions.all }),
  });
}

/** The same for a version chosen at call time (the workbench submits the draft it just saved). */
export function useTransitionAnyVersion() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ versionId, action, comment }: { versionId: string; action: VersionTransition; comment?: string }) => transitionVersion(versionId, action, comment),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.versions.all }),
  });
}
