/**
 * Every TanStack Query key of the client, in one place, from general to specific.
 *
 * Each key holds every variable its query reads, so invalidating a prefix (e.g.
 * `queryKeys.instruments.all`) reaches every query below it.
 */
export const queryKeys = {
  session: {
    all: ['session'] as const,
    current: () => [...queryKeys.session.all, 'current'] as const,
  },
  instruments: {
    all: ['instruments'] as const,
    list: () => [...queryKeys.instruments.all, 'list'] as const,
    detail: (instrumentId: string) => [...queryKeys.instruments.all, 'detail', instrumentId] as const,
    members: (instrumentId: string) =>
      [...queryKeys.instruments.all, 'detail', instrumentId, 'members'] as const,
  },
  invitations: {
    all: ['invitations'] as const,
    detail: (token: string) => [...queryKeys.invitations.all, token] as const,
  },
  outbox: {
    all: ['outbox'] as const,
    list: () => [...queryKeys.outbox.all, 'list'] as const,
  },
  frames: {
    all: ['frames'] as const,
    list: (query: Record<string, string | number | undefined>) => [...queryKeys.frames.all, 'list', query] as const,
    detail: (frameId: string) => [...queryKeys.frames.all, 'detail', frameId] as const,
    /** The stored file decoded in the worker (immutable: the file never changes). */
    decoded: (frameId: string, page: number) => [...queryKeys.frames.all, 'decoded', frameId, page] as const,
  },
  versions: {
    all: ['versions'] as const,
    list: (instrumentId: string) => [...queryKeys.versions.all, 'list', instrumentId] as const,
    detail: (versionId: string) => [...queryKeys.versions.all, 'detail', versionId] as const,
  },
  spectra: {
    all: ['spectra'] as const,
    /** A frame's spectrum; `version` undefined = the version valid at the frame's time. */
    detail: (frameId: string, version: number | undefined, filterCorrection = false) => [...queryKeys.spectra.all, 'detail', frameId, version ?? 'valid', filterCorrection ? 'filter-corrected' : 'as-measured'] as const,
    /** An instrument's spectra list; `stale` undefined = all. */
    list: (instrumentId: string, stale: boolean | undefined) => [...queryKeys.spectra.all, 'list', instrumentId, stale ?? 'all'] as const,
  },
  runs: {
    all: ['runs'] as const,
    detail: (runId: string) => [...queryKeys.runs.all, 'detail', runId] as const,
    /** An instrument's newest `limit` runs (counts only, no items). */
    list: (instrumentId: string, limit: number) => [...queryKeys.runs.all, 'list', instrumentId, limit] as const,
    scan: (runId: string, period: number | 'detect' | undefined) => [...queryKeys.runs.all, 'scan', runId, period ?? 'run'] as const,
  },
  drift: {
    all: ['drift'] as const,
    series: (instrumentId: string) => [...queryKeys.drift.all, 'series', instrumentId] as const,
  },
  tokens: {
    all: ['tokens'] as const,
    list: () => [...queryKeys.tokens.all, 'list'] as const,
  },
} as const;
