import { queryOptions, useQueries, useQuery } from '@tanstack/react-query';
import { paths } from '../../../../shared/api/paths.ts';
import type { VersionDetail } from '../../../../shared/api/versions.ts';
import { api } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** GET /api/versions/:versionId — with calibration, run result, inputs, people and history. */
export function getVersion(versionId: string, signal?: AbortSignal): Promise<VersionDetail> {
  return api.get<VersionDetail>(paths.version(versionId), signal);
}

export const versionQueryOptions = (versionId: string) =>
  queryOptions({ queryKey: queryKeys.versions.detail(versionId), queryFn: ({ signal }) => getVersion(versionId, signal) });

/** One version in full. */
export function useVersion(versionId: string | null) {
  return useQuery({ ...versionQueryOptions(versionId ?? ''), enabled: Boolean(versionId) });
}

/** Several versions in full (the drift chart needs every calibration). */
export function useVersionDetails(versionIds: string[]) {
  return useQueries({ queries: versionIds.map((id) => versionQueryOptions(id)) });
}
