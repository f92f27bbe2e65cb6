import type { AppliedSpectrum } from '../../../../shared/engine/apply.ts';
import { lineFwhm } from '../lib/line-width';
import { orderName } from '../lib/spectrum-axis';

function fmt(v: number, digits: number): string {
  return Number.isFinite(v) ? v.toFixed(digits) : '—';
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/**
 * Yield ± σ: plain counts below 10⁵, else a shared power of ten with enough mantissa digits that
 * σ shows two significant figures (at most four decimals).
 */
export function formatYield(v: number, s: number): string {
  if (!Number.isFinite(v)) return '—';
  const exp = v === 0 ? 0 : Math.floor(Math.log10(Math.abs(v)));
  if (exp < 5) return `${v.toFixed(0)} ± ${s.toFixed(0)}`;
  const scale = 10 ** exp;
  const rel = Math.abs(s / scale);
  const digits = rel > 0 ? Math.min(4, Math.max(2, 1 - Math.floor(Math.log10(rel)))) : 2;
  const power = String(exp).split('').map((c) => SUPERSCRIPT[c] ?? c).join('');
  return `(${(v / scale).toFixed(digits)} ± ${(s / scale).toFixed(digits)})·10${power}`;
}

/**
 * One row per labelled order: harmonic and diffraction order, photon energy, wavelength, yield ± σ
 * (filter-corrected when the server applied the correction), and the FWHM measured on the
 * lineout (linear interpolation: within about 1 % for lines wider than 7 px FWHM, 5 % at 3.5 px). Undetected orders the calibration predicts are listed greyed, without a width.
 */
export function OrdersTable({ spectrum }: { spectrum: AppliedSpectrum }) {
  const rows = [...spectrum.orders].sort((a, b) => a.diffractionOrder - b.diffractionOrder || a.harmonic - b.harmonic);
  if (rows.length === 0) return <p className="text-sm text-slate-500">The calibration predicts no orders on this camera.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-sm tabular-nums" aria-label="Orders" data-testid="orders-table">
        <thead>
          <tr className="border-b border-slate-200 text-left text-xs tracking-wide text-slate-500 uppercase">
            <th className="py-2 pr-4 font-medium">order</th>
            <th className="py-2 pr-4 font-medium">pixel</th>
            <th className="py-2 pr-4 text-right font-medium">energy (eV)</th>
            <th className="py-2 pr-4 text-right font-medium">wavelength (nm)</th>
            <th className="py-2 pr-4 text-right font-medium">yield (counts)</th>
            <th className="py-2 pr-4 text-right font-medium">FWHM (eV)</th>
            <th className="py-2 font-medium">seen</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((o) => {
            const width = o.detected ? lineFwhm(spectrum.intensity, spectrum.energyEv, o.pixel) : null;
            return (
              <tr key={`${o.harmonic}-${o.diffractionOrder}`} className={`border-b border-slate-100 ${o.detected ? '' : 'text-slate-400'}`} data-testid="order-row" data-harmonic={o.harmonic} data-diffraction-order={o.diffractionOrder}>
                <td className="py-1.5 pr-4 font-medium">{orderName(o)}</td>
                <td className="py-1.5 pr-4">{fmt(o.pixel, 1)}</td>
                <td className="py-1.5 pr-4 text-right">{fmt(o.energyEv, 3)}</td>
                <td className="py-1.5 pr-4 text-right">{fmt(o.wavelengthNm, 3)}</td>
                <td className="py-1.5 pr-4 text-right">{formatYield(o.yield, o.yieldSigma)}</td>
                <td className="py-1.5 pr-4 text-right">{width ? `${width.fwhmEv.toFixed(3)} (${width.fwhmPx.toFixed(1)} px)` : '—'}</td>
                <td className="py-1.5">{o.detected ? 'detected' : 'predicted only'}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
      {spectrum.cutoffEv !== undefined ? <p className="mt-2 text-xs text-slate-500">Cutoff (highest detected first-order harmonic): {spectrum.cutoffEv.toFixed(2)} eV.</p> : null}
    </div>
  );
}
