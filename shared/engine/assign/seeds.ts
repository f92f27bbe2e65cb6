/**
 * Seeds and their growth: pairs of strong clean peaks (the neighbours of the strongest, every pair
 * among the five strongest, and the pins' neighbours) with every pair of harmonics the walls allow,
 * placed by a linear solve (search.ts linearSeed), ranked by how many strong peaks they put on
 * predicted lines, de-duplicated by pattern, grown outward (search.ts grow) and finished
 * (labelling.ts).
 */
import { pixelToWavelengthNm } from '../grating.ts';
import {
  geometryOf,
  predictPixel,
  P_ANGLE,
  P_CENTER,
  P_DISTANCE,
  P_DRIVER,
  P_INCIDENCE,
  P_TILT,
  type Wall,
} from './model.ts';
import { totalScore } from './score.ts';
import {
  allowedHarmonic,
  grow,
  harmonicStep,
  linearSeed,
  localSpacing,
  nearestLine,
  predictLines,
  refit,
  seedStart,
  type SearchContext,
} from './search.ts';
import { finish, labelKey, type Candidate } from './labelling.ts';
import { driverSpanNm } from './priors.ts';

const MAX_GROWN_SEEDS = 12;
/** Slips of one seed pattern grown at most (the most plausible geometry of a pattern need not be the true slip when the walls are wide). */
const MAX_GROWN_PER_PATTERN = 3;
/** Extra seeds grown because they explain more strong peaks once m = 2 lines count (see searchCandidates). */
const MAX_SECOND_ORDER_SEEDS = 3;

/** Whether the nonzero labels run strictly one way along the pixels (down when wavelength increases with pixel). */
function monotonicLabels(harmonic: Int32Array, wavelengthIncreasesWithPixel: boolean): boolean {
  let previous = 0;
  for (let i = 0; i < harmonic.length; i++) {
    const q = harmonic[i];
    if (q <= 0) continue;
    if (previous > 0 && (wavelengthIncreasesWithPixel ? q >= previous : q <= previous)) return false;
    previous = q;
  }
  return true;
}

/** Harmonics that peak `i` can be, given the walls of every parameter (for the seeds). */
function candidateHarmonics(ctx: SearchContext, i: number): [number, number] {
  const [lambda0Lo, lambda0Hi] = driverSpanNm(ctx.driver);
  if (!ctx.angleKnown) return [1, Math.max(1, Math.min(400, Math.floor(lambda0Hi / 1)))];
  let lo = Infinity;
  let hi = -Infinity;
  const p = Float64Array.from(ctx.model.nominal);
  const w = ctx.model.walls;
  const varied = [P_CENTER, P_ANGLE, P_INCIDENCE, P_DISTANCE, P_TILT];
  for (let corner = 0; corner < 1 << varied.length; corner++) {
    varied.forEach((k, bit) => {
      const wk = w[k] as Wall;
      p[k] = corner & (1 << bit) ? wk.hi : wk.lo;
    });
    const lambda = pixelToWavelengthNm(geometryOf(ctx.model, p), ctx.peaks[i].pixel, 1);
    if (lambda > 0) {
      lo = Math.min(lo, lambda);
      hi = Math.max(hi, lambda);
    }
  }
  if (!Number.isFinite(lo)) return [1, 0];
  return [Math.max(1, Math.floor(lambda0Lo / hi) - 1), Math.ceil(lambda0Hi / lo) + 1];
}

/** A seed's implied (peak, harmonic) pairs with the harmonics taken relative to the lowest-index peak's. */
function patternKey(implied: [number, number][]): string {
  const sorted = [...new Map(implied).entries()].sort((x, y) => x[0] - y[0]);
  const ref = sorted.length ? sorted[0][1] : 0;
  return sorted.map(([i, q]) => `${i}:${q - ref}`).join(',');
}

/** Seeds: (pair of neighbouring peaks, their harmonics) → starting labelling and parameters. */
export function searchCandidates(ctx: SearchContext): Candidate[] {
  const n = ctx.peaks.length;
  const step = harmonicStep(ctx.parity);
  const kMax = ctx.parity === 'odd' ? 3 : 4;
  // A saturated line is among the brightest whatever its fitted SNR (its clipped core is down-weighted).
  const rank = (i: number): number => (ctx.peaks[i].saturated ? Number.POSITIVE_INFINITY : ctx.peaks[i].snr);
  const bySnr = [...ctx.peaks.keys()].filter((i) => !ctx.knownPeaks.has(i)).sort((a, b) => rank(b) - rank(a) || ctx.peaks[b].snr - ctx.peaks[a].snr);
  const strong = bySnr.slice(0, Math.min(8, n));
  const pairSet = new Set<string>();
  const pairs: [number, number][] = [];
  const addPair = (a: number, b: number): void => {
    if (a < 0 || b < 0 || a >= n || b >= n || a === b) return;
    const lo = Math.min(a, b);
    const hi = Math.max(a, b);
    const key = `${lo},${hi}`;
    if (pairSet.has(key)) return;
    pairSet.add(key);
    pairs.push([lo, hi]);
  };
  for (const p of ctx.pins.keys()) {
    addPair(p, p - 1);
    addPair(p, p + 1);
  }
  // Edge peaks are poor seeds (truncated lines); neighbours of the strongest clean peaks, and every
  // pair among the strongest few, so that a labelling can start from two first-order lines even when
  // m = 2 lines or false peaks sit between them.
  const clean = bySnr.filter((i) => !ctx.peaks[i].edge);
  const seedPool = clean.length >= 2 ? clean : bySnr;
  const adjacent = new Set<string>();
  for (const s of seedPool.slice(0, Math.min(4, seedPool.length))) {
    for (const t of [s - 1, s + 1]) {
      if (t >= 0 && t < n && !ctx.peaks[t].edge) {
        addPair(s, t);
        adjacent.add(`${Math.min(s, t)},${Math.max(s, t)}`);
      }
    }
  }
  const top = seedPool.slice(0, Math.min(5, seedPool.length));
  for (let x = 0; x < top.length; x++) for (let y = x + 1; y < top.length; y++) addPair(top[x], top[y]);
  const incr = ctx.model.wavelengthIncreasesWithPixel;
  interface Seed {
    harmonic: Int32Array;
    start: Float64Array;
    matches: number;
    /** Strong peaks not on an m = 1 line that sit on an m = 2 line. */
    matchesSecond: number;
    /** Peaks of any strength on the seed's predicted lines. */
    matchesAll: number;
    /** Plausibility of the seed's geometry (lower is better); ranks seeds with equal matches. */
    cost: number;
    key: string;
    /** (peak, harmonic) pairs the seed implies: its two peaks and the strong peaks on its lines. */
    implied: [number, number][];
  }
  const seeds: Seed[] = [];
  for (const [a, b] of pairs) {
    const [qLo, qHi] = candidateHarmonics(ctx, a);
    const [qbLo, qbHi] = candidateHarmonics(ctx, b);
    const near = adjacent.has(`${a},${b}`);
    for (let qa = qLo; qa <= qHi; qa++) {
      if (!allowedHarmonic(ctx.parity, qa)) continue;
      if (ctx.pins.has(a) && ctx.pins.get(a) !== qa) continue;
      const kHi = near ? kMax : Math.max(kMax, Math.ceil(Math.abs(incr ? qa - qbLo : qbHi - qa) / step));
      for (let k = 1; k <= kHi; k++) {
        const qb = incr ? qa - k * step : qa + k * step;
        if (!near && (qb < qbLo || qb > qbHi)) continue;
        if (!allowedHarmonic(ctx.parity, qb)) continue;
        if (ctx.pins.has(b) && ctx.pins.get(b) !== qb) continue;
        const harmonic = new Int32Array(n);
        for (const [p, q] of ctx.pins) harmonic[p] = q;
        if ([...ctx.pins.entries()].some(([p, q]) => (p === a && q !== qa) || (p === b && q !== qb))) continue;
        harmonic[a] = qa;
        harmonic[b] = qb;
        // Pins and the pair must read as one comb: first-order harmonics strictly monotonic in pixel
        // (a pin beside a pair that repeats or reverses its harmonic is no labelling at all).
        if (ctx.pins.size > 0 && !monotonicLabels(harmonic, incr)) continue;
        let seedParams: Float64Array;
        let seedCost: number;
        if (ctx.angleKnown) {
          // Linear placement of the pair (no iterative fit): most seeds die here for free.
          const lin = linearSeed(ctx, a, qa, b, qb);
          if (!lin) continue;
          seedParams = lin.start;
          seedCost = lin.cost;
        } else {
          const start = seedStart(ctx, a, qa);
          if (!start) continue;
          // Cheap check before any fit: with A placed, B must land within ±20 % of its separation.
          const predB = predictPixel(ctx.model, start, start[P_DRIVER] / qb);
          const sep = ctx.peaks[b].pixel - ctx.peaks[a].pixel;
          if (!Number.isFinite(predB) || Math.abs(predB - ctx.peaks[b].pixel) > 0.2 * Math.abs(sep)) continue;
          const order = new Int8Array(n);
          for (let i = 0; i < n; i++) if (harmonic[i] > 0) order[i] = 1;
          const state = refit(ctx, harmonic, order, start);
          if (!(state.fit.chiSquarePrior < 50) || !(state.fit.chiSquarePosition < 1e4)) continue;
          seedParams = state.fit.parameters;
          seedCost = state.fit.chiSquarePrior + 1e-3 * state.fit.chiSquarePosition;
        }
        const lines = predictLines(ctx, seedParams, 1);
        let matches = 0;
        let key = '';
        const implied: [number, number][] = [[a, qa], [b, qb]];
        for (const s of strong) {
          const j = nearestLine(lines, ctx.peaks[s].pixel);
          if (j < 0) continue;
          if (Math.abs(ctx.peaks[s].pixel - lines.pixel[j]) < 0.12 * localSpacing(lines, j)) {
            matches++;
            key += `${s}:${lines.harmonic[j]},`;
            implied.push([s, lines.harmonic[j]]);
          }
        }
        // Strong peaks off every m = 1 line but on an m = 2 line of the seed's geometry: a frame with
        // bright second-order lines would otherwise rank seeds that read them as first order highest.
        const lines2 = predictLines(ctx, seedParams, 2);
        let matchesSecond = 0;
        for (const s of strong) {
          const j1 = nearestLine(lines, ctx.peaks[s].pixel);
          if (j1 >= 0 && Math.abs(ctx.peaks[s].pixel - lines.pixel[j1]) < 0.12 * localSpacing(lines, j1)) continue;
          const j = nearestLine(lines2, ctx.peaks[s].pixel);
          if (j >= 0 && Math.abs(ctx.peaks[s].pixel - lines2.pixel[j]) < 0.12 * localSpacing(lines2, j)) matchesSecond++;
        }
        // All peaks on predicted lines: separates seeds that all explain the few strongest peaks.
        let matchesAll = 0;
        for (let i = 0; i < n; i++) {
          const j = nearestLine(lines, ctx.peaks[i].pixel);
          if (j >= 0 && Math.abs(ctx.peaks[i].pixel - lines.pixel[j]) < 0.12 * localSpacing(lines, j)) matchesAll++;
        }
        seeds.push({ harmonic, start: seedParams, matches, matchesSecond, matchesAll, cost: seedCost, key, implied });
      }
    }
  }
  seeds.sort((x, y) => y.matches - x.matches || y.matchesAll - x.matchesAll || x.cost - y.cost);
  const grownKeys = new Set<string>();
  const grownPatterns = new Map<string, number>();
  const grownLabellings: Int32Array[] = [];
  const out = new Map<string, Candidate>();
  let grown = 0;
  const topMatches = seeds.length > 0 ? seeds[0].matches : 0;
  /** Grows one seed into a finished candidate unless an equivalent seed was grown; false when skipped. */
  const tryGrow = (seed: Seed): boolean => {
    if (grownKeys.has(seed.key)) return false;
    grownKeys.add(seed.key);
    // Seeds that differ only by a uniform shift of their implied harmonics are slips of one
    // pattern: grow the most plausible few (with wide walls the most plausible geometry need not
    // belong to the true slip); the slips of the leading labelling are fitted in
    // earnest afterwards (shiftedRivals).
    // With pins a shifted copy is not the same hypothesis (the pins break the shift symmetry).
    const pattern = ctx.pins.size > 0 ? seed.key + Array.from(seed.harmonic).join('/') : patternKey(seed.implied);
    const grownOfPattern = grownPatterns.get(pattern) ?? 0;
    if (grownOfPattern >= (ctx.pins.size === 0 ? MAX_GROWN_PER_PATTERN : 1)) return false;
    if (ctx.pins.size === 0) grownPatterns.set(pattern, grownOfPattern + 1);
    // A seed whose implied labels a grown labelling already carries would grow into that labelling.
    if (grownLabellings.some((h) => seed.implied.every(([i, q]) => h[i] === q))) return false;
    const lab = grow(ctx, seed.harmonic, seed.start);
    if (!lab) return true;
    // With pins, only a seed that grew stands for its pattern: a failed one must not hide the others.
    if (ctx.pins.size > 0) grownPatterns.set(pattern, 1);
    grownLabellings.push(lab.harmonic);
    let ok = true;
    for (const [p, q] of ctx.pins) if (lab.harmonic[p] !== q) ok = false;
    if (!ok) return true;
    const key0 = labelKey(lab.harmonic, lab.order);
    if (out.has(key0)) return true;
    const cand = finish(ctx, lab.harmonic, lab.order, lab.fit.parameters);
    const key = labelKey(cand.harmonic, cand.order);
    const prev = out.get(key);
    if (!prev || totalScore(cand.raw, 1) < totalScore(prev.raw, 1)) out.set(key, cand);
    return true;
  };
  for (const seed of seeds) {
    if (grown >= MAX_GROWN_SEEDS) break;
    // Seeds that explain far fewer strong peaks than the best seed cannot win; growing them wastes time.
    if (seed.matches < topMatches - 2 && grown >= 4) break;
    if (tryGrow(seed)) grown++;
  }
  // Bright m = 2 lines (their m = 1 partners possibly off the detector) can make every seed that
  // reads them as first order outrank the true comb on m = 1 matches alone. Grow the few seeds that
  // explain more strong peaks than any m = 1-only reading once m = 2 lines count too; the score
  // decides between them and the rest.
  const bySecond = seeds
    .filter((s) => s.matches + s.matchesSecond > topMatches)
    // On a tie, the seed whose m = 2 lines explain more: that is what this branch is for (a dense
    // high-order reading hits as many strong peaks in m = 1 by coincidence).
    .sort((x, y) => y.matches + y.matchesSecond - (x.matches + x.matchesSecond) || y.matchesSecond - x.matchesSecond || x.cost - y.cost);
  let grownSecond = 0;
  for (const seed of bySecond) {
    if (grownSecond >= MAX_SECOND_ORDER_SEEDS) break;
    if (tryGrow(seed)) grownSecond++;
  }
  return [...out.values()];
}

