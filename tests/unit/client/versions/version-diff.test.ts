/**
 * The browser-side comparison of two calibration versions and the role rules the version page
 * mirrors. Contrived problem: version b is version a moved by a known number of pixels, so the
 * shift must come back exactly; the energy change is worked by hand from E = hc/λ (CODATA 2018 hc).
 */
import { describe, expect, it } from 'vitest';
import type { Calibration } from '../../../../shared/engine/types.ts';
import { HC_EV_NM } from '../../../../shared/engine/constants.ts';
import { diffVersions } from '../../../../src/features/versions/lib/version-diff.ts';
import { allowedVersionActions } from '../../../../src/features/versions/lib/version-permissions.ts';

/** A linear Chebyshev map λ(p) = c0 + c1·u, u = (2p − 1023)/1023, without uncertainty. */
function linearMap(c0: number, c1: number): Calibration {
  return {
    format: 'orderly-calibration/1',
    model: 'polynomial',
    spectralAxis: 'x',
    pixelCount: 1024,
    polynomial: { degree: 1, domainPx: [0, 1023], coefficients: [c0, c1], covariance: [[0, 0], [0, 0]], degreeCriterion: 'test' },
    driverNm: 800,
    driverSigmaNm: 0,
    parity: 'odd',
    absoluteScale: 'anchored',
    scaleSigmaRelative: 0,
    residualRmsNm: 0,
    reducedChiSquare: 1,
    points: [],
    filters: [],
    notes: [],
  };
}

describe('diffVersions', () => {
  it.each([6, -3.5, 0.25])('recovers a camera move of %f px at every pixel', (movePx) => {
    const a = linearMap(12, -1.5);
    // b(p) = a(p − move): shift c0 by −c1·(2·move/1023).
    const b = linearMap(12 - -1.5 * ((2 * movePx) / 1023), -1.5);
    const d = diffVersions(a, b, 64);
    for (let i = 0; i < d.pixel.length; i++) {
      if (Number.isNaN(d.shiftPx[i])) continue; // past the camera's end
      expect(d.shiftPx[i]).toBeCloseTo(movePx, 6);
      const p = d.pixel[i];
      const u = (2 * p - 1023) / 1023;
      const la = 12 - 1.5 * u;
      const lb = la - -1.5 * ((2 * movePx) / 1023);
      expect(d.shiftMeV[i]).toBeCloseTo((HC_EV_NM / lb - HC_EV_NM / la) * 1000, 6);
    }
  });
});

describe('allowedVersionActions mirrors the contract table', () => {
  const v = (state: 'draft' | 'in_review' | 'approved', authorId = 'sci') => ({ state, authorId, forbidSelfApproval: true });
  it.each([
    // actor, version, expected subset
    ['student', { userId: 'stu', role: 'student' as const, isAdmin: false }, v('in_review'), { approve: false, submit: false, reject: false, withdraw: false }],
    ['viewer', { userId: 'vw', role: 'viewer' as const, isAdmin: false }, v('draft'), { approve: false, submit: false, withdraw: false, edit: false }],
    ['author scientist, draft', { userId: 'sci', role: 'scientist' as const, isAdmin: false }, v('draft'), { submit: true, withdraw: true, approve: false }],
    ['other scientist, draft', { userId: 'sci2', role: 'scientist' as const, isAdmin: false }, v('draft'), { submit: false, withdraw: false }],
    ['author scientist, approved', { userId: 'sci', role: 'scientist' as const, isAdmin: false }, v('approved'), { withdraw: false }],
    ['owner, in review', { userId: 'own', role: 'owner' as const, isAdmin: false }, v('in_review'), { approve: true, reject: true, withdraw: true }],
    ['owner who wrote it, forbidSelfApproval', { userId: 'own', role: 'owner' as const, isAdmin: false }, v('in_review', 'own'), { approve: false, reject: false }],
    ['site admin', { userId: 'adm', role: null, isAdmin: true }, v('in_review'), { approve: true }],
  ])('%s', (_name, actor, version, expected) => {
    expect(allowedVersionActions(actor, version)).toMatchObject(expected);
  });
});
