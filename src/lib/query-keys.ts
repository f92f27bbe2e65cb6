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
  tokens: {
    all: ['tokens'] as const,
    list: () => [...queryKeys.tokens.all, 'list'] as const,
  },
} as const;
