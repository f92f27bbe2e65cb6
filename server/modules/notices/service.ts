/**
 * Notices by e-mail through the mailer (the sink's Outbox in the demo): review requested → the
 * instrument's owners; approved / withdrawn / sent back → the author; superseded → whoever made
 * spectra with the old version in the last 30 days; run finished → its starter; drift → the
 * owners, once per episode. Sent after the change is committed; a mail that fails is logged and
 * never undoes the change (the state is the record, the mail a courtesy).
 */
import type { Executor } from '../../db/client.ts';
import type { Mailer, OutgoingMail } from '../../mail/mailer.ts';
import { clearStaleOfApprovedVersions, markVersionSpectraStale } from '../spectra/queries.ts';
import { findRecipient, instrumentName, listOwners, listSpectrumMakers, listVersionsSupersededBy, type Recipient } from './queries.ts';

export interface NoticeDeps {
  db: Executor;
  mailer: Mailer;
  /** Base URL for links, e.g. http://127.0.0.1:5480. */
  appUrl: string;
}

/** Users who made spectra within this window with a superseded version hear about it. */
export const SUPERSEDED_NOTICE_WINDOW_DAYS = 30;

export type VersionNoticeKind = 'review_requested' | 'approved' | 'rejected' | 'withdrawn' | 'superseded' | 'restored';

/** A version's state change, as the version service knows it after committing. */
export interface VersionStateEvent {
  kind: VersionNoticeKind;
  instrumentId: string;
  versionId: string;
  versionNumber: number;
  authorId: string;
  /** Who made the change (approver, withdrawer…). */
  actorId: string | null;
  comment?: string | null;
  /** For 'superseded': the version that took over. */
  byVersionNumber?: number | null;
}

async function sendAll(deps: NoticeDeps, recipients: Recipient[], mail: (r: Recipient) => Omit<OutgoingMail, 'to'>): Promise<number> {
  let sent = 0;
  const seen = new Set<string>();
  for (const r of recipients) {
    if (seen.has(r.id)) continue;
    seen.add(r.id);
    try {
      await deps.mailer.send({ to: r.email, ...mail(r) });
      sent++;
    } catch (error) {
      console.error(`notice to ${r.email} failed:`, (error as Error).message);
    }
  }
  return sent;
}

function instrumentLink(deps: NoticeDeps, instrumentId: string): string {
  return `${deps.appUrl}/instruments/${encodeURIComponent(instrumentId)}`;
}

/**
 * Call after a version's state change is committed (the version service's hook). Superseded and
 * withdrawn versions also mark their spectra stale; a restored one (its successor withdrawn)
 * clears the mark. Returns the number of mails sent.
 */
export async function notifyVersionState(deps: NoticeDeps, event: VersionStateEvent): Promise<number> {
  const { db } = deps;
  const name = await instrumentName(db, event.instrumentId);
  const link = instrumentLink(deps, event.instrumentId);
  const v = `version ${event.versionNumber} of ${name}`;
  const comment = event.comment ? `\n\nComment: ${event.comment}` : '';
  const author = await findRecipient(db, event.authorId);
  const actor = event.actorId ? await findRecipient(db, event.actorId) : undefined;
  const by = actor ? ` by ${actor.name}` : '';

  if (event.kind === 'superseded' || event.kind === 'withdrawn') await markVersionSpectraStale(db, event.versionId, true);
  if (event.kind === 'restored') await markVersionSpectraStale(db, event.versionId, false);

  switch (event.kind) {
    case 'review_requested': {
      // The author need not hear of their own submission, unless they are the only owner.
      const all = await listOwners(db, event.instrumentId);
      const others = all.filter((o) => o.id !== event.authorId);
      return sendAll(deps, others.length > 0 ? others : all, () => ({
        subject: `Review requested: calibration ${v}`,
        text: `${author?.name ?? 'Someone'} submitted calibration ${v} for review.\n\nReview it at ${link}${comment}\n`,
      }));
    }
    case 'approved':
    case 'rejected':
    case 'withdrawn': {
      if (!author) return 0;
      const verb = event.kind === 'approved' ? 'approved' : event.kind === 'rejected' ? 'sent back to draft' : 'withdrawn';
      return sendAll(deps, [author], () => ({
        subject: `Calibration ${v} ${verb}`,
        text: `Your calibration ${v} was ${verb}${by}.${comment}\n\n${link}\n`,
      }));
    }
    case 'superseded': {
      const since = new Date(Date.now() - SUPERSEDED_NOTICE_WINDOW_DAYS * 24 * 3600 * 1000);
      const makers = await listSpectrumMakers(db, [event.versionId], since);
      const successor = event.byVersionNumber ? ` by version ${event.byVersionNumber}` : '';
      return sendAll(deps, makers, () => ({
        subject: `Calibration ${v} superseded: your spectra are marked stale`,
        text:
          `Calibration ${v}, which you used for spectra in the last ${SUPERSEDED_NOTICE_WINDOW_DAYS} days, was superseded${successor}.\n` +
          `Those spectra are marked stale; re-apply them in one action on the instrument page:\n${link}\n`,
      }));
    }
    case 'restored':
      return 0;
  }
}

export interface RunFinishedEvent {
  runId: string;
  instrumentId: string;
  starterId: string;
  state: string;
  total: number;
  done: number;
  failed: number;
  cancelled: number;
}

export async function notifyRunFinished(deps: NoticeDeps, event: RunFinishedEvent): Promise<number> {
  const starter = await findRecipient(deps.db, event.starterId);
  if (!starter) return 0;
  const name = await instrumentName(deps.db, event.instrumentId);
  const link = `${deps.appUrl}/runs/${encodeURIComponent(event.runId)}`;
  return sendAll(deps, [starter], () => ({
    subject: `Run on ${name} ${event.state}: ${event.done} of ${event.total} frames done${event.failed ? `, ${event.failed} failed` : ''}`,
    text:
      `Your run of ${event.total} frames on ${name} is ${event.state}.\n` +
      `Done: ${event.done}. Failed: ${event.failed}. Cancelled: ${event.cancelled}.\n\n${link}\n`,
  }));
}

export interface DriftEpisodeEvent {
  instrumentId: string;
  frameId: string;
  takenAt: Date;
  versionNumber: number;
  shiftPx: number;
  shiftPxSigma: number;
  shiftMeV: number | null;
  matchedPeaks: number;
  threshold: { sigma: number; px: number };
}

export async function notifyDriftEpisode(deps: NoticeDeps, event: DriftEpisodeEvent): Promise<number> {
  const owners = await listOwners(deps.db, event.instrumentId);
  const name = await instrumentName(deps.db, event.instrumentId);
  const mev = event.shiftMeV != null ? ` (${event.shiftMeV.toFixed(0)} meV)` : '';
  return sendAll(deps, owners, () => ({
    subject: `Drift on ${name}: lines moved ${event.shiftPx.toFixed(2)} px against calibration version ${event.versionNumber}`,
    text:
      `The frame taken ${event.takenAt.toISOString()} shows its harmonic lines ${event.shiftPx.toFixed(2)} ± ${event.shiftPxSigma.toFixed(2)} px${mev} ` +
      `from where calibration version ${event.versionNumber} puts them (${event.matchedPeaks} lines; threshold ${event.threshold.sigma} σ and ${event.threshold.px} px).\n` +
      `The camera or grating may have moved: check the alignment and make a new calibration version.\n` +
      `This is the one notice for this episode; the next comes after frames are back within the threshold and drift again.\n\n` +
      `${instrumentLink(deps, event.instrumentId)}\n`,
  }));
}

export type VersionTransition = 'submit' | 'approve' | 'reject' | 'withdraw';

/**
 * The version routes' hook, called after a transition is committed: works out every notice the
 * transition implies (the versions an approval superseded; the versions a withdrawal restored),
 * keeps the spectra's stale marks in step, and sends the mails. Never throws: a failed notice
 * must not turn a committed transition into an error response.
 */
export async function afterVersionTransition(
  deps: NoticeDeps,
  transition: VersionTransition,
  version: { id: string; instrumentId: string; number: number; authorId: string | null },
  actorId: string,
  comment: string,
): Promise<void> {
  try {
    const base = { instrumentId: version.instrumentId, versionId: version.id, versionNumber: version.number, authorId: version.authorId ?? '', actorId, comment };
    if (transition === 'submit') await notifyVersionState(deps, { ...base, kind: 'review_requested' });
    if (transition === 'reject') await notifyVersionState(deps, { ...base, kind: 'rejected' });
    if (transition === 'approve') {
      await notifyVersionState(deps, { ...base, kind: 'approved' });
      for (const old of await listVersionsSupersededBy(deps.db, version.id)) {
        await notifyVersionState(deps, { ...base, kind: 'superseded', versionId: old.id, versionNumber: old.number, authorId: old.authorId ?? '', byVersionNumber: version.number, comment: null });
      }
    }
    if (transition === 'withdraw') {
      await notifyVersionState(deps, { ...base, kind: 'withdrawn' });
      // A withdrawn approval gives its predecessor its time back: that version's spectra are current again.
      await clearStaleOfApprovedVersions(deps.db, version.instrumentId);
    }
  } catch (error) {
    console.error(`notices after version ${version.number} ${transition} failed:`, (error as Error).message);
  }
}
