import type { Calibration } from '../../../../shared/engine/types.ts';
import { describeAbsoluteScale } from '../../../../shared/engine/scale-note.ts';

/**
 * What fixed the calibration's absolute wavelength scale, in the engine's own words: the known
 * lines and what they bought, or that only the driver tolerance bounds it.
 */
export function ScaleStatement({ calibration }: { calibration: Calibration }) {
  const anchored = calibration.absoluteScale === 'anchored';
  return (
    <p
      data-testid="scale-statement"
      className={`rounded-md px-3 py-2 text-sm ${anchored ? 'bg-accent-50 text-accent-800 ring-1 ring-accent-100' : 'bg-slate-50 text-slate-700 ring-1 ring-slate-200'}`}
    >
      {describeAbsoluteScale(calibration)}
    </p>
  );
}
