/**
 * The evaluation's printout: a per-class table with both decidability verdicts side by side, the
 * PASS/FAIL lines of the targets, and the frames behind each failure.
 */
import type { Row } from './frame-run.ts';

type Verdict = 'wallDecidable' | 'independentDecidable';

const VERDICTS: { key: Verdict; name: string }[] = [
  { key: 'wallDecidable', name: 'engine-wall check (decidability.ts)' },
  { key: 'independentDecidable', name: 'independent check (independent-decidability.ts)' },
];

/** Correct share of the decidable frames, answered-ambiguous-or-refused share of the undecidable ones. */
function shares(rows: readonly Row[], key: Verdict): { decidable: number; correct: number; undecidable: number; declined: number } {
  const decidable = rows.filter((r) => r[key]);
  const undecidable = rows.filter((r) => !r[key]);
  return {
    decidable: decidable.length,
    correct: decidable.filter((r) => r.outcome === 'correct').length,
    undecidable: undecidable.length,
    declined: undecidable.filter((r) => r.outcome === 'ambiguous' || r.outcome === 'failed').length,
  };
}

function pct(part: number, whole: number): string {
  return whole > 0 ? `${((100 * part) / whole).toFixed(1)}%` : '-';
}

function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length ? s[s.length >> 1] : Number.NaN;
}

function rms(values: readonly number[]): number {
  return values.length ? Math.sqrt(values.reduce((s, v) => s + v * v, 0) / values.length) : Number.NaN;
}

function sum(rows: readonly Row[], pick: (r: Row) => number): number {
  return rows.reduce((s, r) => s + pick(r), 0);
}

/** The per-class table, classes in `order`, then the total. */
export function printClassTable(rows: readonly Row[], order: readonly string[]): void {
  const header = ['class', 'n', 'dec:cls', 'dec:wall', 'dec:ind', 'correct', 'wrong!', 'ambig', 'failed', 'ok|wall', 'ok|ind', 'amb|wall', 'amb|ind', 'in 2σ', 'rms meV', 'm2 ok', 'm1 cov', 'ms med'];
  const widths = [28, 4, 7, 8, 7, 7, 6, 5, 6, 7, 7, 8, 7, 6, 8, 6, 6, 6];
  const line = (cells: string[]): string => cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]) : c.padStart(widths[i]))).join(' ');
  console.log(line(header));
  const groups: [string, readonly Row[]][] = order.map((cls) => [cls, rows.filter((r) => r.cls === cls)]);
  groups.push(['TOTAL', rows]);
  for (const [name, group] of groups) {
    if (group.length === 0) continue;
    const count = (o: Row['outcome']): string => String(group.filter((r) => r.outcome === o).length);
    const wall = shares(group, 'wallDecidable');
    const ind = shares(group, 'independentDecidable');
    console.log(
      line([
        name,
        String(group.length),
        String(group.filter((r) => r.claimDecidable && !r.refusalExpected).length),
        String(wall.decidable),
        String(ind.decidable),
        count('correct'),
        count('wrong'),
        count('ambiguous'),
        count('failed'),
        pct(wall.correct, wall.decidable),
        pct(ind.correct, ind.decidable),
        pct(wall.declined, wall.undecidable),
        pct(ind.declined, ind.undecidable),
        pct(sum(group, (r) => r.inside), sum(group, (r) => r.pixels)),
        rms(group.flatMap((r) => r.errorsMeV)).toFixed(0),
        pct(sum(group, (r) => r.secondOrderRight), sum(group, (r) => r.secondOrderDetected)),
        pct(sum(group, (r) => r.firstOrderLabelled), sum(group, (r) => r.firstOrderDetected)),
        median(group.map((r) => r.ms)).toFixed(0),
      ]),
    );
  }
  console.log(
    [
      'dec:cls/wall/ind = frames decidable by the class claim / the engine-wall check / the independent check (refusal-expected',
      'frames count as undecidable under all three); ok|x = correct share of the frames x calls decidable; amb|x = share of the',
      'frames x calls undecidable answered ambiguous or refused; in 2σ = pixels of correct results whose true wavelength lies in',
      'the stated 2σ band; m2 ok = of the true m = 2 lines clear of other lines and detected as peaks, the share labelled (q, m = 2)',
      'in unique results; m1 cov = of the true m = 1 lines detected as peaks, the share labelled in unique results; ms = decode + calibrate.',
    ].join('\n'),
  );
}

/** PASS/FAIL lines of the targets; returns whether all passed. */
export function printTargets(sim: string, rows: readonly Row[], order: readonly string[]): boolean {
  const verdict = (ok: boolean): string => (ok ? 'PASS' : 'FAIL');
  let all = true;
  const say = (ok: boolean, text: string): void => {
    all &&= ok;
    console.log(`[${sim}] ${verdict(ok)} ${text}`);
  };
  const wrong = rows.filter((r) => r.outcome === 'wrong');
  say(wrong.length === 0, `wrong-but-confident: ${wrong.length} of ${rows.length} (target 0)`);
  for (const v of VERDICTS) {
    const s = shares(rows, v.key);
    say(s.decidable > 0 && s.correct / s.decidable >= 0.97, `correct on decidable, ${v.name}: ${pct(s.correct, s.decidable)} of ${s.decidable} (target ≥ 97 %)`);
    say(s.undecidable === 0 || s.declined / s.undecidable >= 0.95, `undecidable answered ambiguous or refused, ${v.name}: ${pct(s.declined, s.undecidable)} of ${s.undecidable} (target ≥ 95 %)`);
  }
  const pixels = sum(rows, (r) => r.pixels);
  const inside = sum(rows, (r) => r.inside);
  const outside = order.filter((cls) => {
    const g = rows.filter((r) => r.cls === cls);
    const p = sum(g, (r) => r.pixels);
    if (p === 0) return false;
    const share = sum(g, (r) => r.inside) / p;
    return share < 0.9 || share > 0.98;
  });
  const judged = order.filter((cls) => sum(rows.filter((r) => r.cls === cls), (r) => r.pixels) > 0).length;
  say(
    pixels > 0 && outside.length === 0,
    `truth inside the 2σ band in 90-98 % of pixels in every class with correct results (${judged} classes): total ${pct(inside, pixels)} of ${pixels} px` +
      (outside.length ? `; outside in ${outside.join(', ')}` : ''),
  );
  const m2 = sum(rows, (r) => r.secondOrderDetected);
  const m2Right = sum(rows, (r) => r.secondOrderRight);
  say(m2 === 0 || m2Right / m2 >= 0.7, `m = 2 lines labelled right (q, m = 2) in unique results: ${pct(m2Right, m2)} of ${m2} detected (target ≥ 70 %)`);
  const m1 = sum(rows, (r) => r.firstOrderDetected);
  console.log(`[${sim}] info first-order coverage in unique results: ${pct(sum(rows, (r) => r.firstOrderLabelled), m1)} of ${m1} detected true m = 1 lines labelled (no target)`);
  console.log(`[${sim}] info median decode + calibrate time: ${median(rows.map((r) => r.ms)).toFixed(0)} ms/frame`);
  const wallErrors = rows.filter((r) => r.wallError);
  if (wallErrors.length) console.log(`[${sim}] note the engine-wall check could not run on ${wallErrors.length} frames (first: ${wallErrors[0].wallError}); counted undecidable there`);
  return all;
}

/** The frames behind the failures, a few of each kind. */
export function printCases(sim: string, rows: readonly Row[], limit = 12): void {
  const show = (title: string, list: readonly Row[], text: (r: Row) => string): void => {
    if (list.length === 0) return;
    console.log(`[${sim}] ${title} (${list.length}${list.length > limit ? `, first ${limit}` : ''}):`);
    for (const r of list.slice(0, limit)) console.log(`  ${r.id} [${r.format}] ${text(r)}`);
  };
  const margins = (r: Row): string => `wall margin ${r.wallMargin.toFixed(1)}, independent ${r.independentReason}`;
  show('silent failures (unique and wrong)', rows.filter((r) => r.outcome === 'wrong'), (r) => `${r.detail} | ${margins(r)}`);
  show('unique on frames the independent check calls undecidable', rows.filter((r) => !r.independentDecidable && (r.outcome === 'correct' || r.outcome === 'wrong')), (r) => `${r.outcome} | ${margins(r)}`);
  show('ambiguous on frames the independent check calls decidable', rows.filter((r) => r.independentDecidable && r.outcome === 'ambiguous'), (r) => `${r.detail.slice(0, 160)} | ${margins(r)}`);
  show('failed on frames the independent check calls decidable', rows.filter((r) => r.independentDecidable && r.outcome === 'failed'), (r) => `${r.detail.slice(0, 160)}`);
}
