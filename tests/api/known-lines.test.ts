/**
 * Known lines through the workbench API against the real PostgreSQL: accepted, passed to the
 * engine, stored with the run and with a version made from it; bad ones refused with a 400 that
 * names the field, and nothing stored. The frame is our simulator's (invented data); the line is
 * one of its true harmonics, "measured elsewhere": E = q·hc/λ0 (hc = 1239.841984 eV·nm, CODATA
 * 2018).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { count, eq } from 'drizzle-orm';
import { paths } from '../../shared/api/paths.ts';
import { HC_EV_NM } from '../../shared/engine/constants.ts';
import { generateScenarios, simulateFrame } from '../../shared/engine/simulate/index.ts';
import { auditEvents, workbenchRuns } from '../../server/db/schema/index.ts';
import { startTestApp, type TestApp } from './helpers.ts';
import { as, makeWorld, tempStore, tiffOf, type SimFrame, type World } from './frame-fixtures.ts';

const store = tempStore();
let t: TestApp;

/** An 800 nm comb of 26 lines that the engine decides on its own (scenario seed 8, frame seed 11). */
function decidedFrame(): SimFrame {
  const [scenario] = generateScenarios(1, 8, { classes: ['gi-odd-clean'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
  const s = { ...scenario!, takenAt: '2026-11-30T10:00:00Z' };
  const { frame, truth } = simulateFrame(s, 11);
  return { scenario: s, frame, truth };
}

const sim = decidedFrame();
const line = (() => {
  const comb = sim.truth.lines.filter((l) => l.diffractionOrder === 1 && l.visible);
  return comb[comb.length >> 1]!;
})();
const energyEv = (line.harmonic * HC_EV_NM) / sim.truth.effectiveDriverNm;

beforeAll(async () => {
  t = await startTestApp({ signInLimitPerMinute: 1000, frames: { store, maxBytes: 64 * 1024 * 1024 } });
});
afterAll(async () => t.close());

async function world(): Promise<{ w: World; frameId: string }> {
  const w = await makeWorld(t.db, sim.scenario);
  const res = await as(t.app, w.tokens.scientist).post(paths.instrumentFrames(w.instrument.id)).attach('file', Buffer.from(tiffOf(sim.frame)), 'comb.tif');
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return { w, frameId: res.body.id };
}

function runBody(frameIds: string[], extra: Record<string, unknown> = {}) {
  return { frameIds, driverNm: sim.scenario.driver.nominalNm, parity: sim.scenario.parity, ...extra };
}

async function storedRuns(instrumentId: string): Promise<number> {
  const [row] = await t.db.select({ n: count() }).from(workbenchRuns).where(eq(workbenchRuns.instrumentId, instrumentId));
  return row?.n ?? 0;
}

async function auditCount(instrumentId: string): Promise<number> {
  const [row] = await t.db.select({ n: count() }).from(auditEvents).where(eq(auditEvents.instrumentId, instrumentId));
  return row?.n ?? 0;
}

describe('workbench runs with known lines', () => {
  it('anchors the scale, stores the anchors with the run and with a version made from it', async () => {
    const { w, frameId } = await world();
    const knownLines = [{ pixel: Math.round(line.pixel), energyEv, label: `H${line.harmonic} (measured elsewhere)` }];
    const res = await as(t.app, w.tokens.scientist).post(paths.workbenchRuns(w.instrument.id)).send(runBody([frameId], { knownLines }));
    expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(201);
    expect(res.body.inputs.knownLines).toEqual(knownLines);
    const cal = res.body.result.calibration;
    expect(res.body.result.status).toBe('unique');
    expect(cal.absoluteScale).toBe('anchored');
    expect(cal.anchors).toEqual([{ kind: 'known-line', label: knownLines[0].label, pixel: expect.closeTo(line.pixel, 0), pixelSigma: expect.any(Number), energyEv, energySigmaEv: 0 }]);
    expect(cal.scaleSigmaRelative).toBeLessThan(cal.unanchoredScaleSigmaRelative / 100);

    const read = await as(t.app, w.tokens.viewer).get(paths.workbenchRun(res.body.id)).expect(200);
    expect(read.body.result.calibration.anchors).toEqual(cal.anchors);
    const version = await as(t.app, w.tokens.scientist).post(paths.instrumentVersions(w.instrument.id)).send({ runId: res.body.id, validFrom: '2026-11-01T00:00:00.000Z' });
    expect(version.status, JSON.stringify(version.body)).toBe(201);
    const detail = await as(t.app, w.tokens.viewer).get(paths.version(version.body.id)).expect(200);
    expect(detail.body.calibration).toMatchObject({ absoluteScale: 'anchored', anchors: cal.anchors, unanchoredScaleSigmaRelative: cal.unanchoredScaleSigmaRelative });
  });

  it('without them the scale is the driver tolerance, and the inputs say no known lines', async () => {
    const { w, frameId } = await world();
    const res = await as(t.app, w.tokens.owner).post(paths.workbenchRuns(w.instrument.id)).send(runBody([frameId]));
    expect(res.status).toBe(201);
    expect(res.body.inputs.knownLines).toEqual([]);
    expect(res.body.result.calibration.absoluteScale).toBe('driver-tolerance');
    expect(res.body.result.calibration.anchors).toBeUndefined();
  });

  it.each([
    ['a negative energy', [{ pixel: 400, energyEv: -1 }], 'knownLines.0.energyEv: known line energyEv must be positive'],
    ['an energy that is not a number', [{ pixel: 400, energyEv: '72.7' }], 'knownLines.0.energyEv: known line energyEv must be a number of eV'],
    ['a missing pixel', [{ pixel: 400, energyEv: 72.7 }, { energyEv: 72.7 }], 'knownLines.1.pixel: known line pixel must be a number'],
    ['a negative pixel', [{ pixel: -3, energyEv: 72.7 }], 'knownLines.0.pixel: known line pixel must be ≥ 0'],
    ['a label that is not text', [{ pixel: 400, energyEv: 72.7, label: 7 }], 'knownLines.0.label: known line label must be text'],
    ['a pixel off the detector', [{ pixel: 5000, energyEv: 72.7 }], 'knownLines.0: The known line at pixel 5000 (72.7 eV) is off the detector: its spectral pixels run from 0 to 1023.'],
    ['a pixel with no peak near it', 'between', 'knownLines.0: No detected peak within'],
  ])('refuses %s with a 400 naming the field, and stores nothing', async (_what, lines, message) => {
    const { w, frameId } = await world();
    const before = { runs: await storedRuns(w.instrument.id), audit: await auditCount(w.instrument.id) };
    const comb = sim.truth.lines.filter((l) => l.diffractionOrder === 1).map((l) => l.pixel);
    const knownLines = lines === 'between' ? [{ pixel: Math.round((comb[4]! + comb[5]!) / 2), energyEv: 50 }] : lines;
    const res = await as(t.app, w.tokens.scientist).post(paths.workbenchRuns(w.instrument.id)).send(runBody([frameId], { knownLines }));
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.code).toBe('validation');
    expect(res.body.error.message.startsWith(message), res.body.error.message).toBe(true);
    expect(await storedRuns(w.instrument.id)).toBe(before.runs);
    expect(await auditCount(w.instrument.id)).toBe(before.audit);
  });
});
