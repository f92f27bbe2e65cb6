/**
 * Debug helper for the evaluation: runs chosen scenarios through calibrate and prints the
 * detected peaks against the simulator's truth and the top hypotheses.
 * Usage: npx tsx tests/eval/debug-one.ts --class ni-vuv-low-orders [--count 312 --seed 2026 --max 3]
 *        npx tsx tests/eval/debug-one.ts --sim field --class field-ff-odd-clean [--count 260 ...]
 * (the same scenarios and frame seeds as `npm run eval` for that --sim, --count and --seed).
 */
import { parseArgs } from 'node:util';
import { calibrateFrame } from '../../shared/engine/calibrate.ts';
import { driverPriorOf, generateFieldScenarios, generateScenarios, simulateFrame } from '../../shared/engine/simulate/index.ts';

const { values } = parseArgs({ options: { class: { type: 'string', default: '' }, index: { type: 'string', default: '' }, count: { type: 'string', default: '' }, sim: { type: 'string', default: 'classic' }, seed: { type: 'string', default: '2026' }, max: { type: 'string', default: '3' }, only: { type: 'string', default: '' } } });
const SEED = Number(values.seed);
const FIELD = values.sim === 'field';
const scenarios = FIELD ? generateFieldScenarios(Number(values.count || 260), SEED) : generateScenarios(Number(values.count || 312), SEED);
let shown = 0;
for (let i = 0; i < scenarios.length && shown < Number(values.max); i++) {
  const s = scenarios[i];
  if (values.class && s.class !== values.class) continue;
  if (values.index && !values.index.split(',').includes(String(i))) continue;
  const { frame, truth } = simulateFrame(s, FIELD ? SEED * 104_729 + i : SEED * 7919 + i);
  const t0 = performance.now();
  const r = calibrateFrame(frame, { profile: s.profile, driverNm: s.driver.nominalNm, ...driverPriorOf(s.driver), parity: s.parity, filters: (s.filters ?? []).map((f) => ({ material: f.material, thicknessNm: f.thicknessNm })) });
  const ms = performance.now() - t0;
  if (values.only) {
    let ok = r.status === 'unique';
    for (const p of r.peaks) {
      if (p.harmonic === null) continue;
      const l = truth.lines.filter((x) => x.visible).sort((a, b) => Math.abs(a.pixel - p.pixel) - Math.abs(b.pixel - p.pixel))[0];
      if (!l || Math.abs(l.pixel - p.pixel) > 3 || l.harmonic !== p.harmonic || l.diffractionOrder !== p.diffractionOrder) ok = false;
    }
    const want = values.only;
    if ((want === 'bad' && ok) || (want === 'wrong' && (ok || r.status !== 'unique')) || (want === 'notunique' && r.status === 'unique')) continue;
  }
  shown++;
  console.log(`\n#${i} ${s.id} ${s.description} parity=${s.parity} tol=${s.driver.tolerancePercent.toFixed(3)}% eff=${s.driver.effectiveNm.toFixed(2)} nominal=${s.driver.nominalNm}`);
  console.log(`  geometry true: inc ${s.geometry.incidenceAngleDeg.toFixed(3)} L ${s.geometry.detectorDistanceMm.toFixed(1)} c ${s.geometry.detectorCenterPixel.toFixed(1)} beta ${s.geometry.detectorAngleDeg.toFixed(3)} tilt ${s.geometry.detectorTiltDeg.toFixed(2)} | profile inc ${s.profile.incidenceAngleDeg.toFixed(3)} L ${s.profile.detectorDistanceMm.toFixed(1)} c ${s.profile.detectorCenterPixel?.toFixed(1)} n=${truth.wavelengthNmAtPixel.length}`);
  console.log(`  truth visible: ${truth.lines.filter((l) => l.visible).map((l) => `${l.pixel.toFixed(1)}:${l.harmonic}${l.diffractionOrder === 2 ? '/2' : ''}(snr${l.snr.toFixed(0)})`).join(' ')}`);
  console.log(`  peaks: ${r.peaks.map((p) => `${p.pixel.toFixed(1)}±${p.pixelSigma.toFixed(2)}:${p.harmonic ?? '-'}${p.diffractionOrder === 2 ? '/2' : ''}(snr${p.snr.toFixed(0)},w${p.fwhmPx.toFixed(1)},sw${p.spatialWidthPx.toFixed(1)})`).join(' ')}`);
  console.log(`  ${r.status} (${ms.toFixed(0)} ms): ${r.message}`);
  for (const h of r.hypotheses.slice(0, 5)) console.log(`   h${h.rank} Δ${h.deltaScore.toFixed(1)} q${h.firstHarmonic}-${h.lastHarmonic} λ0 ${h.driverNm.toFixed(2)} rms ${h.rmsResidualPx.toFixed(3)} [${h.harmonics.map((q) => q ?? '-').join(',')}]`);
}
