/** Every API URL in one place; the client and the tests build URLs only through `paths`. */
const enc = encodeURIComponent;

export const paths = {
  health: () => '/api/health',
  session: () => '/api/session',
  tokens: () => '/api/tokens',
  token: (tokenId: string) => `/api/tokens/${enc(tokenId)}`,
  instruments: () => '/api/instruments',
  instrument: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}`,
  members: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/members`,
  member: (instrumentId: string, userId: string) => `/api/instruments/${enc(instrumentId)}/members/${enc(userId)}`,
  invitations: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/invitations`,
  invitation: (token: string) => `/api/invitations/${enc(token)}`,
  acceptInvitation: (token: string) => `/api/invitations/${enc(token)}/accept`,
  outbox: () => '/api/outbox',
  audit: (instrumentId?: string) => (instrumentId ? `/api/audit?instrumentId=${enc(instrumentId)}` : '/api/audit'),
  /** The page (not API) an invitation mail links to, relative to APP_URL. */
  invitePage: (token: string) => `/invite/${enc(token)}`,
} as const;
