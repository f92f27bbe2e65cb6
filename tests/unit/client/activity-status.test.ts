/**
 * The pure helpers behind the instrument page's Activity panel and the instruments list's status
 * line. Inputs are invented, shaped like the demo story (README "The demo story"): v1–v3 approved
 * in turn, v4 in review; daily frames days apart, a scan's frames minutes apart.
 */
import { describe, expect, it } from 'vitest';
import type { Version } from '../../../shared/api/versions.ts';
import { calibrationStatus } from '@/features/versions/lib/calibration-status';
import { driftFlaggedFrameCount } from '@/features/spectra/lib/drift-flags';
import { groupSpectrumBursts } from '@/features/spectra/lib/spectrum-bursts';

const version = (number: number, state: Version['state'], validFrom: string, validUntil: string | null = null) => ({ id: `v${number}`, number, state, validFrom, validUntil }) as Version;

describe('calibrationStatus', () => {
  // Approved intervals are [validFrom, validUntil) (shared/api/versions.ts): the start is in, the end is out.
  const versions = [
    version(4, 'in_review', '2026-11-24T09:00:00Z'),
    version(3, 'approved', '2026-11-02T08:00:00Z'),
    version(2, 'superseded', '2026-10-05T08:00:00Z', '2026-11-02T08:00:00Z'),
    version(1, 'superseded', '2026-09-01T08:00:00Z', '2026-10-05T08:00:00Z'),
  ];
  it('finds the approved version covering now and lists those in review', () => {
    const s = calibrationStatus(versions, Date.parse('2026-12-02T06:00:00Z'));
    expect(s.inForce?.number).toBe(3);
    expect(s.inReview.map((v) => v.number)).toEqual([4]);
  });
  it.each([
    ['2026-11-02T08:00:00Z', 3],
    ['2026-11-02T07:59:59Z', null],
  ])('at %s the version in force is %s (an approved version with a closed end stops at validUntil)', (now, expected) => {
    const closed = [version(3, 'approved', '2026-11-02T08:00:00Z'), version(2, 'approved', '2026-10-05T08:00:00Z', '2026-11-01T00:00:00Z')];
    expect(calibrationStatus(closed, Date.parse(now)).inForce?.number ?? null).toBe(expected);
  });
  it('says none when nothing is approved', () => {
    expect(calibrationStatus([version(1, 'draft', '2026-09-01T08:00:00Z')], Date.parse('2026-12-01T00:00:00Z')).inForce).toBeNull();
  });
});

describe('driftFlaggedFrameCount', () => {
  it('counts frames, not spectra, and ignores stale spectra', () => {
    expect(
      driftFlaggedFrameCount([
        { frameId: 'a', stale: false, driftFlagged: true },
        { frameId: 'a', stale: false, driftFlagged: true },
        { frameId: 'b', stale: true, driftFlagged: true },
        { frameId: 'c', stale: false, driftFlagged: false },
      ]),
    ).toBe(1);
  });
});

describe('groupSpectrumBursts', () => {
  const s = (takenAt: string, version = 3, driftFlagged = false) => ({ takenAt, version, driftFlagged, stale: false });
  it('folds frames minutes apart into one group and keeps daily frames apart', () => {
    const items = [
      s('2026-11-25T14:45:00Z', 3, true),
      s('2026-11-18T14:34:30Z'),
      s('2026-11-18T14:33:00Z'),
      s('2026-11-18T14:31:30Z'),
      s('2026-11-16T10:00:00Z'),
      s('2026-11-10T10:00:00Z'),
    ];
    const groups = groupSpectrumBursts(items);
    expect(groups.map((g) => g.items.length)).toEqual([1, 3, 1, 1]);
    expect(groups[0]!.driftFlagged).toBe(1);
    expect(groups[1]!.newest.takenAt).toBe('2026-11-18T14:34:30Z');
    expect(groups[1]!.oldest.takenAt).toBe('2026-11-18T14:31:30Z');
  });
  it('splits at a gap just over the limit and at a change of version', () => {
    const gapMs = 10 * 60 * 1000;
    expect(groupSpectrumBursts([s('2026-11-18T14:10:00Z'), s('2026-11-18T14:00:00Z')], gapMs).length).toBe(1);
    expect(groupSpectrumBursts([s('2026-11-18T14:10:01Z'), s('2026-11-18T14:00:00Z')], gapMs).length).toBe(2);
    expect(groupSpectrumBursts([s('2026-11-18T14:01:00Z', 4), s('2026-11-18T14:00:00Z', 3)]).length).toBe(2);
  });
});
