import type { Calibration } from '../../../../shared/engine/types.ts';
import { HC_EV_NM } from '../../../../shared/engine/constants.ts';
import { evaluateCalibration } from '../../../../shared/engine/dispersion/index.ts';
import type { SpectralAxis } from '../lib/axis.ts';

export interface HoverReadoutProps {
  pixel: { col: number; row: number } | null;
  data: Float32Array;
  widthPx: number;
  axis: SpectralAxis;
  /** The approved calibration valid for this frame, when there is one. */
  calibration: Calibration | null;
  calibrationLabel?: string;
}

/** Pixel, counts and — with an approved calibration — first-order wavelength and photon energy under the pointer. */
export function HoverReadout({ pixel, data, widthPx, axis, calibration, calibrationLabel }: HoverReadoutProps) {
  if (!pixel) return <p className="text-sm text-slate-500" data-testid="hover-readout">Point at the image for pixel values.</p>;
  const counts = data[pixel.row * widthPx + pixel.col];
  const spectralPx = axis === 'x' ? pixel.col : pixel.row;
  let wavelength: { nm: number; sigmaNm: number } | null = null;
  if (calibration) {
    const evaluated = evaluateCalibration(calibration, [spectralPx]);
    wavelength = { nm: evaluated.wavelengthNm[0], sigmaNm: evaluated.wavelengthSigmaNm[0] };
  }
  return (
    <dl className="flex flex-wrap gap-x-6 gap-y-1 text-sm tabular-nums" data-testid="hover-readout">
      <div>
        <dt className="inline text-slate-500">pixel </dt>
        <dd className="inline font-medium">
          x {pixel.col}, y {pixel.row}
        </dd>
      </div>
      <div>
        <dt className="inline text-slate-500">counts </dt>
        <dd className="inline font-medium">{Number.isNaN(counts) ? 'NaN' : Number(counts.toPrecision(6))}</dd>
      </div>
      {wavelength ? (
        <>
          <div>
            <dt className="inline text-slate-500">wavelength </dt>
            <dd className="inline font-medium">
              {wavelength.nm.toFixed(3)} ± {wavelength.sigmaNm.toFixed(3)} nm
            </dd>
          </div>
          <div>
            <dt className="inline text-slate-500">photon energy </dt>
            <dd className="inline font-medium">{(HC_EV_NM / wavelength.nm).toFixed(2)} eV</dd>
          </div>
          {calibrationLabel ? <div className="text-slate-500">({calibrationLabel}, first diffraction order)</div> : null}
        </>
      ) : (
        <div className="text-slate-500">no approved calibration covers this frame: no wavelength yet</div>
      )}
    </dl>
  );
}
