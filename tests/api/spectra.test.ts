/**
 * GET /api/frames/:frameId/spectrum (and .csv, drift, version notices) against the real app and
 * PostgreSQL. The reference for "the same object as `orderly apply --json`" is the CLI itself,
 * run as a process on the same frame file and calibration file.
 */
import { execFile } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { promisify } from 'node:util';
import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { paths } from '../../shared/api/paths.ts';
import { SPECTRUM_CSV_COLUMNS } from '../../shared/api/spectrum-csv.ts';
import { calibrationVersions, mails, spectra } from '../../server/db/schema/index.ts';
import { makeInstrument, makeUser, signIn } from './helpers.ts';
import { frameBytes, insertApprovedVersion, insertFrame, lab, startSpectraApp, type SpectraTestApp } from './spectra-fixtures.ts';

const run = promisify(execFile);
let t: SpectraTestApp;
beforeAll(async () => {
  lab();
  t = await startSpectraApp();
});
afterAll(async () => t.close());

const V1_FROM = new Date('2026-10-01T00:00:00Z');

async function world() {
  const owner = await makeUser(t.db, 'owner');
  const student = await makeUser(t.db, 'student');
  const viewer = await makeUser(t.db, 'viewer');
  const outsider = await makeUser(t.db, 'outsider');
  const instrument = await makeInstrument(t.db, [
    [owner.id, 'owner'],
    [student.id, 'student'],
    [viewer.id, 'viewer'],
  ]);
  const v1 = await insertApprovedVersion(t.db, instrument.id, owner.id, 1, V1_FROM);
  return { owner, student, viewer, outsider, instrument, v1 };
}

async function mailsTo(email: string) {
  return t.db.select().from(mails).where(eq(mails.to, email));
}

describe('GET /api/frames/:frameId/spectrum', () => {
  it('returns exactly the `orderly apply --json` object for the same frame and calibration, plus calibration and drift', async () => {
    const w = await world();
    const bytes = frameBytes(21);
    const frame = await insertFrame(t.db, t.store, w.instrument.id, bytes, { takenAt: new Date('2026-11-02T10:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    const res = await c.agent.get(paths.frameSpectrum(frame.id)).expect(200);

    const framePath = join(t.storeDir, 'cli-frame.tif');
    const calPath = join(t.storeDir, 'cli-cal.json');
    writeFileSync(framePath, bytes);
    writeFileSync(calPath, JSON.stringify(lab().calibration));
    const cli = await run(process.execPath, [resolve('bin/orderly.mjs'), 'apply', framePath, '--calibration', calPath, '--json'], { maxBuffer: 64 * 2 ** 20 });
    const expected = JSON.parse(cli.stdout);

    const { calibration, drift, ...rest } = res.body;
    expect(rest).toEqual(expected);
    expect(calibration).toEqual({ instrumentId: w.instrument.id, version: 1, versionId: w.v1.id, state: 'approved', stale: false });
    expect(drift.flagged).toBe(false);
    // The simulator rendered this frame with the calibration frame's geometry: no shift (well under 0.1 px).
    expect(Math.abs(drift.shiftPx)).toBeLessThan(0.1);
    expect(drift.matchedPeaks).toBeGreaterThanOrEqual(5);
    expect(res.body.orders.some((o: { detected: boolean }) => o.detected)).toBe(true);
  });

  it('409 no_calibration when no approved version covers the frame time, nothing stored', async () => {
    const w = await world();
    const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(22), { takenAt: new Date('2026-09-15T08:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    const res = await c.agent.get(paths.frameSpectrum(frame.id)).expect(409);
    expect(res.body.error.code).toBe('no_calibration');
    expect(res.body.error.message).toContain('2026-09-15T08:00:00.000Z');
    expect(await t.db.select().from(spectra).where(eq(spectra.frameId, frame.id))).toHaveLength(0);
    // A chosen version still applies.
    const chosen = await c.agent.get(paths.frameSpectrum(frame.id, 1)).expect(200);
    expect(chosen.body.calibration.version).toBe(1);
    await c.agent.get(paths.frameSpectrum(frame.id, 9)).expect(404);
  });

  it('frames after a new version’s validity start use it; older frames keep the old one', async () => {
    const w = await world();
    const v2From = new Date('2026-11-10T00:00:00Z');
    await t.db.update(calibrationVersions).set({ state: 'superseded', validUntil: v2From }).where(eq(calibrationVersions.id, w.v1.id));
    await insertApprovedVersion(t.db, w.instrument.id, w.owner.id, 2, v2From);
    const before = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(23), { takenAt: new Date('2026-11-09T23:59:59Z') });
    const after = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(24), { takenAt: v2From });
    const c = await signIn(t.app, w.student.email);
    expect((await c.agent.get(paths.frameSpectrum(before.id)).expect(200)).body.calibration).toMatchObject({ version: 1, state: 'superseded' });
    expect((await c.agent.get(paths.frameSpectrum(after.id)).expect(200)).body.calibration).toMatchObject({ version: 2, state: 'approved' });
    // Each version lists the spectra it produced.
    const v1 = (await c.agent.get(paths.version(w.v1.id)).expect(200)).body;
    expect(v1.spectraCount).toBe(1);
    expect(v1.spectra.map((x: { frameId: string }) => x.frameId)).toEqual([before.id]);
  });

  it('asking twice (or by two users) keeps one row per (frame, version)', async () => {
    const w = await world();
    const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(25), { takenAt: new Date('2026-11-03T10:00:00Z') });
    const a = await signIn(t.app, w.student.email);
    const b = await signIn(t.app, w.owner.email);
    await Promise.all([a.agent.get(paths.frameSpectrum(frame.id)).expect(200), b.agent.get(paths.frameSpectrum(frame.id)).expect(200), a.agent.get(paths.frameSpectrum(frame.id)).expect(200)]);
    expect(await t.db.select().from(spectra).where(eq(spectra.frameId, frame.id))).toHaveLength(1);
  });

  it('permissions: outsiders get 404, viewers read without storing, anonymous 401, an API token works', async () => {
    const w = await world();
    const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(26), { takenAt: new Date('2026-11-04T10:00:00Z') });
    const outsider = await signIn(t.app, w.outsider.email);
    const res = await outsider.agent.get(paths.frameSpectrum(frame.id));
    expect(res.status).toBe(404);
    expect(JSON.stringify(res.body)).not.toContain(w.instrument.name);
    const viewer = await signIn(t.app, w.viewer.email);
    const seen = await viewer.agent.get(paths.frameSpectrum(frame.id)).expect(200);
    expect(seen.body.calibration.version).toBe(1);
    expect(await t.db.select().from(spectra).where(eq(spectra.frameId, frame.id))).toHaveLength(0);
    const { default: request } = await import('supertest');
    await request(t.app).get(paths.frameSpectrum(frame.id)).expect(401);
    // An acquisition computer with a personal API token (the student's) gets the same spectrum.
    const student = await signIn(t.app, w.student.email);
    const token = (await student.agent.post(paths.tokens()).set('X-CSRF-Token', student.csrf).send({ name: 'acquisition pc' }).expect(201)).body.token;
    const byToken = await request(t.app).get(paths.frameSpectrum(frame.id)).set('Authorization', `Bearer ${token}`).expect(200);
    expect(byToken.body.calibration.version).toBe(1);
    expect(await t.db.select().from(spectra).where(eq(spectra.frameId, frame.id))).toHaveLength(1);
    await viewer.agent.get('/api/frames/not-a-uuid/spectrum').expect(400);
  });

  it('the CSV holds the JSON numbers exactly, with the documented columns', async () => {
    const w = await world();
    const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(27), { takenAt: new Date('2026-11-05T10:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    const json = (await c.agent.get(paths.frameSpectrum(frame.id)).expect(200)).body;
    const csv = await c.agent.get(paths.frameSpectrumCsv(frame.id)).expect(200);
    expect(csv.headers['content-type']).toContain('text/csv');
    const lines = csv.text.trim().split('\r\n');
    expect(lines[0]).toBe(SPECTRUM_CSV_COLUMNS.join(','));
    expect(lines).toHaveLength(1 + 512);
    const row100 = lines[101].split(',').map(Number);
    expect(row100).toEqual([100, json.wavelengthNm[100], json.wavelengthSigmaNm[100], json.energyEv[100], json.intensity[100], json.intensitySigma[100], json.intensityPerEv[100], json.intensityPerEvSigma[100]]);
  });
});

describe('frames in the S3 store', () => {
  it('the spectrum route reads the frame from an S3-compatible store (s3rver) and gives the same result as `orderly apply`', async () => {
    const { startS3Fake } = await import('../support/s3-fake.ts');
    const { createS3Store } = await import('../../server/storage/s3-store.ts');
    const fake = await startS3Fake();
    const s3 = createS3Store(fake.options);
    const onS3 = await startSpectraApp(undefined, s3);
    try {
      const w = await world();
      const bytes = frameBytes(90);
      const viaS3 = await insertFrame(onS3.db, s3, w.instrument.id, bytes, { takenAt: new Date('2026-11-27T10:00:00Z') });
      expect(await t.store.has(viaS3.sha256)).toBe(false);
      const c = await signIn(onS3.app, w.student.email);
      const fromS3 = (await c.agent.get(paths.frameSpectrum(viaS3.id)).expect(200)).body;
      const framePath = join(t.storeDir, 's3-check.tif');
      writeFileSync(framePath, bytes);
      const calPath = join(t.storeDir, 's3-check-cal.json');
      writeFileSync(calPath, JSON.stringify(lab().calibration));
      const cli = await run(process.execPath, [resolve('bin/orderly.mjs'), 'apply', framePath, '--calibration', calPath, '--json'], { maxBuffer: 64 * 2 ** 20 });
      const { calibration: _c, drift: _d, ...rest } = fromS3;
      expect(rest).toEqual(JSON.parse(cli.stdout));
    } finally {
      await onS3.close();
      s3.client.destroy();
      await fake.close();
    }
  });
});

describe('filter-transmission correction', () => {
  it('?filterCorrection=true divides by the filters’ transmission (Henke-based reference table), computed and not stored', async () => {
    const w = await world();
    // Version 2 with a Mg 200 nm filter listed (same map); this spectrometer sees 62-80 eV, above the Mg L2,3 edge (~50 eV).
    const withFilter = { ...lab().calibration, filters: ['Mg 200nm'] };
    await t.db.update(calibrationVersions).set({ validUntil: new Date('2026-11-25T00:00:00Z'), state: 'superseded' }).where(eq(calibrationVersions.id, w.v1.id));
    await insertApprovedVersion(t.db, w.instrument.id, w.owner.id, 2, new Date('2026-11-25T00:00:00Z'), withFilter);
    const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(80), { takenAt: new Date('2026-11-26T10:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    const plain = (await c.agent.get(paths.frameSpectrum(frame.id)).expect(200)).body;
    const corrected = (await c.agent.get(`${paths.frameSpectrum(frame.id)}?filterCorrection=true`).expect(200)).body;
    expect(plain.filterTransmission).toBeUndefined();
    expect(corrected.filterTransmission).toHaveLength(512);
    // Reference: T(E) of a free-standing 200 nm Mg foil, Henke/CXRO f2 via periodictable 1.6.0
    // (tests/fixtures/reference/xray/filters.json, copied from /work/shared/reference).
    const ref = JSON.parse(readFileSync('tests/fixtures/reference/xray/filters.json', 'utf8')).filters.find((f: { material: string; thicknessNm: number }) => f.material === 'Mg' && f.thicknessNm === 200);
    let checked = 0;
    for (let i = 0; i < 512; i += 16) {
      const e = plain.energyEv[i];
      if (!(e > 55 && e < 290)) continue; // above the edge, inside the table
      const k = ref.energyEv.findIndex((x: number) => x > e);
      const f = (e - ref.energyEv[k - 1]) / (ref.energyEv[k] - ref.energyEv[k - 1]);
      const tRef = ref.transmission[k - 1] * (1 - f) + ref.transmission[k] * f;
      expect(Math.abs(corrected.filterTransmission[i] / tRef - 1)).toBeLessThan(0.03);
      expect(corrected.intensity[i] * Math.max(corrected.filterTransmission[i], 1e-3)).toBeCloseTo(plain.intensity[i], 6);
      checked++;
    }
    expect(checked).toBeGreaterThan(3);
    const rows = await t.db.select().from(spectra).where(eq(spectra.frameId, frame.id));
    expect(rows).toHaveLength(1);
    expect(rows[0].result.filterTransmission).toBeUndefined();
  });
});

describe('drift watch', () => {
  it('a camera moved by 2 px raises the flag and one notice per episode to the owners; the series shows it', async () => {
    const w = await world();
    const c = await signIn(t.app, w.student.email);
    const times = ['2026-11-06T10:00:00Z', '2026-11-06T11:00:00Z', '2026-11-06T12:00:00Z', '2026-11-06T13:00:00Z'];
    const shifts = [0, 2, 2, 0];
    const bodies = [];
    for (let i = 0; i < times.length; i++) {
      const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(40 + i, { shiftPx: shifts[i] }), { takenAt: new Date(times[i]) });
      bodies.push((await c.agent.get(paths.frameSpectrum(frame.id)).expect(200)).body);
    }
    expect(bodies.map((b) => b.drift.flagged)).toEqual([false, true, true, false]);
    // The simulator moved the detector by exactly 2 px: the measured shift agrees within 0.05 px.
    expect(Math.abs(bodies[1].drift.shiftPx - 2)).toBeLessThan(0.05);
    expect(bodies[1].drift.shiftPxSigma).toBeLessThan(0.1);
    expect(Number.isFinite(bodies[1].drift.shiftMeV)).toBe(true);
    const owned = (await mailsTo(w.owner.email)).filter((m) => m.subject.startsWith('Drift'));
    expect(owned).toHaveLength(1);
    expect(owned[0].text).toContain('2026-11-06T11:00:00.000Z');

    const series = (await c.agent.get(paths.instrumentDrift(w.instrument.id)).expect(200)).body;
    expect(series.points.map((p: { flagged: boolean }) => p.flagged)).toEqual([false, true, true, false]);
    expect(series.threshold).toEqual({ sigma: 3, px: 1 });
    expect(series.episodes).toHaveLength(1);
    expect(series.episodes[0].closedAt).not.toBeNull();

    // A new episode after the camera moves again: a second notice.
    const again = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(50, { shiftPx: -2 }), { takenAt: new Date('2026-11-06T14:00:00Z') });
    expect((await c.agent.get(paths.frameSpectrum(again.id)).expect(200)).body.drift.flagged).toBe(true);
    expect((await mailsTo(w.owner.email)).filter((m) => m.subject.startsWith('Drift'))).toHaveLength(2);
  });

  it('a spectrum made on purpose with a version not in force measures drift but opens no episode and sends no notice', async () => {
    const w = await world();
    const v2From = new Date('2026-11-10T00:00:00Z');
    await t.db.update(calibrationVersions).set({ state: 'superseded', validUntil: v2From }).where(eq(calibrationVersions.id, w.v1.id));
    await insertApprovedVersion(t.db, w.instrument.id, w.owner.id, 2, v2From);
    const moved = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(61, { shiftPx: 2 }), { takenAt: new Date('2026-11-11T09:00:00Z') });
    const c = await signIn(t.app, w.student.email);
    const withOld = (await c.agent.get(`${paths.frameSpectrum(moved.id)}?version=1`).expect(200)).body;
    expect(withOld.calibration).toMatchObject({ version: 1 });
    expect(withOld.drift.flagged).toBe(true);
    expect((await mailsTo(w.owner.email)).filter((m) => m.subject.startsWith('Drift'))).toHaveLength(0);
    expect((await c.agent.get(paths.instrumentDrift(w.instrument.id)).expect(200)).body.episodes).toHaveLength(0);
    // The same frame with the version in force is the instrument's drift: one episode, one notice.
    expect((await c.agent.get(paths.frameSpectrum(moved.id)).expect(200)).body.drift.flagged).toBe(true);
    expect((await mailsTo(w.owner.email)).filter((m) => m.subject.startsWith('Drift'))).toHaveLength(1);
  });

  it('the owner sets the threshold; a student cannot', async () => {
    const w = await world();
    const student = await signIn(t.app, w.student.email);
    await student.agent.patch(paths.instrument(w.instrument.id)).set('X-CSRF-Token', student.csrf).send({ settings: { driftThreshold: { sigma: 5, px: 3 } } }).expect(403);
    const owner = await signIn(t.app, w.owner.email);
    const bad = await owner.agent.patch(paths.instrument(w.instrument.id)).set('X-CSRF-Token', owner.csrf).send({ settings: { driftThreshold: { sigma: -1, px: 3 } } });
    expect(bad.status).toBe(400);
    await owner.agent.patch(paths.instrument(w.instrument.id)).set('X-CSRF-Token', owner.csrf).send({ settings: { driftThreshold: { sigma: 5, px: 3 } } }).expect(200);
    const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(60, { shiftPx: 2 }), { takenAt: new Date('2026-11-07T10:00:00Z') });
    const body = (await student.agent.get(paths.frameSpectrum(frame.id)).expect(200)).body;
    expect(body.drift.threshold).toEqual({ sigma: 5, px: 3 });
    expect(body.drift.flagged).toBe(false);
  });
});

describe('version notices and stale marks', () => {
  it('approving a later version marks the old one’s spectra stale and tells their makers; the author hears of approval', async () => {
    const w = await world();
    const scientist = await makeUser(t.db, 'author');
    const { memberships } = await import('../../server/db/schema/index.ts');
    await t.db.insert(memberships).values({ userId: scientist.id, instrumentId: w.instrument.id, role: 'scientist' });
    const frame = await insertFrame(t.db, t.store, w.instrument.id, frameBytes(70), { takenAt: new Date('2026-11-08T10:00:00Z') });
    const student = await signIn(t.app, w.student.email);
    await student.agent.get(paths.frameSpectrum(frame.id)).expect(200);

    const v2 = await insertApprovedVersion(t.db, w.instrument.id, scientist.id, 2, new Date('2026-11-20T00:00:00Z'));
    await t.db.update(calibrationVersions).set({ state: 'in_review', approvedAt: null, reviewerId: null }).where(eq(calibrationVersions.id, v2.id));
    const owner = await signIn(t.app, w.owner.email);
    await owner.agent.post(paths.versionApprove(v2.id)).set('X-CSRF-Token', owner.csrf).send({ comment: 'looks right' }).expect(200);

    const [row] = await t.db.select().from(spectra).where(and(eq(spectra.frameId, frame.id), eq(spectra.versionId, w.v1.id)));
    expect(row.stale).toBe(true);
    const toStudent = await mailsTo(w.student.email);
    expect(toStudent.some((m) => m.subject.includes('version 1') && m.subject.includes('superseded'))).toBe(true);
    const toAuthor = await mailsTo(scientist.email);
    expect(toAuthor.some((m) => m.subject.includes('version 2') && m.subject.includes('approved'))).toBe(true);
    const res = await student.agent.get(paths.frameSpectrum(frame.id)).expect(200);
    expect(res.body.calibration).toMatchObject({ version: 1, state: 'superseded', stale: true });
  });

  it('submitting for review mails the owners; withdrawing mails the author', async () => {
    const w = await world();
    const scientist = await makeUser(t.db, 'author');
    const { memberships } = await import('../../server/db/schema/index.ts');
    await t.db.insert(memberships).values({ userId: scientist.id, instrumentId: w.instrument.id, role: 'scientist' });
    const v2 = await insertApprovedVersion(t.db, w.instrument.id, scientist.id, 2, new Date('2026-12-01T00:00:00Z'));
    await t.db.update(calibrationVersions).set({ state: 'draft', approvedAt: null, reviewerId: null }).where(eq(calibrationVersions.id, v2.id));
    const author = await signIn(t.app, scientist.email);
    await author.agent.post(paths.versionSubmit(v2.id)).set('X-CSRF-Token', author.csrf).send({ comment: 'please check' }).expect(200);
    const toOwner = await mailsTo(w.owner.email);
    expect(toOwner.filter((m) => m.subject.includes('Review requested') && m.subject.includes('version 2'))).toHaveLength(1);
    expect(toOwner.find((m) => m.subject.includes('Review requested'))!.text).toContain('please check');
    const owner = await signIn(t.app, w.owner.email);
    await owner.agent.post(paths.versionWithdraw(v2.id)).set('X-CSRF-Token', owner.csrf).send({ comment: 'wrong driver' }).expect(200);
    const toAuthor = await mailsTo(scientist.email);
    expect(toAuthor.filter((m) => m.subject.includes('version 2') && m.subject.includes('withdrawn'))).toHaveLength(1);
  });
});
