/**
 * Spectra: apply the calibration valid at a frame's time (or a chosen version) with the same
 * code path as `orderly apply` (server/cli/commands.ts `runApplyDetailed`), measure the frame's
 * drift against it, store the result once per (frame, version), and keep drift episodes.
 *
 * Regions: the frame's own saved regions, else the instrument's default, else the bands the
 * calibration was made with (which the engine found automatically when none were drawn) — the
 * last case is exactly what `orderly apply` does.
 */
import { DEFAULT_DRIFT_THRESHOLD, computeDrift, exceedsThreshold, type DriftThreshold } from '../../../shared/analysis/drift.ts';
import type { Regions } from '../../../shared/api/frames.ts';
import type { DriftPoint, DriftSeries, RegionsSource, SpectrumResponse } from '../../../shared/api/spectra.ts';
import type { SpectrumList } from '../../../shared/api/spectra-list.ts';
import type { SessionUser } from '../../../shared/api/session.ts';
import { EngineError } from '../../../shared/engine/errors.ts';
import { runApplyDetailed } from '../../cli/commands.ts';
import type { Db, Executor } from '../../db/client.ts';
import type { SpectrumRow } from '../../db/schema/index.ts';
import { HttpError, NotFoundError } from '../../lib/errors.ts';
import type { Mailer } from '../../mail/mailer.ts';
import type { FrameStore } from '../../storage/frame-store.ts';
import { instrumentAccess } from '../../auth/access.ts';
import { findInstrumentById } from '../instruments/queries.ts';
import { recordAudit } from '../audit/service.ts';
import { notifyDriftEpisode } from '../notices/service.ts';
import { closeEpisode, findSpectrum, listDriftRows, listEpisodes, listSpectrumSummaries, listStaleFrameIds, openEpisode, upsertSpectrum, type SpectrumUpsert } from './queries.ts';
import type { FrameFacts, SpectrumSources, VersionFacts } from './sources.ts';

export interface SpectraDeps {
  db: Db;
  store: FrameStore;
  sources: SpectrumSources;
  mailer: Mailer;
  appUrl: string;
}

/** 409 `no_calibration`: nothing approved covers the frame's time. */
export class NoCalibrationError extends HttpError {
  constructor(message: string) {
    super(409, 'no_calibration', message);
  }
}

/** Roles that may make (store) spectra; viewers read them, computed on the fly when not stored. */
const MAKERS = new Set(['owner', 'scientist', 'student']);

export function mayMakeSpectra(access: { isAdmin: boolean; role: string | null }): boolean {
  return access.isAdmin || (access.role !== null && MAKERS.has(access.role));
}

export async function driftThresholdOf(db: Executor, instrumentId: string): Promise<DriftThreshold> {
  const instrument = await findInstrumentById(db, instrumentId);
  return instrument?.settings.driftThreshold ?? DEFAULT_DRIFT_THRESHOLD;
}

/** The version for a frame: `versionNumber` when given, else the one valid at the frame's time. */
export async function resolveVersion(deps: Pick<SpectraDeps, 'db' | 'sources'>, frame: FrameFacts, versionNumber?: number | null): Promise<VersionFacts> {
  if (versionNumber != null) {
    const version = await deps.sources.versionByNumber(deps.db, frame.instrumentId, versionNumber);
    if (!version) throw new NotFoundError(`This instrument has no calibration version ${versionNumber}.`);
    if (version.state === 'withdrawn') throw new HttpError(409, 'state', `Version ${versionNumber} is withdrawn and cannot be applied.`);
    return version;
  }
  const version = await deps.sources.versionValidAt(deps.db, frame.instrumentId, frame.takenAt);
  if (!version) {
    throw new NoCalibrationError(
      `No approved calibration of this instrument covers ${frame.takenAt.toISOString()}, when the frame was taken; approve a version valid from that time or choose one with ?version=N.`,
    );
  }
  return version;
}

async function resolveRegions(deps: Pick<SpectraDeps, 'db' | 'sources'>, frame: FrameFacts): Promise<{ regions: Regions | null; source: RegionsSource }> {
  if (frame.regions) return { regions: frame.regions, source: 'frame' };
  const instrument = await deps.sources.instrumentRegions(deps.db, frame.instrumentId);
  if (instrument) return { regions: instrument, source: 'instrument' };
  return { regions: null, source: 'calibration' };
}

/** Engine failures on a stored frame are the frame's problem, not the server's: 422-like 400. */
function engineFailure(error: unknown): never {
  if (error instanceof EngineError) throw new HttpError(400, 'validation', `The calibration cannot be applied to this frame: ${error.message}`);
  throw error;
}

interface Computed {
  values: SpectrumUpsert;
  drift: ReturnType<typeof computeDrift>;
}

async function compute(deps: SpectraDeps, frame: FrameFacts, version: VersionFacts, userId: string | null, filterCorrection = false): Promise<Computed> {
  const { regions, source } = await resolveRegions(deps, frame);
  const bytes = await deps.store.get(frame.sha256);
  let detailed: Awaited<ReturnType<typeof runApplyDetailed>>;
  try {
    detailed = await runApplyDetailed({
      frameBytes: bytes,
      page: frame.page,
      calibrationJson: version.calibration,
      regions: regions ? { signal: regions.signal, background: regions.background, lineShape: regions.lineShape } : undefined,
      applyOptions: { ...(filterCorrection ? { filterCorrection: true } : {}), ...(frame.parity ? { parity: frame.parity } : {}) },
    });
  } catch (error) {
    engineFailure(error);
  }
  const threshold = await driftThresholdOf(deps.db, frame.instrumentId);
  const drift = computeDrift({ orders: detailed.spectrum.orders, peaks: detailed.peaks, calibration: detailed.calibration }, threshold);
  return {
    drift,
    values: {
      instrumentId: frame.instrumentId,
      frameId: frame.id,
      versionId: version.id,
      versionNumber: version.number,
      result: detailed.spectrum,
      regions,
      regionsSource: source,
      driftShiftPx: drift.shiftPx,
      driftShiftPxSigma: drift.shiftPxSigma,
      driftShiftMeV: drift.shiftMeV,
      driftShiftMeVSigma: drift.shiftMeVSigma,
      driftMatchedPeaks: drift.matchedPeaks,
      driftFlagged: drift.flagged,
      createdBy: userId,
    },
  };
}

/** Opens an episode on the first flagged spectrum (and notifies once), closes it on one back within threshold. */
async function trackDrift(deps: SpectraDeps, frame: FrameFacts, row: SpectrumRow, threshold: DriftThreshold): Promise<void> {
  if (row.driftFlagged) {
    const opened = await openEpisode(deps.db, { instrumentId: frame.instrumentId, firstSpectrumId: row.id, firstFrameId: frame.id });
    if (opened) {
      await notifyDriftEpisode(deps, {
        instrumentId: frame.instrumentId,
        frameId: frame.id,
        takenAt: frame.takenAt,
        versionNumber: row.versionNumber,
        shiftPx: row.driftShiftPx ?? 0,
        shiftPxSigma: row.driftShiftPxSigma ?? 0,
        shiftMeV: row.driftShiftMeV,
        matchedPeaks: row.driftMatchedPeaks,
        threshold,
      });
    }
  } else if (row.driftMatchedPeaks >= 2) {
    // One matched line is too little to say the camera is back in place.
    await closeEpisode(deps.db, frame.instrumentId);
  }
}

export function toSpectrumResponse(row: SpectrumRow, version: Pick<VersionFacts, 'instrumentId' | 'number' | 'id' | 'state'>, threshold: DriftThreshold): SpectrumResponse {
  return {
    ...row.result,
    calibration: { instrumentId: version.instrumentId, version: version.number, versionId: version.id, state: version.state, stale: row.stale },
    drift: {
      shiftPx: row.driftShiftPx,
      shiftPxSigma: row.driftShiftPxSigma,
      shiftMeV: row.driftShiftMeV,
      shiftMeVSigma: row.driftShiftMeVSigma,
      // Against the owner's current threshold (the stored flag is the one the episode logic saw).
      flagged: exceedsThreshold(row.driftShiftPx, row.driftShiftPxSigma, threshold),
      matchedPeaks: row.driftMatchedPeaks,
      threshold,
    },
  };
}

/**
 * Make (or reuse) the spectrum of `frame` with `version`, stored once per (frame, version). A
 * stored one is reused when its regions are still the frame's; `force` always recomputes.
 */
export async function makeSpectrum(
  deps: SpectraDeps,
  frame: FrameFacts,
  version: VersionFacts,
  userId: string | null,
  options: { force?: boolean; auditActorId?: string | null } = {},
): Promise<SpectrumRow> {
  if (!options.force) {
    const existing = await findSpectrum(deps.db, frame.id, version.id);
    if (existing) {
      const { regions } = await resolveRegions(deps, frame);
      if (JSON.stringify(existing.regions ?? null) === JSON.stringify(regions ?? null)) return existing;
    }
  }
  const { values, drift } = await compute(deps, frame, version, userId);
  const row = await deps.db.transaction(async (tx) => {
    const stored = await upsertSpectrum(tx, values);
    await recordAudit(tx, {
      actorId: options.auditActorId ?? userId,
      action: 'spectrum.make',
      entityType: 'spectrum',
      entityId: stored.id,
      instrumentId: frame.instrumentId,
      before: null,
      after: { frameId: frame.id, version: version.number, regionsSource: values.regionsSource, driftFlagged: values.driftFlagged },
    });
    return stored;
  });
  // Drift episodes watch the calibration in force: a spectrum made on purpose with another
  // version (an old one, say) measures that version against the frame, not the instrument's drift.
  const inForce = await deps.sources.versionValidAt(deps.db, frame.instrumentId, frame.takenAt);
  if (inForce?.id === version.id) await trackDrift(deps, frame, row, drift.threshold);
  return row;
}

/**
 * GET /api/frames/:frameId/spectrum[?version=N][&filterCorrection=true]. The stored spectrum is
 * the uncorrected one (what `orderly apply` prints); a filter-corrected one is computed per request.
 */
export async function getSpectrum(deps: SpectraDeps, user: SessionUser, frameId: string, versionNumber?: number, options: { filterCorrection?: boolean } = {}): Promise<SpectrumResponse> {
  const frame = await deps.sources.frame(deps.db, frameId);
  if (!frame) throw new NotFoundError('No such frame.');
  const access = await instrumentAccess(deps.db, user, frame.instrumentId).catch(() => {
    throw new NotFoundError('No such frame.');
  });
  if (frame.kind === 'dark') throw new HttpError(400, 'validation', 'This is a dark frame; spectra are made from signal frames.');
  const version = await resolveVersion(deps, frame, versionNumber);
  const threshold = await driftThresholdOf(deps.db, frame.instrumentId);
  const maker = mayMakeSpectra(access);
  const stored = maker ? await makeSpectrum(deps, frame, version, user.id) : await findSpectrum(deps.db, frame.id, version.id);
  if (stored && !options.filterCorrection) return toSpectrumResponse(stored, version, threshold);
  // Viewers without a stored spectrum, and filter-corrected requests: computed for this answer, not kept.
  const { values } = await compute(deps, frame, version, null, options.filterCorrection);
  const now = new Date();
  const transient: SpectrumRow = {
    ...values,
    id: stored?.id ?? '',
    regions: values.regions ?? null,
    driftShiftPx: values.driftShiftPx ?? null,
    driftShiftPxSigma: values.driftShiftPxSigma ?? null,
    driftShiftMeV: values.driftShiftMeV ?? null,
    driftShiftMeVSigma: values.driftShiftMeVSigma ?? null,
    driftMatchedPeaks: values.driftMatchedPeaks ?? 0,
    driftFlagged: values.driftFlagged ?? false,
    createdBy: null,
    stale: stored?.stale ?? false,
    createdAt: now,
    updatedAt: now,
  };
  return toSpectrumResponse(transient, version, threshold);
}

/** GET /api/instruments/:instrumentId/drift — one point per frame (its latest fresh spectrum). */
export async function driftSeries(deps: Pick<SpectraDeps, 'db'>, user: SessionUser, instrumentId: string, from?: Date, to?: Date): Promise<DriftSeries> {
  await instrumentAccess(deps.db, user, instrumentId);
  const threshold = await driftThresholdOf(deps.db, instrumentId);
  const rows = await listDriftRows(deps.db, instrumentId, from, to);
  const seen = new Set<string>();
  const points: DriftPoint[] = [];
  for (const { spectrum: s, takenAt } of rows) {
    if (seen.has(s.frameId)) continue;
    seen.add(s.frameId);
    points.push({
      spectrumId: s.id,
      frameId: s.frameId,
      takenAt: takenAt.toISOString(),
      version: s.versionNumber,
      shiftPx: s.driftShiftPx!,
      shiftPxSigma: s.driftShiftPxSigma ?? 0,
      shiftMeV: s.driftShiftMeV,
      flagged: exceedsThreshold(s.driftShiftPx, s.driftShiftPxSigma, threshold),
      matchedPeaks: s.driftMatchedPeaks,
    });
  }
  const episodes = (await listEpisodes(deps.db, instrumentId, from, to)).map((e) => ({
    id: e.id,
    openedAt: e.openedAt.toISOString(),
    closedAt: e.closedAt?.toISOString() ?? null,
    firstFrameId: e.firstFrameId,
  }));
  return { instrumentId, threshold, points, episodes };
}

/** GET /api/instruments/:instrumentId/spectra[?stale=true|false&limit=N] — every member may read. */
export async function listInstrumentSpectra(deps: Pick<SpectraDeps, 'db'>, user: SessionUser, instrumentId: string, query: { stale?: boolean; limit: number }): Promise<SpectrumList> {
  await instrumentAccess(deps.db, user, instrumentId);
  const rows = await listSpectrumSummaries(deps.db, instrumentId, query);
  const staleFrames = (await listStaleFrameIds(deps.db, instrumentId)).length;
  return {
    items: rows.map(({ spectrum: s, frameName, takenAt, versionState }) => ({
      id: s.id,
      frameId: s.frameId,
      frameName,
      takenAt: takenAt.toISOString(),
      versionId: s.versionId,
      version: s.versionNumber,
      versionState,
      stale: s.stale,
      driftFlagged: s.driftFlagged,
      createdAt: s.createdAt.toISOString(),
      updatedAt: s.updatedAt.toISOString(),
    })),
    staleFrames,
  };
}
