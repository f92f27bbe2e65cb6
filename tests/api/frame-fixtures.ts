/**
 * Frames and worlds for the frame/version API tests. Frames come from the engine's simulator
 * (invented flat-field XUV spectrometer, known truth); the TIFF stack and the bad files come from
 * tests/fixtures/frames (written by tifffile, ImageMagick and by hand: independent writers).
 */
import { mkdtempSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { count, eq } from 'drizzle-orm';
import type { Express } from 'express';
import type { Role } from '../../shared/api/members.ts';
import { encodeFits, encodePng16, encodeTiff, generateScenarios, simulateFrame } from '../../shared/engine/simulate/index.ts';
import type { SimScenario, SimTruth } from '../../shared/engine/simulate/index.ts';
import type { Frame as EngineFrame } from '../../shared/engine/types.ts';
import type { Db } from '../../server/db/client.ts';
import { frames, type InstrumentRow } from '../../server/db/schema/index.ts';
import { insertInstrument } from '../../server/modules/instruments/queries.ts';
import { insertMembership } from '../../server/modules/members/queries.ts';
import { createToken } from '../../server/modules/tokens/service.ts';
import { createLocalStore } from '../../server/storage/local-store.ts';
import { makeUser } from './helpers.ts';

export const FIXTURES = join(import.meta.dirname, '../fixtures/frames');
export const fixture = (name: string) => new Uint8Array(readFileSync(join(FIXTURES, name)));

/** A temp-folder frame store for one test file. */
export function tempStore() {
  return createLocalStore(mkdtempSync(join(tmpdir(), 'orderly-frames-')));
}

/** Every file under the store folder (relative paths, sorted): "nothing stored" means this list is unchanged. */
export function storedFiles(folder: string): string[] {
  const out: string[] = [];
  const walk = (dir: string, rel: string) => {
    for (const name of readdirSync(dir)) {
      const path = join(dir, name);
      if (statSync(path).isDirectory()) walk(path, `${rel}${name}/`);
      else out.push(`${rel}${name}`);
    }
  };
  walk(folder, '');
  return out.sort();
}

export async function frameCount(db: Db, instrumentId: string): Promise<number> {
  const [row] = await db.select({ n: count() }).from(frames).where(eq(frames.instrumentId, instrumentId));
  return row?.n ?? 0;
}

export interface SimFrame {
  scenario: SimScenario;
  frame: EngineFrame;
  truth: SimTruth;
}

/** A clean odd-harmonic frame (800 nm driver, 1024 x 256) the engine calibrates to `unique`. */
export function cleanFrame(takenAt = '2026-11-30T10:00:00Z', seed = 11): SimFrame {
  const [scenario] = generateScenarios(1, 2026, { classes: ['gi-odd-clean'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
  const s = { ...scenario!, takenAt };
  const { frame, truth } = simulateFrame(s, seed);
  return { scenario: s, frame, truth };
}

/** Two harmonics only: the engine must answer `ambiguous` until an order is pinned. */
export function twoLineFrame(): SimFrame {
  const [scenario] = generateScenarios(1, 7, { classes: ['undecidable-two-lines'], sizes: [[1024, 256]], spectralAxis: 'x', bitDepth: 16 });
  const { frame, truth } = simulateFrame(scenario!, 3);
  return { scenario: scenario!, frame, truth };
}

export const tiffOf = (f: EngineFrame) => encodeTiff(f, { bitsPerSample: 16, sampleFormat: 'uint' });
export const pngOf = (f: EngineFrame) => encodePng16(f);
export const fitsOf = (f: EngineFrame) => encodeFits(f, 16);

/** The same image with one pixel changed: different content (hash), still a valid file. */
export function variant(tiff: Uint8Array, n: number): Uint8Array {
  const copy = tiff.slice();
  // Past the 8-byte header the simulator's TIFF starts with pixel strips: a low byte of a sample.
  copy[64 + 2 * n] = (copy[64 + 2 * n]! + 1) & 0xff;
  return copy;
}

/** The instrument profile of a scenario as the API stores it (no name/notes). */
export function apiProfile(scenario: SimScenario) {
  const { name: _n, notes: _o, ...profile } = scenario.profile;
  // The lab measured its camera's tilt to the nearest degree (the profile's convention, types.ts:
  // positive when the long-wavelength end is farther from the grating).
  const g = scenario.geometry;
  const detectorTiltDeg = profile.detectorTiltDeg ?? Math.round((g.wavelengthIncreasesWithPixel ? 1 : -1) * g.detectorTiltDeg);
  return { ...profile, detectorTiltDeg, pixelCount: scenario.width } as InstrumentRow['profile'];
}

export const ROLES: Role[] = ['owner', 'scientist', 'student', 'viewer'];
export type Who = Role | 'admin' | 'outsider';
export const EVERYONE: Who[] = ['owner', 'scientist', 'student', 'viewer', 'admin', 'outsider'];

export interface World {
  instrument: InstrumentRow;
  users: Record<Who, { id: string; email: string }>;
  tokens: Record<Who, string>;
  /** A second owner, for approvals when self-approval is forbidden. */
  owner2: { id: string; token: string };
}

/** An instrument with one member per role, a site admin and an outsider, each with an API token. */
export async function makeWorld(db: Db, scenario: SimScenario, settings = { forbidSelfApproval: true }): Promise<World> {
  const users = {} as World['users'];
  const tokens = {} as World['tokens'];
  for (const who of EVERYONE) {
    const u = await makeUser(db, who, who === 'admin');
    users[who] = u;
    tokens[who] = (await createToken(db, u.id, `${who} script`)).token;
  }
  const profile = apiProfile(scenario);
  const instrument = await insertInstrument(db, { name: `Workbench test ${randomUUID()}`, profile, pixelCount: profile.pixelCount, settings });
  for (const role of ROLES) await insertMembership(db, { userId: users[role].id, instrumentId: instrument.id, role });
  const o2 = await makeUser(db, 'owner2');
  await insertMembership(db, { userId: o2.id, instrumentId: instrument.id, role: 'owner' });
  return { instrument, users, tokens, owner2: { id: o2.id, token: (await createToken(db, o2.id, 'owner2 script')).token } };
}

/** supertest with a bearer token (no cookie, no CSRF: what a script does). */
export function as(app: Express, token: string) {
  const auth = (r: request.Test) => r.set('Authorization', `Bearer ${token}`);
  return {
    get: (url: string) => auth(request(app).get(url)),
    post: (url: string) => auth(request(app).post(url)),
    patch: (url: string) => auth(request(app).patch(url)),
    put: (url: string) => auth(request(app).put(url)),
    delete: (url: string) => auth(request(app).delete(url)),
  };
}
