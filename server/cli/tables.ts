/** Short readable tables for the CLI without `--json`. */
import { describeAbsoluteScale } from '../../shared/engine/scale-note.ts';
import type { Calibration } from '../../shared/engine/types.ts';

interface CalibrateLike {
  status: string;
  message: string;
  peaks: { pixel: number; pixelSigma: number; harmonic: number | null; diffractionOrder: number; wavelengthNm: number | null; energyEv: number | null }[];
  calibration: Calibration | null;
}

interface ApplyLike {
  pixel: number[];
  wavelengthNm: number[];
  energyEv: number[];
  orders: { harmonic: number; diffractionOrder: number; pixel: number; energyEv: number; yield: number }[];
}

function fixed(value: number | null | undefined, digits: number): string {
  return value == null || !Number.isFinite(value) ? '-' : value.toFixed(digits);
}

function table(header: string[], rows: string[][]): string {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padStart(widths[i])).join('  ');
  return [line(header), ...rows.map(line)].join('\n');
}

export function formatCalibrateTable(result: CalibrateLike): string {
  const lines = [`status: ${result.status}`, result.message];
  if (result.calibration) {
    const c = result.calibration;
    lines.push(
      `model: ${c.model}; driver ${fixed(c.driverNm, 3)} ± ${fixed(c.driverSigmaNm, 3)} nm; rms residual ${fixed(c.residualRmsNm, 5)} nm; absolute scale: ${c.absoluteScale}`,
      describeAbsoluteScale(c),
    );
  }
  lines.push(
    table(
      ['pixel', '±', 'q', 'm', 'λ/nm', 'E/eV'],
      result.peaks.map((p) => [
        fixed(p.pixel, 2),
        fixed(p.pixelSigma, 3),
        p.harmonic == null ? '?' : String(p.harmonic),
        String(p.diffractionOrder),
        fixed(p.wavelengthNm, 4),
        fixed(p.energyEv, 3),
      ]),
    ),
  );
  return lines.join('\n');
}

export function formatApplyTable(result: ApplyLike): string {
  const n = result.pixel.length;
  const range =
    n > 0
      ? `pixels ${n}: ${fixed(result.wavelengthNm[0], 3)}–${fixed(result.wavelengthNm[n - 1], 3)} nm, ${fixed(result.energyEv[0], 2)}–${fixed(result.energyEv[n - 1], 2)} eV`
      : 'no pixels';
  return [
    range,
    table(
      ['q', 'm', 'pixel', 'E/eV', 'yield'],
      result.orders.map((o) => [String(o.harmonic), String(o.diffractionOrder), fixed(o.pixel, 2), fixed(o.energyEv, 3), o.yield.toPrecision(4)]),
    ),
  ].join('\n');
}
