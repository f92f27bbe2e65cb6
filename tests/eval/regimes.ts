/**
 * `npm run eval:regimes`: the realignment regimes of a flat-field XUV spectrometer that made the
 * assigner confidently wrong (issue 14), on peak lists straight from the forward model
 * (grating.ts): 150 random realignments per row. Invented instrument (1200 l/mm, 87°, 235 mm,
 * 13.5 µm pixels, 2048 px, harmonics 15–61 of an "800 nm" driver), no real data.
 *
 * Usage: npx tsx tests/eval/regimes.ts [--count N]
 */
import { parseArgs } from 'node:util';
import { assignOrders } from '../../shared/engine/assign/index.ts';
import { regimeCase, REGIMES } from '../unit/assign/regimes.ts';

const { values } = parseArgs({ options: { count: { type: 'string', default: '150' } } });
const COUNT = Number(values.count);

console.log('regime                         n  right  wrong!  ambig  failed  max |Δλ0|/σ  ms/frame');
for (const regime of REGIMES) {
  let right = 0;
  let wrong = 0;
  let ambiguous = 0;
  let failed = 0;
  let worstPull = 0;
  const started = performance.now();
  const examples: string[] = [];
  for (let seed = 1; seed <= COUNT; seed++) {
    const c = regimeCase(regime, seed);
    const result = assignOrders(c.sim.peaks, c.input);
    if (result.status === 'failed') failed++;
    else if (result.status === 'ambiguous') ambiguous++;
    else {
      const bad = result.best!.labels.some((l, i) => l.harmonic !== null && (l.harmonic !== c.sim.truth[i].harmonic || l.diffractionOrder !== c.sim.truth[i].diffractionOrder));
      if (bad) {
        wrong++;
        if (examples.length < 3) examples.push(`seed ${seed}: ${result.message}`);
      } else right++;
      worstPull = Math.max(worstPull, Math.abs(result.driverNm - c.sim.effectiveDriverNm) / result.driverSigmaNm);
    }
  }
  const ms = (performance.now() - started) / COUNT;
  console.log(`${regime.name.padEnd(28)} ${String(COUNT).padStart(4)} ${String(right).padStart(6)} ${String(wrong).padStart(7)} ${String(ambiguous).padStart(6)} ${String(failed).padStart(7)} ${worstPull.toFixed(2).padStart(12)} ${ms.toFixed(0).padStart(9)}`);
  for (const e of examples) console.log(`    ${e.slice(0, 220)}`);
}
