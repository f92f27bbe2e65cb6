/**
 * GET /api/instruments/:instrumentId/spectra[?stale=…] — the list behind the "stale spectra" page:
 * members read it, non-members get 404, a bad filter is a 400 naming the field, and a spectrum
 * marked stale shows under ?stale=true and counts as a frame to re-apply.
 */
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { paths } from '../../shared/api/paths.ts';
import type { SpectrumList } from '../../shared/api/spectra-list.ts';
import { spectra } from '../../server/db/schema/index.ts';
import { makeInstrument, makeUser, signIn } from './helpers.ts';
import { frameBytes, insertApprovedVersion, insertFrame, lab, startSpectraApp, type SpectraTestApp } from './spectra-fixtures.ts';

let t: SpectraTestApp;
beforeAll(async () => {
  lab();
  t = await startSpectraApp();
});
afterAll(async () => t.close());

describe('GET /api/instruments/:instrumentId/spectra', () => {
  it('lists spectra with their frame and version, filters stale ones, and hides the instrument from non-members', async () => {
    const owner = await makeUser(t.db, 'owner');
    const viewer = await makeUser(t.db, 'viewer');
    const outsider = await makeUser(t.db, 'outsider');
    const instrument = await makeInstrument(t.db, [
      [owner.id, 'owner'],
      [viewer.id, 'viewer'],
    ]);
    const v1 = await insertApprovedVersion(t.db, instrument.id, owner.id, 1, new Date('2026-10-01T00:00:00Z'));
    const frame = await insertFrame(t.db, t.store, instrument.id, frameBytes(31), { takenAt: new Date('2026-11-02T10:00:00Z') });
    const ownerClient = await signIn(t.app, owner.email);
    await ownerClient.agent.get(paths.frameSpectrum(frame.id)).expect(200);

    const viewerClient = await signIn(t.app, viewer.email);
    const all = (await viewerClient.agent.get(paths.instrumentSpectra(instrument.id)).expect(200)).body as SpectrumList;
    expect(all.items).toHaveLength(1);
    expect(all.items[0]).toMatchObject({ frameId: frame.id, frameName: frame.originalName, versionId: v1.id, version: 1, versionState: 'approved', stale: false, takenAt: '2026-11-02T10:00:00.000Z' });
    expect(all.staleFrames).toBe(0);
    expect(((await viewerClient.agent.get(paths.instrumentSpectra(instrument.id, true)).expect(200)).body as SpectrumList).items).toHaveLength(0);

    // Marked stale (as superseding v1 would): listed under ?stale=true and counted for re-apply.
    await t.db.update(spectra).set({ stale: true }).where(eq(spectra.frameId, frame.id));
    const stale = (await viewerClient.agent.get(paths.instrumentSpectra(instrument.id, true)).expect(200)).body as SpectrumList;
    expect(stale.items.map((s) => s.frameId)).toEqual([frame.id]);
    expect(stale.staleFrames).toBe(1);
    expect(((await viewerClient.agent.get(paths.instrumentSpectra(instrument.id, false)).expect(200)).body as SpectrumList).items).toHaveLength(0);

    const outsiderClient = await signIn(t.app, outsider.email);
    await outsiderClient.agent.get(paths.instrumentSpectra(instrument.id)).expect(404);
    const bad = await viewerClient.agent.get(`${paths.instrumentSpectra(instrument.id)}?stale=maybe`).expect(400);
    expect(JSON.stringify(bad.body)).toContain('stale must be true or false');
  });
});
