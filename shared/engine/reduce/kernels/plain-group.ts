import { wasmBase64 } from './plain-group-wasm.ts';

/**
 * The four-row band kernel (sum-band.ts fusedPlainGroup) as WebAssembly SIMD
 * (plain-group.wat): the same sums, bit for bit, about three times quicker than V8's scalar
 * code for it. Its arrays are views on the module's memory: the caller fills `rows`,
 * `background` and `floorVariance`, keeps its running sums in `counts`, `variance` and
 * `saturated`, and reads each group's four-row sums from `bin` and the pixels left over
 * (a NaN in some row) from `candidates`.
 */
export interface PlainGroupKernel {
  readonly length: number;
  /** Four rows, row j at j·length. */
  readonly rows: Float32Array;
  readonly background: Float64Array;
  readonly floorVariance: Float64Array;
  readonly counts: Float64Array;
  readonly variance: Float64Array;
  readonly bin: Float32Array;
  readonly candidates: Int32Array;
  readonly saturated: Uint8Array;
  /** One group; returns how many candidates it left. */
  run(halfGain: number, level: number): number;
}

type PlainGroupExport = (
  L: number, rows: number, bg: number, fv: number, counts: number, variance: number,
  bin: number, candidates: number, saturated: number, halfGain: number, level: number,
) => number;

const PAGE_BYTES = 65536;
/** Bytes of memory per spectral pixel: 4 f32 rows, 4 f64 arrays, an f32 bin, an i32 and a u8. */
const BYTES_PER_PIXEL = 16 + 32 + 4 + 4 + 1;

let enabled = true;
let instance: { memory: WebAssembly.Memory; plainGroup: PlainGroupExport } | null | undefined;
let kernel: PlainGroupKernel | undefined;

/** Switches the WebAssembly kernels off (or back on): the tests run both paths. */
export function setWasmKernels(on: boolean): void {
  enabled = on;
}

function instantiate(): { memory: WebAssembly.Memory; plainGroup: PlainGroupExport } | null {
  try {
    if (typeof WebAssembly === 'undefined') return null;
    const bytes = Uint8Array.from(atob(wasmBase64), (c) => c.charCodeAt(0));
    // A runtime without SIMD refuses the module: the scalar JavaScript kernel does the work.
    if (!WebAssembly.validate(bytes)) return null;
    const exports = new WebAssembly.Instance(new WebAssembly.Module(bytes)).exports;
    return { memory: exports.memory as WebAssembly.Memory, plainGroup: exports.plainGroup as PlainGroupExport };
  } catch {
    return null;
  }
}

function layout(length: number, memory: WebAssembly.Memory, plainGroup: PlainGroupExport): PlainGroupKernel {
  const L = length;
  const needed = BYTES_PER_PIXEL * L;
  if (memory.buffer.byteLength < needed) memory.grow(Math.ceil((needed - memory.buffer.byteLength) / PAGE_BYTES));
  const buffer = memory.buffer;
  const rows = 0;
  const bg = 16 * L;
  const fv = 24 * L;
  const counts = 32 * L;
  const variance = 40 * L;
  const bin = 48 * L;
  const candidates = 52 * L;
  const saturated = 56 * L;
  return {
    length: L,
    rows: new Float32Array(buffer, rows, 4 * L),
    background: new Float64Array(buffer, bg, L),
    floorVariance: new Float64Array(buffer, fv, L),
    counts: new Float64Array(buffer, counts, L),
    variance: new Float64Array(buffer, variance, L),
    bin: new Float32Array(buffer, bin, L),
    candidates: new Int32Array(buffer, candidates, L),
    saturated: new Uint8Array(buffer, saturated, L),
    run: (halfGain, level) => plainGroup(L, rows, bg, fv, counts, variance, bin, candidates, saturated, halfGain, level),
  };
}

/**
 * The kernel for a spectral length, or undefined where WebAssembly SIMD is missing (or switched
 * off). One module memory serves every call: its views stay valid until the next call with a
 * greater length, so a caller copies out what it returns (sumBand does not re-enter).
 */
export function plainGroupKernel(length: number): PlainGroupKernel | undefined {
  if (!enabled || length < 1) return undefined;
  if (instance === undefined) instance = instantiate();
  const ready = instance;
  if (!ready) return undefined;
  if (kernel?.length !== length) kernel = layout(length, ready.memory, ready.plainGroup);
  return kernel;
}
