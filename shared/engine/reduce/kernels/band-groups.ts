import { GROUP_ROWS } from '../outliers.ts';
import { wasmBase64 } from './band-groups-wasm.ts';

/**
 * The four-row band kernels (sum-band.ts fusedPlainGroup and fusedGroup, sum-rows.ts
 * addPlainGroup) as WebAssembly SIMD (band-groups.wat): the same sums, bit for bit, about 2.5
 * times quicker than V8's scalar code for them. Its arrays are views on the module's memory: the caller fills `background` and
 * `floorVariance`, keeps its running sums in `counts`, `variance` and `saturated`, and reads each
 * group's four-row sums from `bin` and the pixels left over from `candidates`.
 */
export interface BandGroupKernels {
  readonly length: number;
  readonly background: Float64Array;
  readonly floorVariance: Float64Array;
  readonly counts: Float64Array;
  readonly variance: Float64Array;
  readonly bin: Float32Array;
  readonly candidates: Int32Array;
  readonly saturated: Uint8Array;
  /** Forgets the rows held from an earlier band (call before each band). */
  forgetRows(): void;
  /** fusedPlainGroup on four rows, row j at `data[base[j] + p]`; returns the candidates' count. */
  plainGroup(data: Float32Array, base: Int32Array, halfGain: number, level: number): number;
  /**
   * addPlainGroup (sum-rows.ts) on four rows as for {@link plainGroup}, adding into `counts`
   * (a background pass, done before the band's, which starts `counts` afresh).
   */
  plainAdd(data: Float32Array, base: Int32Array): number;
  /** fusedGroup on `rows` = spatial rows s − 2 … s + 4 (s ≥ 2); returns the candidates' count. */
  screenedGroup(rows: Float32Array[], s: number, screen: number, halfGain: number, level: number): number;
}

type PlainGroupExport = (
  L: number, rows: number, bg: number, fv: number, counts: number, variance: number,
  bin: number, candidates: number, saturated: number, halfGain: number, level: number,
) => number;

type ScreenedGroupExport = (
  L: number, am: number, bm: number, r0: number, r1: number, r2: number, r3: number, r4: number,
  bg: number, fv: number, counts: number, variance: number, bin: number, candidates: number,
  saturated: number, screen: number, halfGain: number, level: number,
) => number;

interface Exports {
  memory: WebAssembly.Memory;
  plainGroup: PlainGroupExport;
  plainAdd: (L: number, rows: number, sum: number, candidates: number) => number;
  screenedGroup: ScreenedGroupExport;
}

const PAGE_BYTES = 65536;
/** Row slots: a screened group reads seven rows, and the next group shares three of them. */
const SLOTS = 8;
/** Bytes of memory per spectral pixel: the f32 row slots, 4 f64 arrays, an f32 bin, an i32 and a u8. */
const BYTES_PER_PIXEL = 4 * SLOTS + 32 + 4 + 4 + 1;

let enabled = true;
let instance: Exports | null | undefined;
let kernels: BandGroupKernels | undefined;

/** Switches the WebAssembly kernels off (or back on): the tests run both paths. */
export function setWasmKernels(on: boolean): void {
  enabled = on;
}

function instantiate(): Exports | null {
  try {
    if (typeof WebAssembly === 'undefined') return null;
    const bytes = Uint8Array.from(atob(wasmBase64), (c) => c.charCodeAt(0));
    // A runtime without SIMD refuses the module: the scalar JavaScript kernels do the work.
    if (!WebAssembly.validate(bytes)) return null;
    const exports = new WebAssembly.Instance(new WebAssembly.Module(bytes)).exports;
    return exports as unknown as Exports;
  } catch {
    return null;
  }
}

function layout(length: number, exports: Exports): BandGroupKernels {
  const L = length;
  const { memory } = exports;
  const needed = BYTES_PER_PIXEL * L;
  if (memory.buffer.byteLength < needed) memory.grow(Math.ceil((needed - memory.buffer.byteLength) / PAGE_BYTES));
  const buffer = memory.buffer;
  const rowBytes = 4 * L;
  const bg = SLOTS * rowBytes;
  const fv = bg + 8 * L;
  const counts = fv + 8 * L;
  const variance = counts + 8 * L;
  const bin = variance + 8 * L;
  const candidates = bin + 4 * L;
  const saturated = candidates + 4 * L;
  const slots = new Float32Array(buffer, 0, SLOTS * L);
  // Which spatial row each slot holds (−1: none); a screened group's rows go to slot row % SLOTS.
  const slotRow = new Int32Array(SLOTS).fill(-1);
  const slotFor = (rows: Float32Array[], s: number, j: number) => {
    const row = s - 2 + j;
    const slot = row % SLOTS;
    if (slotRow[slot] !== row) {
      slots.set(rows[j], slot * L);
      slotRow[slot] = row;
    }
    return slot * rowBytes;
  };
  /** Four rows (row j at `data[base[j] + p]`) into slots 0 … 3, in row order. */
  const loadFourRows = (data: Float32Array, base: Int32Array) => {
    slotRow.fill(-1, 0, GROUP_ROWS);
    if (base[1] === base[0] + L && base[2] === base[1] + L && base[3] === base[2] + L) {
      slots.set(data.subarray(base[0], base[0] + GROUP_ROWS * L));
      return;
    }
    for (let j = 0; j < GROUP_ROWS; j++) slots.set(data.subarray(base[j], base[j] + L), j * L);
  };
  return {
    length: L,
    background: new Float64Array(buffer, bg, L),
    floorVariance: new Float64Array(buffer, fv, L),
    counts: new Float64Array(buffer, counts, L),
    variance: new Float64Array(buffer, variance, L),
    bin: new Float32Array(buffer, bin, L),
    candidates: new Int32Array(buffer, candidates, L),
    saturated: new Uint8Array(buffer, saturated, L),
    forgetRows: () => slotRow.fill(-1),
    plainGroup(data, base, halfGain, level) {
      loadFourRows(data, base);
      return exports.plainGroup(L, 0, bg, fv, counts, variance, bin, candidates, saturated, halfGain, level);
    },
    plainAdd(data, base) {
      loadFourRows(data, base);
      return exports.plainAdd(L, 0, counts, candidates);
    },
    screenedGroup(rows, s, screen, halfGain, level) {
      const am = slotFor(rows, s, 0);
      const bm = slotFor(rows, s, 1);
      const r0 = slotFor(rows, s, 2);
      const r1 = slotFor(rows, s, 3);
      const r2 = slotFor(rows, s, 4);
      const r3 = slotFor(rows, s, 5);
      const r4 = slotFor(rows, s, 6);
      return exports.screenedGroup(L, am, bm, r0, r1, r2, r3, r4, bg, fv, counts, variance, bin, candidates, saturated, screen, halfGain, level);
    },
  };
}

/**
 * The kernels for a spectral length, or undefined where WebAssembly SIMD is missing (or switched
 * off). One module memory serves every call: its views stay valid until the next call with
 * another length, so a caller copies out what it returns (sumBand does not re-enter).
 */
export function bandGroupKernels(length: number): BandGroupKernels | undefined {
  if (!enabled || length < 1) return undefined;
  if (instance === undefined) instance = instantiate();
  const ready = instance;
  if (!ready) return undefined;
  if (kernels?.length !== length) {
    try {
      kernels = layout(length, ready);
    } catch {
      // No room to grow the module's memory: the JavaScript kernels need none.
      kernels = undefined;
      return undefined;
    }
  }
  return kernels;
}
