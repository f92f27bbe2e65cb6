import { bandGroupKernels } from './kernels/band-groups.ts';
import { GROUP_ROWS, type RowCleaner } from './outliers.ts';

/** sum[p] += row[p]: a function per row so V8 optimises it whole (see strip.ts sumAndMin). */
function addInto(sum: Float64Array, row: Float32Array): void {
  for (let p = 0; p < sum.length; p++) sum[p] += row[p];
}

/**
 * Four rows s … s + 3 (`r0`…`r3`, neighbours `am`, `bm` = rows s − 2, s − 1 and `r4` = row s + 4)
 * added to `sum` where all four clear the cleaner's first screen (see sum-band.ts fusedGroup),
 * rows in order; the other pixels go to `candidates`, their count returned.
 */
function addGroup(
  am: Float32Array,
  bm: Float32Array,
  r0: Float32Array,
  r1: Float32Array,
  r2: Float32Array,
  r3: Float32Array,
  r4: Float32Array,
  screen: number,
  sum: Float64Array,
  candidates: Int32Array,
): number {
  const L = r0.length;
  let n = 0;
  for (let p = 0; p < L; p++) {
    const v0 = r0[p];
    const v1 = r1[p];
    const v2 = r2[p];
    const v3 = r3[p];
    const vb = bm[p];
    const t0 = v0 - screen;
    const t1 = v1 - screen;
    const t2 = v2 - screen;
    const t3 = v3 - screen;
    if (
      t0 <= vb && t0 <= v1 && t0 <= am[p] &&
      t1 <= v0 && t1 <= v2 && t1 <= vb &&
      t2 <= v1 && t2 <= v3 && t2 <= v0 &&
      t3 <= v2 && t3 <= r4[p] && t3 <= v1
    ) {
      sum[p] = sum[p] + v0 + v1 + v2 + v3;
    } else {
      candidates[n++] = p;
    }
  }
  return n;
}

/** Without rejection: four rows added where none is NaN; pixels with a NaN go to `candidates`. */
function addPlainGroup(r0: Float32Array, r1: Float32Array, r2: Float32Array, r3: Float32Array, sum: Float64Array, candidates: Int32Array): number {
  const L = r0.length;
  let n = 0;
  for (let p = 0; p < L; p++) {
    const v0 = r0[p];
    const v1 = r1[p];
    const v2 = r2[p];
    const v3 = r3[p];
    const all = v0 + v1 + v2 + v3;
    if (all === all) sum[p] = sum[p] + v0 + v1 + v2 + v3;
    else candidates[n++] = p;
  }
  return n;
}

/**
 * Adds the cleaned spatial rows [start, end) to `sum` (sum[p] += cleaned row[p], rows in order),
 * as `cleaner.clean(row)` for each row would, and returns how many pixels were replaced.
 * Interior rows go four at a time through a fused first screen; the rest row by row.
 */
export function addCleanRows(cleaner: RowCleaner, start: number, end: number, sum: Float64Array): number {
  const L = sum.length;
  // Without rejection the four-row sums run in WebAssembly where it is there, into the kernels'
  // own running sum (copied back at the end).
  const kernel = cleaner.rejectsHot ? undefined : bandGroupKernels(L);
  const total = kernel ? kernel.counts : sum;
  if (kernel) total.set(sum);
  const candidates = kernel ? kernel.candidates : new Int32Array(L);
  const pending = new Float64Array(GROUP_ROWS * L);
  const screen = cleaner.screenThreshold;
  let rejected = 0;
  for (let s = start; s < end; s++) {
    // Without rejection only NaN pixels need the cleaner; with it, those the first screen flags.
    const plain = s + GROUP_ROWS <= end && !cleaner.rejectsHot && cleaner.loadPlainGroup(s);
    if (plain || (s + GROUP_ROWS <= end && cleaner.loadGroup(s))) {
      const rows = cleaner.groupRows;
      let n: number;
      if (!plain) n = addGroup(rows[0], rows[1], rows[2], rows[3], rows[4], rows[5], rows[6], screen, total, candidates);
      else if (kernel) n = kernel.plainAdd(cleaner.groupData, cleaner.groupBase);
      else n = addPlainGroup(rows[2], rows[3], rows[4], rows[5], total, candidates);
      for (let j = 0; j < GROUP_ROWS && n > 0; j++) {
        // Row s + j is rows[j + 2]; its screen neighbours (screened groups only) rows[j], rows[j + 1], rows[j + 3].
        const cur = rows[j + 2];
        const a = rows[j];
        const b = rows[j + 1];
        const c = rows[j + 3];
        let loaded = false;
        for (let k = 0; k < n; k++) {
          const p = candidates[k];
          const v = cur[p];
          const t = v - screen;
          if (plain ? v === v : t <= b[p] && t <= c[p] && t <= a[p]) {
            pending[j * L + k] = v;
            continue;
          }
          if (!loaded) {
            cleaner.load(s + j);
            loaded = true;
          }
          pending[j * L + k] = cleaner.resolve(p);
          if (cleaner.wasReplaced) rejected++;
        }
      }
      for (let k = 0; k < n; k++) {
        const p = candidates[k];
        let pixelTotal = total[p];
        for (let j = 0; j < GROUP_ROWS; j++) pixelTotal += pending[j * L + k];
        total[p] = pixelTotal;
      }
      s += GROUP_ROWS - 1;
      continue;
    }
    rejected += cleaner.clean(s);
    addInto(total, cleaner.values);
  }
  if (kernel) sum.set(total);
  return rejected;
}
