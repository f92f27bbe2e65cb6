/** Which calibration applies now and which wait for a review, from the instrument's version list. */
import type { Version } from '../../../../shared/api/versions.ts';

export interface CalibrationStatus {
  /** The approved version whose validity [validFrom, validUntil) holds `nowMs`, if any. */
  inForce: Version | null;
  /** Versions submitted for review, oldest number first. */
  inReview: Version[];
}

export function calibrationStatus(versions: readonly Version[], nowMs: number): CalibrationStatus {
  const inForce =
    versions
      .filter((v) => v.state === 'approved' && Date.parse(v.validFrom) <= nowMs && (v.validUntil === null || nowMs < Date.parse(v.validUntil)))
      // Approved intervals do not overlap; the latest start wins should the data ever disagree.
      .sort((a, b) => Date.parse(b.validFrom) - Date.parse(a.validFrom))[0] ?? null;
  const inReview = versions.filter((v) => v.state === 'in_review').sort((a, b) => a.number - b.number);
  return { inForce, inReview };
}
