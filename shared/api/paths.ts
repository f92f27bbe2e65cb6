/** Every API URL in one place; the client and the tests build URLs only through `paths`. */
const enc = encodeURIComponent;

/** `?version=N&filterCorrection=true` for the spectrum routes, each part only when set. */
function spectrumQuery(version: number | undefined, filterCorrection: boolean): string {
  const parts = [version !== undefined ? `version=${version}` : '', filterCorrection ? 'filterCorrection=true' : ''].filter(Boolean);
  return parts.length > 0 ? `?${parts.join('&')}` : '';
}

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
  // Frames (issue 4)
  instrumentFrames: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/frames`,
  instrumentRegions: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/regions`,
  /** GET /api/frames with filters; undefined/empty values are left out. */
  frames: (query: Record<string, string | number | undefined> = {}) => {
    const qs = Object.entries(query)
      .filter(([, v]) => v !== undefined && v !== '')
      .map(([k, v]) => `${enc(k)}=${enc(String(v))}`)
      .join('&');
    return qs ? `/api/frames?${qs}` : '/api/frames';
  },
  frame: (frameId: string) => `/api/frames/${enc(frameId)}`,
  frameFile: (frameId: string) => `/api/frames/${enc(frameId)}/file`,
  framesBulkUpdate: () => '/api/frames/bulk-update',
  // Workbench and versions (issue 4)
  workbenchRuns: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/workbench/runs`,
  workbenchRun: (runId: string) => `/api/workbench/runs/${enc(runId)}`,
  instrumentVersions: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/versions`,
  version: (versionId: string) => `/api/versions/${enc(versionId)}`,
  versionSubmit: (versionId: string) => `/api/versions/${enc(versionId)}/submit`,
  versionApprove: (versionId: string) => `/api/versions/${enc(versionId)}/approve`,
  versionReject: (versionId: string) => `/api/versions/${enc(versionId)}/reject`,
  versionWithdraw: (versionId: string) => `/api/versions/${enc(versionId)}/withdraw`,
  // Spectra, runs, drift (issue 5)
  frameSpectrum: (frameId: string, version?: number, filterCorrection = false) => `/api/frames/${enc(frameId)}/spectrum${spectrumQuery(version, filterCorrection)}`,
  frameSpectrumCsv: (frameId: string, version?: number, filterCorrection = false) => `/api/frames/${enc(frameId)}/spectrum.csv${spectrumQuery(version, filterCorrection)}`,
  instrumentRuns: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/runs`,
  /** GET: the instrument's recent runs, newest first (POST to the same path starts one). */
  instrumentRunsList: (instrumentId: string, limit?: number) => `/api/instruments/${enc(instrumentId)}/runs${limit !== undefined ? `?limit=${limit}` : ''}`,
  instrumentReapply: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/spectra/reapply`,
  /** GET: the instrument's spectra (frame, version, stale, drift flag); `stale` filters. */
  instrumentSpectra: (instrumentId: string, stale?: boolean) => `/api/instruments/${enc(instrumentId)}/spectra${stale !== undefined ? `?stale=${stale}` : ''}`,
  instrumentDrift: (instrumentId: string) => `/api/instruments/${enc(instrumentId)}/drift`,
  run: (runId: string) => `/api/runs/${enc(runId)}`,
  runCancel: (runId: string) => `/api/runs/${enc(runId)}/cancel`,
  runRetry: (runId: string) => `/api/runs/${enc(runId)}/retry`,
  runScan: (runId: string, period?: number | 'detect') => `/api/runs/${enc(runId)}/scan${period !== undefined ? `?period=${enc(String(period))}` : ''}`,
  /** The page (not API) an invitation mail links to, relative to APP_URL. */
  invitePage: (token: string) => `/invite/${enc(token)}`,
} as const;
