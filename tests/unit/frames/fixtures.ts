import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

/** Test-side access to tests/fixtures/frames (written by make-fixtures.py, see its docstring). */
export const FIXTURE_DIR = fileURLToPath(new URL('../../fixtures/frames/', import.meta.url));

export interface FixtureEntry {
  file: string;
  expected: string;
  format: 'tiff' | 'bigtiff' | 'png' | 'fits';
  bitsPerSample: number;
  sampleFormat: 'uint' | 'int' | 'float';
  writer: string;
  byteOrder?: 'le' | 'be';
  compression?: string;
  tiled?: boolean;
  page?: number;
  pageCount?: number;
  takenAt?: string;
  exposureS?: number;
  /** Set when the fixture's size differs from the manifest's common one. */
  width?: number;
  height?: number;
}

export interface Manifest {
  width: number;
  height: number;
  fixtures: FixtureEntry[];
}

export function readFixture(name: string): Uint8Array {
  const buf = readFileSync(FIXTURE_DIR + name);
  return new Uint8Array(buf.buffer, buf.byteOffset, buf.byteLength);
}

export function readManifest(): Manifest {
  return JSON.parse(readFileSync(FIXTURE_DIR + 'manifest.json', 'utf8')) as Manifest;
}

/** The expected pixels numpy handed the writer, stored as raw little-endian float64. */
export function readExpected(name: string): Float64Array {
  const bytes = readFixture(name);
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const out = new Float64Array(bytes.length / 8);
  for (let i = 0; i < out.length; i++) out[i] = dv.getFloat64(i * 8, true);
  return out;
}

/** Indices where `actual` differs from float32(expected); NaN equals NaN. */
export function mismatches(actual: Float32Array, expected: Float64Array): number[] {
  const bad: number[] = [];
  for (let i = 0; i < expected.length; i++) {
    const e = Math.fround(expected[i]);
    const a = actual[i];
    if (!(a === e || (Number.isNaN(a) && Number.isNaN(e)))) bad.push(i);
  }
  return bad;
}
